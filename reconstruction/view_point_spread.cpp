// SPDX-License-Identifier: MIT
#include "reconstruction/view_point_spread.h"

#include <algorithm>
#include <cmath>

#include "core/error.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/point_spread.h"

namespace umbra::recon {

namespace {

// Unit vector (x_s, z_s) from the pixel back along the last leg of path r from element foot x
// `foot` to pixel x `xs`: the reverse of the leg's travel direction (down for a direct leg,
// up for the leg from the back wall).
std::array<double, 2> towardSource(const RayPath& r, double foot, double xs, bool skip) {
    const double a = r.angle_rad[r.legs - 1];
    const double dirx = xs > foot ? 1.0 : xs < foot ? -1.0 : 0.0;
    const double dx = dirx * std::sin(a), dz = (skip ? -1.0 : 1.0) * std::cos(a);
    return {-dx, -dz};
}

}  // namespace

ViewPointSpread::Widths ViewPointSpread::at(double x, double z) const {
    Widths out;
    // Aperture ends (array-frame x) from the non-excluded elements.
    double lo = 1e300, hi = -1e300, ez = 0;
    bool any = false;
    for (size_t i = 0; i < elements.size(); ++i) {
        if (i < excluded.size() && excluded[i]) continue;
        if (!any) ez = elements[i][2];
        any = true;
        lo = std::min(lo, elements[i][0]);
        hi = std::max(hi, elements[i][0]);
    }
    if (!any || !(f0_hz > 0) || !(fractional_bandwidth > 0)) return out;
    const double p = std::max(pitch_m, 1e-9);
    double a = lo - p / 2, b = hi + p / 2;
    if (!full_aperture) {
        const double half = std::max(z, 0.0) / (2 * f_number);
        a = std::max(x - half, lo);
        b = std::min(x + half, hi);
        if (b - a < p) {
            const double mid = std::clamp(0.5 * (a + b), lo, hi);
            a = mid - p / 2;
            b = mid + p / 2;
        }
    }
    const core::Vec3 ends[2] = {{a, 0, ez}, {b, 0, ez}};

    // Quadratic form A (x, z) of the Gaussian image exp(−δᵀAδ).
    double A[2][2] = {{0, 0}, {0, 0}};
    auto add = [&](double coef, double nx, double nz) {
        A[0][0] += coef * nx * nx;
        A[0][1] += coef * nx * nz;
        A[1][1] += coef * nz * nz;
    };
    const double ln2 = std::log(2.0);
    double gx = 0, gz = 0, slow_sum = 0;
    for (int side = 0; side < 2; ++side) {
        const std::vector<Wave>& legs = side == 0 ? mode.tx : mode.rx;
        std::array<double, 2> u[2];
        for (int k = 0; k < 2; ++k) {
            const RayPath r = geometry.path(ends[k], legs, x, z);
            if (!r.valid || r.legs == 0) return out;
            const double foot = geometry.toSpecimen(ends[k][0], ends[k][2])[0];
            u[k] = towardSource(r, foot, x, legs.size() == 2);
        }
        const double c = geometry.speed(legs.back());
        if (!(c > 0)) return out;
        const double lambda = c / f0_hz;
        const double span = std::acos(std::clamp(u[0][0] * u[1][0] + u[0][1] * u[1][1], -1.0, 1.0));
        double mx = u[0][0] + u[1][0], mz = u[0][1] + u[1][1];
        const double mn = std::hypot(mx, mz);
        if (!(mn > 1e-12)) return out;
        mx /= mn;
        mz /= mn;
        // One-way −3 dB half width K λ / (4 sin(Δθ/2)); Gaussian exp(−a d²) = 1/√2 there.
        const double h = width_factor * lambda / (4 * std::max(std::sin(span / 2), 1e-3));
        add(ln2 / (2 * h * h), mz, -mx);
        gx += mx / c;
        gz += mz / c;
        slow_sum += 1 / c;
        (side == 0 ? out.span_tx_rad : out.span_rx_rad) = span;
    }
    // Pulse along g: −6 dB duration T over |g| (floored at a quarter of the aligned value, for
    // views whose two legs arrive from opposite sides).
    const double T = 4 * ln2 / (M_PI * fractional_bandwidth * f0_hz);
    double gn = std::hypot(gx, gz);
    const double mx = gn > 0 ? gx / gn : 0, mz = gn > 0 ? gz / gn : 1;
    gn = std::max(gn, 0.25 * slow_sum);
    const double hp = T / (2 * gn);
    add(ln2 / (hp * hp), mx, mz);
    const double det = A[0][0] * A[1][1] - A[0][1] * A[0][1];
    if (!(det > 0)) return out;
    const double ixx = A[1][1] / det, izz = A[0][0] / det, ixz = -A[0][1] / det;
    out.x_m = 2 * std::sqrt(ln2 * ixx);
    out.z_m = 2 * std::sqrt(ln2 * izz);
    out.along_m = 2 * std::sqrt(ln2 * (mx * mx * ixx + 2 * mx * mz * ixz + mz * mz * izz));
    out.across_m = 2 * std::sqrt(ln2 * (mz * mz * ixx - 2 * mx * mz * ixz + mx * mx * izz));
    out.ray_angle_rad = std::atan2(-mx, -mz);
    out.valid = std::isfinite(out.x_m) && std::isfinite(out.z_m);
    return out;
}

ViewPointSpread viewPointSpread(const core::Recipe& recipe, const core::CaptureHeader& h) {
    const DelayModelParams dm = delayModelParams(recipe);
    const DasParams d = dasParams(recipe);
    ViewPointSpread m;
    m.mode = parseViewMode(dm.mode);
    checkViewMode(h, m.mode, dm.shear_speed_m_s);
    m.geometry = ViewGeometry::fromHeader(h, resolvedSpeed(h, recipe), dm.shear_speed_m_s);
    m.elements = h.array.element_position_m;
    m.excluded.assign(m.elements.size(), 0);
    for (int e : d.excluded_elements)
        if (e >= 0 && size_t(e) < m.excluded.size()) m.excluded[size_t(e)] = 1;
    m.pitch_m = h.array.pitch_m() > 0 ? h.array.pitch_m() : h.array.element_width_m;
    m.full_aperture = d.aperture == "full" || h.medium.wedge.has_value();
    m.f_number = d.f_number;
    m.width_factor = lateralWidthFactor(d.apodization, d.tukey_alpha);
    m.f0_hz = h.array.centre_frequency_hz;
    m.fractional_bandwidth = h.array.fractional_bandwidth;
    return m;
}

std::optional<ViewPointSpread> viewPointSpread(const core::Recipe& recipe, const core::AcquisitionFacts& acq) {
    if (!acq.centre_frequency_hz || !acq.fractional_bandwidth || !acq.speed_of_sound_m_s || !acq.array_x_min_m ||
        !acq.array_x_max_m || !acq.array_pitch_m)
        return std::nullopt;
    const double lo = *acq.array_x_min_m, hi = *acq.array_x_max_m, pitch = *acq.array_pitch_m;
    if (!(pitch > 0) || !(hi >= lo)) return std::nullopt;
    const double count = std::round((hi - lo) / pitch) + 1;
    if (!(count >= 1 && count <= double(core::CaptureLimits::max_elements))) return std::nullopt;
    core::CaptureHeader h;
    const size_t n = size_t(count);
    for (size_t i = 0; i < n; ++i) h.array.element_position_m.push_back({n > 1 ? lo + (hi - lo) * double(i) / double(n - 1) : lo, 0, 0});
    h.array.element_width_m = pitch;
    h.array.centre_frequency_hz = *acq.centre_frequency_hz;
    h.array.fractional_bandwidth = *acq.fractional_bandwidth;
    h.medium.speed_of_sound_m_s = *acq.speed_of_sound_m_s;
    h.medium.shear_speed_m_s = acq.shear_speed_m_s;
    h.medium.thickness_m = acq.thickness_m;
    if (acq.wedge) {
        if (!acq.wedge_speed_m_s || !acq.wedge_origin_x_m || !acq.wedge_origin_z_m || !acq.wedge_tilt_rad) return std::nullopt;
        h.medium.wedge = core::WedgeInfo{*acq.wedge_speed_m_s, {*acq.wedge_origin_x_m, 0, *acq.wedge_origin_z_m}, *acq.wedge_tilt_rad};
    }
    h.transmit.kind = core::TransmitKind::SingleElement;
    for (size_t i = 0; i < n; ++i) {
        h.transmit.source_element.push_back(int32_t(i));
        h.receive.element_index.push_back(int32_t(i));
    }
    try {
        return viewPointSpread(recipe, h);
    } catch (const core::SettingError&) {
        return std::nullopt;
    }
}

}  // namespace umbra::recon
