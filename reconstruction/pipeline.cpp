// SPDX-License-Identifier: MIT
// Stage list, grid resolution, amplitude fidelity and the display chain.
#include "reconstruction/pipeline.h"

#include <algorithm>
#include <cmath>

#include "core/error.h"
#include "reconstruction/analytic_stage.h"
#include "reconstruction/bandpass_stage.h"
#include "reconstruction/colour_map_stage.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/envelope_stage.h"
#include "reconstruction/grid_stage.h"
#include "reconstruction/log_compression_stage.h"
#include "reconstruction/ray_path.h"
#include "reconstruction/view_mode.h"
#include "reconstruction/tgc_stage.h"
#include "reconstruction/wavenumber_stage.h"

namespace umbra::recon {

const std::vector<core::StageSpec>& allStages() {
    static const std::vector<core::StageSpec> stages = {bandpassSpec(),  analyticSpec(),       delayModelSpec(),
                                                        dasSpec(),       wavenumberSpec(),     envelopeSpec(),       tgcSpec(),
                                                        logCompressionSpec(), colourMapSpec(), gridSpec()};
    return stages;
}

core::Recipe defaultRecipe() { return core::Recipe(allStages()); }

size_t Grid::nx() const { return step_m > 0 && x_max_m >= x_min_m ? size_t(std::floor((x_max_m - x_min_m) / step_m + 1e-9)) + 1 : 0; }
size_t Grid::nz() const { return step_m > 0 && z_max_m >= z_min_m ? size_t(std::floor((z_max_m - z_min_m) / step_m + 1e-9)) + 1 : 0; }
std::vector<double> Grid::xAxis() const {
    std::vector<double> v(nx());
    for (size_t i = 0; i < v.size(); ++i) v[i] = x_min_m + double(i) * step_m;
    return v;
}
std::vector<double> Grid::zAxis() const {
    std::vector<double> v(nz());
    for (size_t i = 0; i < v.size(); ++i) v[i] = z_min_m + double(i) * step_m;
    return v;
}

namespace {

struct Extent {
    double x0, x1, z0, z1;
};

// The array's aperture along x and the depth range the recording covers (pulse-echo).
Extent autoExtent(const core::CaptureHeader& h, double c) {
    Extent e{0, 0, 0, 0};
    if (!h.array.element_position_m.empty()) {
        e.x0 = e.x1 = h.array.element_position_m[0][0];
        for (auto& p : h.array.element_position_m) {
            e.x0 = std::min(e.x0, p[0]);
            e.x1 = std::max(e.x1, p[0]);
        }
    }
    if (e.x1 - e.x0 < 1e-6) {  // single element: a square region as wide as a few wavelengths
        const double w = 10 * c / std::max(1.0, h.array.centre_frequency_hz);
        e.x0 -= w;
        e.x1 += w;
    }
    double t0 = 1e300, t1 = -1e300;
    for (double t : h.receive.start_time_s) {
        t0 = std::min(t0, t);
        t1 = std::max(t1, t);
    }
    if (h.receive.start_time_s.empty()) t0 = t1 = 0;
    const double fs = h.receive.sampling_frequency_hz;
    e.z0 = std::max(0.0, t0 * c / 2);
    e.z1 = (t1 + double(h.samples) / (fs > 0 ? fs : 1)) * c / 2;
    // A plate or block of known thickness: from the surface to a margin below the back wall.
    if (h.medium.thickness_m && *h.medium.thickness_m > 0 && std::isfinite(*h.medium.thickness_m)) {
        const double zt = kThicknessMargin * *h.medium.thickness_m;
        e.z0 = 0;
        if (zt < e.z1) e.z1 = zt;
    }
    // Wedge: the specimen frame; from the element feet on the surface along the beam (towards
    // +x_s for a positive tilt) for 2.5 x the depth range (a skip at 55 degrees reaches 2.9 x).
    if (h.medium.wedge) {
        ViewGeometry g;
        g.wedge = h.medium.wedge;
        double f0 = 1e300, f1 = -1e300;
        for (auto& p : h.array.element_position_m) {
            const double f = g.toSpecimen(p[0], p[2])[0];
            f0 = std::min(f0, f);
            f1 = std::max(f1, f);
        }
        if (h.array.element_position_m.empty()) f0 = f1 = 0;
        e.z0 = 0;
        if (h.medium.thickness_m && *h.medium.thickness_m > 0 && std::isfinite(*h.medium.thickness_m))
            e.z1 = std::min(e.z1, kThicknessMargin * *h.medium.thickness_m);
        const double reach = 2.5 * std::min(e.z1, h.medium.thickness_m.value_or(e.z1));
        e.x0 = h.medium.wedge->surface_tilt_rad >= 0 ? f0 : f0 - reach;
        e.x1 = h.medium.wedge->surface_tilt_rad >= 0 ? f1 + reach : f1;
    }
    return e;
}

double arrayLength(const core::CaptureHeader& h) {
    double lo = 0, hi = 0;
    bool first = true;
    for (auto& p : h.array.element_position_m) {
        lo = first ? p[0] : std::min(lo, p[0]);
        hi = first ? p[0] : std::max(hi, p[0]);
        first = false;
    }
    return std::max(hi - lo + h.array.element_width_m, h.array.element_width_m);
}

// f-number of the narrowest point-spread function the recipe can give over depths [z0, z1].
double effectiveFNumber(const core::CaptureHeader& h, const DasParams& das, double z0) {
    const double L = std::max(arrayLength(h), 1e-6);
    const double geometric = std::max(0.5, std::max(z0, 0.0) / L);  // aperture limited by the array
    if (das.aperture == "full") return geometric;
    return std::max(das.f_number, geometric);
}

// Speed that sets the wavelength of the view: the shear speed when a leg is T.
double viewSpeed(const core::CaptureHeader& h, const core::Recipe& r) {
    const double c = resolvedSpeed(h, r);
    const ViewMode m = parseViewMode(r.text("delay_model.mode"));
    if (!m.usesShear()) return c;
    const double ct = viewShearSpeed(h, r.number("delay_model.shear_speed_m_s"));
    return ct > 0 && ct < c ? ct : c;
}

PsfWidths widthsFor(const core::CaptureHeader& h, const core::Recipe& r, double z0) {
    const double c = viewSpeed(h, r);
    const DasParams das = dasParams(r);
    const double B = h.array.fractional_bandwidth > 0 ? h.array.fractional_bandwidth : 0.6;
    return pointSpreadWidths(c, h.array.centre_frequency_hz, B, effectiveFNumber(h, das, z0));
}

}  // namespace

Grid resolveGrid(const core::CaptureHeader& h, const core::Recipe& r) {
    const GridParams g = gridParams(r);
    const double c = resolvedSpeed(h, r);
    dasParams(r);  // validates the f-number
    const Extent a = autoExtent(h, c);
    Grid grid;
    const bool autoX = g.x_min_mm == 0 && g.x_max_mm == 0, autoZ = g.z_min_mm == 0 && g.z_max_mm == 0;
    grid.x_min_m = autoX ? a.x0 : g.x_min_mm * 1e-3;
    grid.x_max_m = autoX ? a.x1 : g.x_max_mm * 1e-3;
    grid.z_min_m = autoZ ? a.z0 : g.z_min_mm * 1e-3;
    grid.z_max_m = autoZ ? a.z1 : g.z_max_mm * 1e-3;
    if (!(grid.x_max_m > grid.x_min_m))
        throw core::SettingError("grid: empty region: x_max (" + std::to_string(grid.x_max_m * 1e3) + " mm) must exceed x_min (" +
                                 std::to_string(grid.x_min_m * 1e3) + " mm)");
    if (!(grid.z_max_m > grid.z_min_m))
        throw core::SettingError("grid: empty region: z_max (" + std::to_string(grid.z_max_m * 1e3) + " mm) must exceed z_min (" +
                                 std::to_string(grid.z_min_m * 1e3) + " mm)");
    if (g.step_mm < 0) throw core::SettingError("grid.step_mm must not be negative (0 = automatic)");
    if (!(g.max_loss_db >= 0.1 && g.max_loss_db <= kFidelityLimitDb))
        throw core::SettingError("grid.max_loss_db = " + std::to_string(g.max_loss_db) + ": the fidelity target must be within 0.1 to 2 dB");
    if (g.step_mm > 0) {
        grid.step_m = g.step_mm * 1e-3;
    } else {
        if (!(h.array.centre_frequency_hz > 0)) throw core::SettingError("grid: automatic step needs the array's centre frequency");
        // The grid's share of the target is what the interpolation leaves of it.
        const double interp = interpolationLossDb(dasParams(r), h.receive.sampling_frequency_hz, h.array.centre_frequency_hz);
        const double s = stepForLossDb(widthsFor(h, r, grid.z_min_m), std::max(g.max_loss_db - interp, 0.05));
        grid.step_m = std::floor(s * 1e6) / 1e6;  // down to whole micrometres: loss stays within the target
        if (grid.step_m <= 0) grid.step_m = s;
    }
    const double px = (std::floor((grid.x_max_m - grid.x_min_m) / grid.step_m) + 1) *
                      (std::floor((grid.z_max_m - grid.z_min_m) / grid.step_m) + 1);
    if (!(px <= double(kMaxGridPixels)))
        throw core::SettingError("grid: " + std::to_string(px / 1e6) + " Mpx exceeds the limit of " +
                                 std::to_string(kMaxGridPixels >> 20) + " Mpx; use a larger step or a smaller region");
    return grid;
}

double amplitudeFidelityDb(const core::CaptureHeader& h, const core::Recipe& r, const Grid& grid) {
    return gaussianHalfPixelLossDb(widthsFor(h, r, grid.z_min_m), grid.step_m) +
           interpolationLossDb(dasParams(r), h.receive.sampling_frequency_hz, h.array.centre_frequency_hz);
}

double Timings::termsPerSecond() const {
    for (auto& [name, s] : stage_seconds)
        if (name == "delay-and-sum" && s > 0) return effective_terms / s;
    return total_seconds > 0 ? effective_terms / total_seconds : 0;
}

// ------------------------------------------------------------------- display chain

TgcInputs resolvedTgcInputs(const core::CaptureHeader& h, const core::Recipe& r) {
    const TgcParams p = tgcParams(r);
    TgcInputs t;
    t.attenuation_from_capture = !(p.attenuation_db_per_cm_mhz > 0);
    t.attenuation_recorded = h.medium.attenuation_db_per_cm_mhz.has_value();
    t.attenuation_db_per_cm_mhz = t.attenuation_from_capture ? h.medium.attenuation_db_per_cm_mhz.value_or(0.0) : p.attenuation_db_per_cm_mhz;
    t.frequency_from_capture = !(p.frequency_mhz > 0);
    t.frequency_mhz = t.frequency_from_capture ? h.array.centre_frequency_hz / 1e6 : p.frequency_mhz;
    return t;
}

std::vector<float> tgcGain(const core::CaptureHeader& h, const core::Recipe& r, const std::vector<double>& z_m) {
    const TgcParams p = tgcParams(r);
    const TgcInputs in = resolvedTgcInputs(h, r);
    auto db = tgcGainDb(p, in.attenuation_db_per_cm_mhz, in.frequency_mhz, z_m);
    std::vector<float> g(db.size());
    for (size_t i = 0; i < db.size(); ++i) g[i] = float(std::pow(10.0, db[i] / 20));
    return g;
}

core::Frame applyTgc(const core::Frame& f, const core::CaptureHeader& h, const core::Recipe& r) {
    core::Frame out = f;
    const auto g = tgcGain(h, r, f.z_m);
    for (size_t iz = 0; iz < f.nz(); ++iz)
        for (size_t ix = 0; ix < f.nx(); ++ix) out.envelope[iz * f.nx() + ix] *= g[iz];
    return out;
}

std::vector<float> logCompress(const core::Frame& f, const core::Recipe& r) { return logCompressValues(f.envelope, logCompressionParams(r)); }

std::vector<uint8_t> colourise(const std::vector<float>& db, const core::Recipe& r) {
    return colouriseValues(db, r.number("log_compression.dynamic_range_db"), colourMapParams(r));
}

}  // namespace umbra::recon
