// SPDX-License-Identifier: MIT
#include "reconstruction/interface_coefficients.h"

#include <cmath>
#include <complex>

namespace umbra::recon {

namespace {
using C = std::complex<double>;
// cos of the angle whose sine is s (imaginary past 1: evanescent).
C cosFromSin(double s) { return s <= 1 ? C(std::sqrt((1 - s) * (1 + s)), 0) : C(0, std::sqrt(s * s - 1)); }
}  // namespace

double freeSurfaceReflection(Wave in, Wave out, double a, double cl, double ct) {
    const double k = cl / ct;
    double sl, st;  // sines of the L and T angles
    if (in == Wave::L) {
        sl = std::sin(a);
        st = sl / k;
    } else {
        st = std::sin(a);
        sl = st * k;
    }
    const C cl_ = cosFromSin(sl), ct_ = cosFromSin(st);
    const C s2l = 2.0 * sl * cl_, s2t = 2.0 * st * ct_;
    const C c2t = 1.0 - 2.0 * st * st;
    const C D = s2l * s2t + k * k * c2t * c2t;
    C r;
    if (in == out) r = (s2l * s2t - k * k * c2t * c2t) / D;
    else if (in == Wave::L) r = 2.0 * k * s2l * c2t / D;
    else r = k * (2.0 * s2t * c2t) / D;  // sin 4a = 2 sin 2a cos 2a
    if (in != out && out == Wave::L && sl > 1) return 0;  // converted L evanescent
    return std::abs(r);
}

double fluidSolidTransmission(Wave out, double a1, double c1, double rho1, double cl, double ct, double rho2) {
    const double s1 = std::sin(a1), p = s1 / c1;
    const double sl = p * cl, st = p * ct;
    if ((out == Wave::L && sl > 1) || (out == Wave::T && st > 1)) return 0;
    const C c1_ = cosFromSin(s1), cl_ = cosFromSin(sl), ct_ = cosFromSin(st);
    const C Z1 = rho1 * c1 / c1_, ZL = rho2 * cl / cl_, ZT = rho2 * ct / ct_;
    const C c2t = 1.0 - 2.0 * st * st, s2t = 2.0 * st * ct_;
    const C D = ZL * c2t * c2t + ZT * s2t * s2t + Z1;
    const C t = out == Wave::L ? (rho1 / rho2) * (c1 / cl) * 2.0 * ZL * c2t / D : (rho1 / rho2) * (c1 / ct) * 2.0 * ZT * s2t / D;
    return std::abs(t);
}

double solidFluidTransmission(Wave in, double a_in, double c1, double rho1, double cl, double ct, double rho2) {
    const double cin = in == Wave::L ? cl : ct;
    const double s1 = std::sin(a_in) * c1 / cin;
    if (s1 >= 1) return 0;
    const double a1 = std::asin(s1);
    const double fwd = fluidSolidTransmission(in, a1, c1, rho1, cl, ct, rho2);
    return fwd * rho2 * cin * std::cos(a_in) / (rho1 * c1 * std::cos(a1));
}

}  // namespace umbra::recon
