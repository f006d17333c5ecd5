// SPDX-License-Identifier: MIT
#pragma once
// Measurements on a frame: caliper, depth marker, extent box, ellipse. Points are stored in
// millimetres in the image plane (x lateral, z depth, pointing down). evaluate() turns a
// measurement into quantities, each with its uncertainty:
//   * reading: every placed point is uncertain by half a pixel in x and half a pixel in z;
//   * speed of sound: the assumed speed is uncertain by `speed_rel` (default 1 %), which scales
//     every depth (z measured from the surface) by the same factor; lateral x is unaffected.
// The contributions are propagated to first order and combined root-sum-square (the speed part
// is one common factor, so correlated terms are handled correctly).
#include <cstddef>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "core/uncertainty.h"

namespace umbra::core {

/// DropSizing / Drop20Sizing / TipSizing: a box around an indication, sized from the image at
/// −6 dB, at −20 dB, or tip to tip (core/sizing.h; their quantities need the image, so
/// evaluate() gives only the box's length and height).
enum class MeasurementKind { Caliper, DepthMarker, ExtentBox, Ellipse, DropSizing, Drop20Sizing, TipSizing };
/// True for the kinds sized from the image inside a box (DropSizing, Drop20Sizing, TipSizing).
bool isImageSizing(MeasurementKind kind);

/// A point in the image plane, mm. z is depth (down).
struct PointMm {
    double x_mm = 0;
    double z_mm = 0;
    bool operator==(const PointMm&) const = default;
};

struct Measurement {
    std::string id;  ///< stable and unique within a case, e.g. "M3" (see nextMeasurementId)
    MeasurementKind kind = MeasurementKind::Caliper;
    /// Caliper: 2 ends; DepthMarker: 1; ExtentBox: 2 opposite corners;
    /// Ellipse: centre, end of axis 1, end of axis 2 (semi-axes are the distances from the centre).
    std::vector<PointMm> points;
    std::string label;       ///< user text
    size_t frame_index = 0;  ///< which frame of the capture it was made on
    bool operator==(const Measurement&) const = default;
};

/// One measured value, e.g. {"distance", 12.34, 0.12, "mm", 0.04, 0.11}.
struct Quantity {
    std::string name;          ///< display name: "Δx", "Δdepth", "distance", "depth", ...
    double value = 0;
    double uncertainty = 0;    ///< combined (root-sum-square) of the two parts below, same unit
    std::string unit;          ///< "mm" or "mm²"
    double reading_part = 0;   ///< from placing the points (resolution and grid), same unit
    double speed_part = 0;     ///< from the speed-of-sound assumption, same unit
    /// The budget, component by component (standard uncertainties; combined = `uncertainty`).
    std::vector<UncertaintyComponent> components = {};
    bool upper_bound = false;  ///< resolution-limited extent: the true value may be smaller
    bool operator==(const Quantity&) const = default;
};

/// What the uncertainty is made of.
struct UncertaintyModel {
    double pixel_x_mm = 0;     ///< pixel pitch in x, mm (half of it is the reading uncertainty)
    double pixel_z_mm = 0;     ///< pixel pitch in z, mm
    double speed_rel = 0.01;   ///< relative uncertainty of the assumed speed of sound (0.01 = 1 %)
    double surface_z_mm = 0;   ///< depth reference (z of the surface), mm
    /// −6 dB point-spread widths (lateral, axial) in mm at (x, z) mm. When set, each placed point
    /// is uncertain by its placement on an echo (rectangular ±W/2, W/(2√3)) and by the grid
    /// (pixel/√12) instead of half a pixel.
    std::function<std::pair<double, double>(double x_mm, double z_mm)> resolution = {};
    std::string speed_basis = {};  ///< where speed_rel comes from (shown in the budget)
};

/// Number of points a measurement of this kind has (2, 1, 2, 3).
size_t pointCount(MeasurementKind kind);

/// Quantities of a measurement, in mm / mm²:
///   Caliper: Δx, Δdepth (absolute values), distance;  DepthMarker: depth (below the surface);
///   ExtentBox: length (x), height (z);  Ellipse: axis 1, axis 2 (full lengths, 2a and 2b),
///   area (π·a·b), circumference (Ramanujan's second approximation).
/// Throws SettingError naming the measurement if it has the wrong number of points.
///
///   auto q = evaluate(m, {0.1, 0.05, 0.01, 0.0});
///   std::string s = formatQuantity(q[2]);   // "5.00 ± 0.04 mm"
std::vector<Quantity> evaluate(const Measurement& m, const UncertaintyModel& u);

/// Circumference of an ellipse with semi-axes a and b (any unit, result in the same unit):
/// π(a+b)(1 + 3h/(10 + √(4−3h))), h = (a−b)²/(a+b)² (Ramanujan 1914). Exact for a circle.
double ellipseCircumferenceRamanujan(double a, double b);

/// "caliper", "depth marker", "extent box", "ellipse".
std::string kindName(MeasurementKind kind);
std::optional<MeasurementKind> kindFromName(const std::string& name);

/// "12.34 ± 0.24 mm": value ± expanded uncertainty U = 2·u (k = 2), rounded together by
/// roundToUncertainty (GUM 7.2.6); an upper bound (resolution-limited) reads "≤ 1.89 mm".
std::string formatQuantity(const Quantity& q);
/// The quantity as a MeasuredValue (for budget views and exports).
MeasuredValue toMeasured(const Quantity& q);
/// A MeasuredValue as a Quantity (speed part = the "speed of sound" component).
Quantity fromMeasured(const MeasuredValue& m);
/// All quantities of one measurement joined with "; ": "Δx 3.00 ± 0.07 mm; ...".
std::string formatQuantities(const std::vector<Quantity>& qs);
/// Tooltip text: the quantity's uncertainty budget (formatBudget), component by component,
/// plain text, several lines.
std::string quantityTooltip(const Quantity& q, const UncertaintyModel& u);

/// "M<n>" with n one more than the largest number used by any id in `existing` of the form M<n>.
std::string nextMeasurementId(const std::vector<std::string>& existing);

}  // namespace umbra::core
