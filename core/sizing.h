// SPDX-License-Identifier: MIT
#pragma once
// Sizing suite on a B-scan (linear envelope, row-major [z][x]) and along the scan axis of an
// encoded scan. Every result carries an uncertainty budget per value (core/uncertainty.h), a
// resolution-limited flag and plain-text warnings. No Qt.
//
// Tools (SizingTool):
//  * drop6 / drop20: −6 dB / −20 dB drop from the box's peak (edges at 0.5× / 0.1× the peak,
//    common practice), along the row and the column through the peak (dropSize). The −20 dB
//    extent of an extended reflector includes beam spread: each edge lies beyond the true edge
//    by erfc⁻¹(2r)·W/(2√ln2) for a Gaussian point-spread of −6 dB width W; that bias is removed
//    (GUM 3.2.4: correct recognised systematic effects) and half of it kept as an uncertainty.
//  * tips: tip-diffraction sizing (common practice): the two strongest separated peaks above
//    −20 dB in the box are taken as the tip echoes; height = their depth difference. Works on
//    envelope images whatever the tips' phase.
//  * peak: the box's brightest pixel (x, depth, level in dB re the frame's peak).
// Separated peaks: local maxima (8-neighbour) above the level, strongest first, each kept when
// the amplitude along the straight line to every stronger kept peak dips below half the weaker
// one (a −6 dB dip). A drop box with two or more separated peaks above its drop level warns and
// offers tip sizing.
// Resolution rule: an extent no larger than kResolutionLimitFactor (1.2) × the point-spread
// width at the same level at that place (W_r = W·√(ln(1/r)/ln 2), Gaussian model) is
// resolution-limited: the value is reported as an upper bound (the true size may be smaller).
// Budget components (standard uncertainties, see docs/findings.md "Sizing and uncertainty"):
//  * resolution (edge placement): rectangular ±W/4 per edge, W the −6 dB point-spread width there;
//  * tip echo position (tips tool): rectangular ±W/4 per tip, for the displacement of tip echoes
//    by interference with the flaw face and the other tip;
//  * grid step: rectangular over one pixel, step/√12 per edge or per peak position;
//  * noise: edge shift noise/slope with the Gaussian edge slope 2 ln2·peak/W at half height; peak
//    position σ·noise/peak (σ = W/(2√(2 ln 2))); noise = the frame's median envelope;
//  * speed of sound: depth and height scale with c, relative standard uncertainty `speed_rel`.
#include <cstddef>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "core/drop_sizing.h"
#include "core/frame.h"
#include "core/uncertainty.h"

