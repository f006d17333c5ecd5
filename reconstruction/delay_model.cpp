// SPDX-License-Identifier: MIT
#include "reconstruction/delay_model.h"

#include <cmath>
#include <string>

#include "core/error.h"
#include "reconstruction/detail/spec_helpers.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/view_delay_model.h"
#include "reconstruction/view_mode.h"

namespace umbra::recon {

core::StageSpec delayModelSpec() {
    using namespace detail;
    return {"delay_model",
            "Delay model",
            "Travel times from the array to each pixel (homogeneous medium, or least-time paths through the wedge and off the back wall).",
            {choiceParam("model", "Medium model", "Travel-time model: homogeneous medium at one speed of sound.", {"homogeneous"},
                         "homogeneous"),
             choiceParam("mode", "View",
                         "Wave types of the transmit and receive paths in the part (before and after the dash; L longitudinal, T "
                         "shear; two letters: via the back wall).",
                         viewModeNames(), "L-L"),
             modalRealParam("speed_of_sound_m_s", "Speed of sound",
                            "Speed of sound in the imaged medium, m/s; 0 = the capture's medium speed.", "m/s", 0, 20000, "from capture",
                            10),
             modalRealParam("shear_speed_m_s", "Shear speed",
                            "Shear-wave speed in the part for T legs, m/s; 0 = the capture's medium shear speed.", "m/s", 0, 20000,
                            "from capture", 10),
             realParam("fixed_delay_us", "Fixed delay",
                       "Delay present in every trace beyond the modelled paths (wedge or delay-line error, system delay), "
                       "removed before imaging, µs; found by umbra-cli calibrate (--reflector-mm, or --thickness-mm with --speed).",
                       "µs", -100, 100, 0, false, 0.001)}};
}

DelayModelParams delayModelParams(const core::Recipe& r) {
    DelayModelParams p;
    p.speed_of_sound_m_s = r.number("delay_model.speed_of_sound_m_s");
    p.model = r.text("delay_model.model");
    p.mode = r.text("delay_model.mode");
    p.shear_speed_m_s = r.number("delay_model.shear_speed_m_s");
    p.fixed_delay_us = r.number("delay_model.fixed_delay_us");
    return p;
}

HomogeneousDelayModel::HomogeneousDelayModel(double c) : c_(c) {
    if (!(c > 0) || !std::isfinite(c)) throw core::SettingError("delay model: speed of sound must be positive, got " + std::to_string(c));
}

namespace {
// Wider vector units where the CPU has them (chosen at load time); same arithmetic on every path.
#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__)
__attribute__((target_clones("avx512f", "avx2", "default")))
#endif
void distanceTimes(float fx, float fy2, float fz, float inv, const float* __restrict x, const float* __restrict z, size_t n,
                   float* __restrict t) {
    for (size_t i = 0; i < n; ++i) {
        const float dx = x[i] - fx, dz = z[i] - fz;
        t[i] = std::sqrt(dx * dx + dz * dz + fy2) * inv;
    }
}
}  // namespace

void HomogeneousDelayModel::pointTime(const core::Vec3& from, const float* x, const float* z, size_t n, float* t) const {
    const float fy = float(from[1]);
    distanceTimes(float(from[0]), fy * fy, float(from[2]), float(1.0 / c_), x, z, n, t);
}

void HomogeneousDelayModel::planeWaveTime(double a, const float* x, const float* z, size_t n, float* t) const {
    const float ca = float(std::cos(a) / c_), sa = float(std::sin(a) / c_);
    for (size_t i = 0; i < n; ++i) t[i] = z[i] * ca + x[i] * sa;
}

void HomogeneousDelayModel::virtualSourceTime(const core::Vec3& v, const float* x, const float* z, size_t n, float* t) const {
    const double vr = std::sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
    pointTime(v, x, z, n, t);
    const float base = float(vr / c_);
    if (v[2] <= 0) {
        for (size_t i = 0; i < n; ++i) t[i] = t[i] - base;
    } else {
        const float zv = float(v[2]);
        for (size_t i = 0; i < n; ++i) t[i] = z[i] >= zv ? base + t[i] : base - t[i];
    }
}

double resolvedSpeed(const core::CaptureHeader& h, const core::Recipe& r) {
    double c = r.number("delay_model.speed_of_sound_m_s");
    if (c < 0) throw core::SettingError("delay_model.speed_of_sound_m_s = " + std::to_string(c) + " m/s: a speed of sound cannot be negative");
    if (c == 0) c = h.medium.speed_of_sound_m_s;
    if (!(c >= 100 && c <= 20000))
        throw core::SettingError("delay_model.speed_of_sound_m_s: speed of sound " + std::to_string(c) +
                                 " m/s is outside [100, 20000] m/s (0 = from the capture)");
    return c;
}

bool usesHomogeneousModel(const core::CaptureHeader& h, const core::Recipe& r) {
    return !h.medium.wedge && parseViewMode(r.text("delay_model.mode")).name == "L-L";
}

std::unique_ptr<DelayModel> makeDelayModel(const core::CaptureHeader& h, const core::Recipe& r, const Grid* grid, int threads) {
    const double c = resolvedSpeed(h, r);
    const DelayModelParams p = delayModelParams(r);
    const ViewMode mode = parseViewMode(p.mode);
    if (p.shear_speed_m_s < 0) throw core::SettingError("delay_model.shear_speed_m_s must not be negative (0 = from the capture)");
    checkViewMode(h, mode, p.shear_speed_m_s);
    if (usesHomogeneousModel(h, r)) return std::make_unique<HomogeneousDelayModel>(c);
    ViewGeometry g = ViewGeometry::fromHeader(h, c, p.shear_speed_m_s);
    if (!grid) throw core::SettingError("delay model: the " + mode.name + " view needs the image grid for its travel-time tables");
    if (mode.usesBackWall() && !(grid->z_min_m <= g.thickness_m && grid->z_max_m >= 0))
        throw core::SettingError("delay_model.mode = " + mode.name + ": no path: the image region (" + std::to_string(grid->z_min_m * 1e3) +
                                 " to " + std::to_string(grid->z_max_m * 1e3) + " mm deep) lies outside the part (0 to " +
                                 std::to_string(g.thickness_m * 1e3) + " mm)");
    if (g.wedge && grid->z_max_m < 0)
        throw core::SettingError("delay_model.mode = " + mode.name + ": no path: the image region lies above the part surface (z < 0)");
    return std::make_unique<ViewDelayModel>(h, std::move(g), mode, *grid, threads);
}

}  // namespace umbra::recon
