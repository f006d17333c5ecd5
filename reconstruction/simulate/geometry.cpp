// SPDX-License-Identifier: MIT
#include "reconstruction/simulate/geometry.h"

#include <algorithm>
#include <cmath>

#include "reconstruction/simulate/attenuation.h"
#include "reconstruction/simulate/directivity.h"

namespace umbra::recon::sim {

PathModel::PathModel(const Scene& s) : s_(s), ex_(s.array.elementX()) {
    c_ = s.medium.speed_m_s;
    lambda_ = c_ / s.array.centre_frequency_hz;
    width_ = s.array.element_width_m;
    alpha_np_ = attenuationNpPerM(s.medium.attenuation_db_per_cm_mhz, s.array.centre_frequency_hz);
    x_lo_ = ex_.front() - s.array.pitch_m / 2;
    x_hi_ = ex_.back() + s.array.pitch_m / 2;
}

double PathModel::spreading(double r) const { return std::sqrt(kReferenceRange_m / std::max(r, lambda_ / 2)); }
double PathModel::atten(double path) const { return alpha_np_ > 0 ? std::exp(-alpha_np_ * path) : 1.0; }

double PathModel::apertureWeight(double xs) const {
    auto phi = [](double u) { return 0.5 * std::erfc(-u / std::sqrt(2.0)); };
    return phi((xs - x_lo_) / lambda_) * phi((x_hi_ - xs) / lambda_);
}

int PathModel::sourceElement(size_t t) const {
    return s_.transmit.source_elements.empty() ? int(t) : s_.transmit.source_elements[t];
}

double PathModel::transmitPath(size_t t, double x, double z) const {
    switch (s_.transmit.kind) {
        case core::TransmitKind::SingleElement: return std::hypot(x - ex_[size_t(sourceElement(t))], z);
        case core::TransmitKind::PlaneWave: {
            const double a = s_.transmit.angles_rad[t];
            return z * std::cos(a) + x * std::sin(a);
        }
        case core::TransmitKind::VirtualSource: {
            const auto& v = s_.transmit.virtual_sources_m[t];
            const double rv = std::hypot(x - v[0], z - v[2]), v0 = std::hypot(v[0], v[2]);
            if (v[2] < 0) return rv - v0;
            return z < v[2] ? v0 - rv : v0 + rv;
        }
    }
    return 0;
}

void PathModel::incomingDirection(size_t t, double x, double z, double& ux, double& uz) const {
    double dx = 0, dz = -1;
    switch (s_.transmit.kind) {
        case core::TransmitKind::SingleElement: dx = ex_[size_t(sourceElement(t))] - x; dz = -z; break;
        case core::TransmitKind::PlaneWave: dx = -std::sin(s_.transmit.angles_rad[t]); dz = -std::cos(s_.transmit.angles_rad[t]); break;
        case core::TransmitKind::VirtualSource: {
            const auto& v = s_.transmit.virtual_sources_m[t];
            dx = v[0] - x;
            dz = v[2] - z;
            // Converging, before the focus: the wave travels towards v, so it arrives from the far side.
            if (v[2] > 0 && z < v[2]) { dx = -dx; dz = -dz; }
            break;
        }
    }
    const double n = std::hypot(dx, dz);
    ux = dx / n;
    uz = dz / n;
}

Leg PathModel::transmit(size_t t, double x, double z) const {
    Leg l;
    switch (s_.transmit.kind) {
        case core::TransmitKind::SingleElement: {
            const double dx = x - ex_[size_t(sourceElement(t))];
            const double r = std::hypot(dx, z);
            l.delay_s = r / c_;
            l.amplitude = stripDirectivity(dx, z, r, width_, lambda_) * spreading(r) * atten(r);
            break;
        }
        case core::TransmitKind::PlaneWave: {
            const double a = s_.transmit.angles_rad[t], ca = std::cos(a), sa = std::sin(a);
            l.delay_s = (z * ca + x * sa) / c_;
            const double xs = x - z * sa / ca;  // where the ray through (x, z) left the array line
            l.amplitude = stripDirectivity(a, width_, lambda_) * apertureWeight(xs) * atten(z / ca);
            break;
        }
        case core::TransmitKind::VirtualSource: {
            const auto& v = s_.transmit.virtual_sources_m[t];
            const double rv = std::hypot(x - v[0], z - v[2]), v0 = std::hypot(v[0], v[2]);
            l.delay_s = transmitPath(t, x, z) / c_;
            const double xs = v[0] + (x - v[0]) * (0 - v[2]) / (z - v[2] == 0 ? 1e-12 : z - v[2]);
            const double travelled = v[2] < 0 ? rv - v0 : (z < v[2] ? v0 - rv : v0 + rv);
            // Diverging: cylindrical spreading from the virtual source, unit amplitude at the origin.
            // Converging: unit amplitude (focal gain not modelled).
            const double spread = v[2] < 0 ? std::sqrt(v0 / std::max(rv, lambda_ / 2)) : 1.0;
            l.amplitude = spread * apertureWeight(xs) * atten(std::max(0.0, travelled));
            break;
        }
    }
    return l;
}

Leg PathModel::receive(int e, double x, double z) const {
    const double dx = x - ex_[size_t(e)];
    const double r = std::hypot(dx, z);
    return {r / c_, stripDirectivity(dx, z, r, width_, lambda_) * spreading(r) * atten(r)};
}

Leg PathModel::backWall(size_t t, int e, double T, int repeat) const {
    const double xr = ex_[size_t(e)];
    const double depth2 = 2.0 * T * (repeat + 1);  // image plane depth for the receiver
    Leg l;
    switch (s_.transmit.kind) {
        case core::TransmitKind::SingleElement: {
            const double dx = xr - ex_[size_t(sourceElement(t))];
            const double L = std::hypot(dx, depth2);
            const double d = stripDirectivity(dx, depth2, L, width_, lambda_);
            l.delay_s = L / c_;
            l.amplitude = d * d * spreading(L) * atten(L);
            break;
        }
        case core::TransmitKind::PlaneWave: {
            const double a = s_.transmit.angles_rad[t], ca = std::cos(a), sa = std::sin(a);
            l.delay_s = (depth2 * ca + xr * sa) / c_;
            const double d = stripDirectivity(a, width_, lambda_);
            l.amplitude = d * d * apertureWeight(xr - depth2 * sa / ca) * atten(depth2 / ca);
            break;
        }
        case core::TransmitKind::VirtualSource: {
            const auto& v = s_.transmit.virtual_sources_m[t];
            // Mirror image of the source across z = T (and, for the repeat, across z = 0 and z = T again).
            const double vz = repeat == 0 ? 2 * T - v[2] : 4 * T - v[2];
            const double dx = xr - v[0], dz = vz;  // the receiver is on z = 0
            const double L = std::hypot(dx, dz), v0 = std::hypot(v[0], v[2]);
            double travelled;
            if (v[2] < 0) travelled = L - v0;            // diverging
            else travelled = dz > 0 ? v0 + L : v0 - L;   // converging: through the (image) focus or not yet
            l.delay_s = travelled / c_;
            const double spread = v[2] < 0 ? std::sqrt(v0 / std::max(L, lambda_ / 2)) : 1.0;
            // Where the ray reaching this receiver crossed the array line on its way out.
            const double xl = v[0] + dx * std::abs(v[2]) / std::max(std::abs(dz), 1e-12);
            l.amplitude = spread * stripDirectivity(dx, std::abs(dz), L, width_, lambda_) * apertureWeight(xl) *
                          atten(std::max(0.0, travelled));
            break;
        }
    }
    return l;
}

void PathModel::specularPointOnCircle(size_t t, int e, double cx, double cz, double a, double& px, double& pz) const {
    const double xr = ex_[size_t(e)];
    auto f = [&](double phi) {
        const double x = cx + a * std::cos(phi), z = cz + a * std::sin(phi);
        return transmitPath(t, x, z) + std::hypot(x - xr, z);
    };
    // Start on the bisector of the directions towards the source and the receiver.
    double ux, uz;
    incomingDirection(t, cx, cz, ux, uz);
    double rx = xr - cx, rz = -cz;
    const double rn = std::hypot(rx, rz);
    rx /= rn; rz /= rn;
    double bx = ux + rx, bz = uz + rz;
    if (std::hypot(bx, bz) < 1e-9) { bx = 0; bz = -1; }
    double phi = std::atan2(bz, bx);
    const double h = 1e-4;
    for (int it = 0; it < 6; ++it) {
        const double fp = f(phi + h), f0 = f(phi), fm = f(phi - h);
        const double d1 = (fp - fm) / (2 * h), d2 = (fp - 2 * f0 + fm) / (h * h);
        if (!(d2 > 0)) break;
        const double step = std::clamp(d1 / d2, -0.3, 0.3);
        phi -= step;
        if (std::abs(step) < 1e-9) break;
    }
    px = cx + a * std::cos(phi);
    pz = cz + a * std::sin(phi);
}

}  // namespace umbra::recon::sim
