// SPDX-License-Identifier: MIT
#include "reconstruction/simulate/elastic.h"

#include <cmath>
#include <complex>

#include "reconstruction/interface_coefficients.h"
#include "reconstruction/simulate/directivity.h"

namespace umbra::recon::sim {

double millerPurseyDirectivity(bool shear, double t, double cl, double ct) {
    using C = std::complex<double>;
    const double mu = cl / ct, mu2 = mu * mu;
    auto F0 = [&](double z) {
        const double z2 = z * z;
        return C((2 * z2 - mu2) * (2 * z2 - mu2), 0) - 4.0 * z2 * std::sqrt(C(z2 - 1, 0)) * std::sqrt(C(z2 - mu2, 0));
    };
    const double s = std::sin(t);
    C d;
    if (!shear) d = std::cos(t) * (mu2 - 2 * s * s) / F0(s);
    else d = std::pow(mu, 2.5) * std::sqrt(C(mu2 * s * s - 1, 0)) * std::sin(2 * t) / F0(mu * s);
    return mu2 * std::abs(d);
}

core::WedgeInfo wedgeInfo(const WedgeSpec& w) { return core::WedgeInfo{w.speed_m_s, {0, 0, w.height_m}, w.angle_rad}; }

ElasticModel::ElasticModel(const Scene& s) : s_(s) {
    if (s.wedge) g_.wedge = wedgeInfo(*s.wedge);
    g_.c_l_m_s = s.medium.speed_m_s;
    g_.c_t_m_s = s.medium.shear_speed_m_s.value_or(0.0);
    g_.thickness_m = s.medium.thickness_m.value_or(0.0);
    // dB/cm/MHz (amplitude, one way) -> Np/m at f0.
    alpha_np_per_m_ = s.medium.attenuation_db_per_cm_mhz * (s.array.centre_frequency_hz / 1e6) * 100 / (20 / std::log(10.0));
}

ElasticLeg ElasticModel::leg(const core::Vec3& e, const std::vector<Wave>& legs, double xs, double zs, bool receive) const {
    ElasticLeg out;
    const RayPath r = g_.path(e, legs, xs, zs);
    if (!r.valid || r.legs == 0) return out;
    const double f0 = s_.array.centre_frequency_hz, width = s_.array.element_width_m;
    double a = 1;
    const size_t k = g_.wedge ? 1 : 0;  // first leg in the part
    // Directivity.
    const double th = r.element_angle_rad;
    if (std::fabs(th) >= M_PI / 2) return out;
    if (g_.wedge) {
        a *= stripDirectivity(th, width, r.speed_m_s[0] / f0);
        a *= receive ? solidFluidTransmission(legs[0], r.angle_rad[1], g_.wedge->speed_of_sound_m_s, kWedgeDensityKgM3, g_.c_l_m_s,
                                              g_.c_t_m_s, kPartDensityKgM3)
                     : fluidSolidTransmission(legs[0], r.angle_rad[0], g_.wedge->speed_of_sound_m_s, kWedgeDensityKgM3, g_.c_l_m_s,
                                              g_.c_t_m_s, kPartDensityKgM3);
    } else {
        const double u = M_PI * width * std::sin(th) / (r.speed_m_s[0] / f0);
        a *= (std::fabs(u) < 1e-8 ? 1.0 : std::sin(u) / u);
        a *= g_.c_t_m_s > 0 ? millerPurseyDirectivity(legs[0] == Wave::T, th, g_.c_l_m_s, g_.c_t_m_s) : std::cos(th);
    }
    // Back-wall reflection with mode conversion.
    if (legs.size() == 2) a *= freeSurfaceReflection(legs[0], legs[1], r.angle_rad[k], g_.c_l_m_s, g_.c_t_m_s > 0 ? g_.c_t_m_s : g_.c_l_m_s / 2);
    // Ray-tube spreading (coverage.h), 1 at 10 mm in one medium.
    double dxdp = 0, lc = 0, part = 0;
    for (size_t i = 0; i < r.legs; ++i) {
        const double c = std::cos(r.angle_rad[i]);
        dxdp += r.length_m[i] * r.speed_m_s[i] / (c * c);
        lc += r.length_m[i] * r.speed_m_s[i];
        if (i >= k) part += r.length_m[i];
    }
    const double lambda = r.speed_m_s[r.legs - 1] / f0;
    const double c0 = std::cos(r.angle_rad[0]);
    const double tube = std::max(c0 * c0 / r.speed_m_s[0] * dxdp, lambda / 2);
    constexpr double kRef = 10e-3;
    a *= std::sqrt(kRef / tube);
    if (s_.elastic.spreading_3d) a *= std::sqrt(kRef / std::max(lc / r.speed_m_s[0], lambda / 2));
    a *= std::exp(-alpha_np_per_m_ * part);
    out.valid = true;
    out.delay_s = r.time_s;
    out.amplitude = a;
    out.last_speed_m_s = r.speed_m_s[r.legs - 1];
    // Arriving direction: last leg goes down (direct) or up (from the back wall).
    const auto ef = g_.toSpecimen(e[0], e[2]);
    const double dirx = xs >= ef[0] ? 1.0 : -1.0;
    const double sa = std::sin(r.angle_rad[r.legs - 1]), ca = std::cos(r.angle_rad[r.legs - 1]);
    out.ux = -dirx * sa;
    out.uz = legs.size() == 2 ? ca : -ca;
    return out;
}

}  // namespace umbra::recon::sim