namespace umbra::core {

/// Amplitude ratio of the −20 dB drop: 0.1.
inline constexpr double kTwentyDbDropRatio = 0.1;
/// An extent within this factor of the point-spread width at its level is resolution-limited.
inline constexpr double kResolutionLimitFactor = 1.2;

/// −6 dB full widths of the point-spread function at a place, mm (0 = unknown).
struct LocalResolution {
    double lateral_mm = 0, axial_mm = 0;
};
/// Point-spread widths at (x, depth) in mm.
using ResolutionAt = std::function<LocalResolution(double x_mm, double z_mm)>;

struct SizingContext {
    ResolutionAt resolution;        ///< empty: widths unknown (a warning; no resolution component)
    double speed_rel = 0.01;        ///< relative standard uncertainty of the speed of sound
    std::string speed_basis = "";   ///< where speed_rel comes from (shown in the budget)
    double surface_z_mm = 0;        ///< depth reference, mm
    double frame_peak = 0;          ///< largest amplitude of the frame (peak dB reference); 0: the box's peak
    double noise_level = 0;         ///< background envelope (same unit as the image); 0: none
    std::vector<std::string> notes; ///< warnings to pass through (e.g. fallbacks of the model)
};

enum class SizingTool { Drop6, Drop20, Tips, Peak };
/// "drop6", "drop20", "tips", "peak".
std::string toolName(SizingTool t);
std::optional<SizingTool> toolFromName(const std::string& name);

struct ImagePeak {
    size_t ix = 0, iz = 0;
    double x_mm = 0, z_mm = 0;
    double value = 0;
};

/// Separated local maxima inside the box (opposite corners a, b, mm) above level_ratio × the
/// box's peak, strongest first (see the header comment for "separated").
std::vector<ImagePeak> separatedPeaks(const std::vector<float>& amplitude, const std::vector<double>& x_mm,
                                      const std::vector<double>& z_mm, PointMm a, PointMm b, double level_ratio);

struct SizingResult {
    SizingTool tool = SizingTool::Drop6;
    bool found = false;
    ImagePeak peak;                     ///< brightest pixel in the box
    double peak_db = 0;                 ///< 20 log10(peak / frame peak), dB
    std::optional<MeasuredValue> x, depth, length, height;  ///< mm; depth below the surface
    DropSizing drop;                    ///< edges of the drop tools
    std::vector<PointMm> tips;          ///< tips tool: the two tips, upper first
    std::vector<ImagePeak> peaks;       ///< separated peaks found (drop level, or −20 dB for tips)
    bool resolution_limited = false;
    bool offer_tips = false;            ///< a drop box holds two or more separated peaks
    LocalResolution resolution;         ///< point-spread widths at the peak, mm
    std::vector<std::string> warnings;
    /// The present values in the order x, depth, length, height.
    std::vector<MeasuredValue> values() const;
};

/// Runs `tool` in the box with opposite corners a, b (mm, any order) on one frame.
/// Throws SettingError for a non-finite box or mismatched sizes; a box holding no pixel gives
/// found == false with a warning.
SizingResult measureInBox(SizingTool tool, const std::vector<float>& amplitude, const std::vector<double>& x_mm,
                          const std::vector<double>& z_mm, PointMm a, PointMm b, const SizingContext& ctx);

/// Median of the envelope (a robust background level for the noise component).
double medianLevel(const std::vector<float>& amplitude);

/// Per frame of `img`, the peak amplitude inside the box (x and depth ranges, mm): the
/// peak-over-depth projection of the top view restricted to the box.
std::vector<double> scanProjection(const ImageStack& img, PointMm a, PointMm b);

/// −6 dB (ratio 0.5) or −20 dB (0.1) drop along the scan axis: positions y_mm (one per frame,
/// any order, distinct) and the projection. elevation_width_mm: −6 dB width of the elevation
/// beam (0 = unknown: no resolution component, a warning). Budget: resolution ±W/4 per edge,
/// frame spacing (rectangular, spacing/√12 per edge), scan-position calibration
/// `position_rel` × length. The result's `length` is the extent along y and `x` the y of the peak.
SizingResult scanLength(const std::vector<double>& y_mm, const std::vector<double>& projection, double ratio,
                        double elevation_width_mm, double position_rel = 0);

/// End-to-end distance between two points on the top view ((x, y) in mm; PointMm's z_mm holds
/// y). Budget per point and axis: placement rectangular ±W/2 (W: lateral −6 dB width in x,
/// elevation width in y; 0 = unknown) and the grid (pixel step in x, frame spacing in y, /√12).
MeasuredValue endToEnd(PointMm a, PointMm b, double lateral_width_mm, double elevation_width_mm, double step_x_mm,
                       double step_y_mm);

/// The result as JSON text (the keys of `umbra-cli measure --json`): tool, frame, x_mm,
/// depth_mm, length_mm, height_mm, peak_db (null where absent), uncertainty_mm {x, depth,
/// length, height} (expanded, k = 2), resolution_limited, warnings, tips_mm (tips tool),
/// upper_bound {…}, budgets {name: [{component, standard_mm, basis}]}. Values are rounded to
/// their uncertainties (GUM 7.2.6).
std::string sizingJson(const SizingResult& r, size_t frame);
/// One readable line: "drop6 frame 0: x 6.1 ± 0.3 mm; depth ...; warnings: ...".
std::string sizingLine(const SizingResult& r, size_t frame);

}  // namespace umbra::core
