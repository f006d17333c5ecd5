// SPDX-License-Identifier: MIT
#include "reconstruction/ray_path.h"

#include <algorithm>
#include <cmath>
#include <string>

#include "core/error.h"

namespace umbra::recon {

namespace {
void checkSpeed(const char* what, double c) {
    if (!(c >= 100 && c <= 20000))
        throw core::SettingError(std::string(what) + " " + std::to_string(c) + " m/s is outside the physical range [100, 20000] m/s");
}
}  // namespace

ViewGeometry ViewGeometry::fromHeader(const core::CaptureHeader& h, double c_l_override, double c_t_override) {
    ViewGeometry g;
    g.c_l_m_s = c_l_override > 0 ? c_l_override : h.medium.speed_of_sound_m_s;
    checkSpeed("speed of sound (/medium@speed_of_sound_m_s or delay_model.speed_of_sound_m_s)", g.c_l_m_s);
    g.c_t_m_s = c_t_override > 0 ? c_t_override : h.medium.shear_speed_m_s.value_or(0.0);
    if (g.c_t_m_s != 0) {
        checkSpeed("shear speed (/medium@shear_speed_m_s or delay_model.shear_speed_m_s)", g.c_t_m_s);
        if (g.c_t_m_s >= g.c_l_m_s)
            throw core::SettingError("shear speed " + std::to_string(g.c_t_m_s) + " m/s is not below the longitudinal speed " +
                                     std::to_string(g.c_l_m_s) + " m/s (a solid's shear waves are slower)");
    }
    if (h.medium.thickness_m && *h.medium.thickness_m > 0) g.thickness_m = *h.medium.thickness_m;
    if (h.medium.wedge) {
        const auto& w = *h.medium.wedge;
        checkSpeed("wedge speed (/medium/wedge@speed_of_sound_m_s)", w.speed_of_sound_m_s);
        if (!(std::fabs(w.surface_tilt_rad) < M_PI / 2))
            throw core::SettingError("wedge tilt (/medium/wedge@surface_tilt_rad) " + std::to_string(w.surface_tilt_rad * 180 / M_PI) +
                                     " deg: the part surface must be tilted less than 90 deg from the array face");
        for (double v : w.surface_origin_m)
            if (!std::isfinite(v)) throw core::SettingError("wedge surface origin (/medium/wedge@surface_origin_m) is not finite");
        g.wedge = w;
        for (size_t i = 0; i < h.array.element_position_m.size(); ++i) {
            const auto& e = h.array.element_position_m[i];
            const auto s = g.toSpecimen(e[0], e[2]);
            if (!(s[1] < 0))
                throw core::SettingError("wedge geometry (/medium/wedge): element " + std::to_string(i) + " lies " +
                                         std::to_string(s[1] * 1e3) +
                                         " mm below the part surface; the array must sit above the part (check surface_origin_m and "
                                         "surface_tilt_rad)");
        }
    }
    return g;
}

std::array<double, 2> ViewGeometry::toArray(double xs, double zs) const {
    if (!wedge) return {xs, zs};
    const double c = std::cos(wedge->surface_tilt_rad), s = std::sin(wedge->surface_tilt_rad);
    return {wedge->surface_origin_m[0] + xs * c - zs * s, wedge->surface_origin_m[2] + xs * s + zs * c};
}

std::array<double, 2> ViewGeometry::toSpecimen(double x, double z) const {
    if (!wedge) return {x, z};
    const double c = std::cos(wedge->surface_tilt_rad), s = std::sin(wedge->surface_tilt_rad);
    const double dx = x - wedge->surface_origin_m[0], dz = z - wedge->surface_origin_m[2];
    return {dx * c + dz * s, -dx * s + dz * c};
}

RayPath ViewGeometry::path(const core::Vec3& e, const std::vector<Wave>& waves, double xs, double zs, double p_guess) const {
    RayPath r;
    if (waves.empty() || waves.size() > 2) return r;
    // Element foot on the surface, its height above it, and the legs (height, speed).
    const auto ef = toSpecimen(e[0], e[2]);
    const double foot = ef[0], y = e[1];
    double z0 = 0;  // depth where the specimen legs start
    std::array<double, 3> hh{}, cc{};
    size_t n = 0;
    if (wedge) {
        hh[n] = -ef[1];
        cc[n++] = wedge->speed_of_sound_m_s;
        if (zs < 0) return r;  // pixel inside the wedge: no specimen path
    } else {
        z0 = ef[1];
    }
    for (auto w : waves)
        if (!(speed(w) > 0)) return r;
    if (waves.size() == 1) {
        hh[n] = std::fabs(zs - z0);
        cc[n++] = speed(waves[0]);
    } else {
        if (!(thickness_m > 0) || zs > thickness_m || z0 > thickness_m) return r;
        hh[n] = thickness_m - z0;
        cc[n++] = speed(waves[0]);
        hh[n] = thickness_m - zs;
        cc[n++] = speed(waves[1]);
    }
    const double dxh = xs - foot;
    const double R = std::hypot(dxh, y);
    double cmax = 0, H = 0;
    for (size_t i = 0; i < n; ++i)
        if (hh[i] > 0) {
            cmax = std::max(cmax, cc[i]);
            H += hh[i];
        }
    double p = 0;
    if (R > 0 && cmax > 0) {
        const double pmax = 1 / cmax;
        auto X = [&](double q, double& dX) {
            double x = 0;
            dX = 0;
            for (size_t i = 0; i < n; ++i) {
                if (!(hh[i] > 0)) continue;
                const double s = q * cc[i];
                const double k = std::sqrt((1 - s) * (1 + s));
                x += hh[i] * s / k;
                dX += hh[i] * cc[i] / (k * k * k);
            }
            return x;
        };
        double lo = 0, hi = pmax;
        p = p_guess > 0 && p_guess < pmax ? p_guess : pmax * R / std::hypot(R, H);
        const double tol = 1e-12 + 1e-12 * R;
        for (int it = 0; it < 200; ++it) {
            double d;
            const double f = X(p, d) - R;
            if (std::fabs(f) <= tol) break;
            if (f > 0) hi = p;
            else lo = p;
            double pn = p - f / d;
            if (!(pn > lo && pn < hi)) pn = 0.5 * (lo + hi);
            if (pn == p || hi - lo <= pmax * 1e-16) break;
            p = pn;
        }
    }
    double t = p * R;
    for (size_t i = 0; i < n; ++i) {
        const double s = std::min(p * cc[i], 1.0);
        const double k = std::sqrt((1 - s) * (1 + s));
        t += hh[i] * k / cc[i];
        r.angle_rad[i] = std::asin(s);
        r.length_m[i] = k > 0 ? hh[i] / k : 0;
        r.speed_m_s[i] = cc[i];
    }
    if (cmax == 0) t = R / cc[n - 1];  // every leg flat (point on the surface of a contact capture)
    r.valid = std::isfinite(t);
    r.time_s = t;
    r.p_s_per_m = p;
    r.legs = n;
    const double dirx = R > 0 ? dxh / R : 0;  // horizontal direction (x component)
    const size_t first_spec = wedge ? 1 : 0;
    r.entry_x_s = foot + (wedge ? dirx * hh[0] * std::tan(r.angle_rad[0]) : 0);
    if (waves.size() == 2) r.bounce_x_s = r.entry_x_s + dirx * hh[first_spec] * std::tan(r.angle_rad[first_spec]);
    // First leg direction in the specimen frame: (dirx sin a, cos a) along (u, n); to the array frame.
    const double sa = std::sin(r.angle_rad[0]) * dirx, ca = std::cos(r.angle_rad[0]);
    const double tilt = wedge ? wedge->surface_tilt_rad : 0;
    const double ax = sa * std::cos(tilt) - ca * std::sin(tilt), az = sa * std::sin(tilt) + ca * std::cos(tilt);
    r.element_angle_rad = std::atan2(ax, az);
    return r;
}

}  // namespace umbra::recon
