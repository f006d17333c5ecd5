// SPDX-License-Identifier: MIT
// Measurement arithmetic and uncertainty, checked against hand calculations and against an
// independent numerical integral for the ellipse perimeter.
#include <gtest/gtest.h>

#include <cmath>
#include <numbers>

#include "core/error.h"
#include "core/measurement.h"

using namespace umbra::core;

namespace {

constexpr double kPi = std::numbers::pi;

Measurement make(MeasurementKind kind, std::vector<PointMm> pts) {
    Measurement m;
    m.id = "M1";
    m.kind = kind;
    m.points = std::move(pts);
    return m;
}

// Pixel 0.1 mm (x) × 0.05 mm (z), speed of sound uncertain by 1 %, surface at z = 0.
const UncertaintyModel kModel{0.1, 0.05, 0.01, 0.0};

// Perimeter of an ellipse by the arc-length integral ∫₀^{2π} √(a² sin²t + b² cos²t) dt
// (= 4a·E(e), the complete elliptic integral of the second kind), evaluated with the
// trapezoidal rule, which converges geometrically for smooth periodic integrands
// (Trefethen & Weideman, "The exponentially convergent trapezoidal rule", SIAM Review 56, 2014).
double perimeterByQuadrature(double a, double b, int n) {
    double s = 0;
    for (int i = 0; i < n; ++i) {
        const double t = 2 * kPi * i / n;
        s += std::sqrt(a * a * std::sin(t) * std::sin(t) + b * b * std::cos(t) * std::cos(t));
    }
    return s * 2 * kPi / n;
}

}  // namespace

// 3-4-5 right triangle (Pythagoras): Δx = 3, Δdepth = 4, distance = 5 mm.
TEST(measurement_test, caliper_3_4_5_triangle_values) {
    auto q = evaluate(make(MeasurementKind::Caliper, {{1, 2}, {4, 6}}), kModel);
    ASSERT_EQ(q.size(), 3u);
    EXPECT_EQ(q[0].name, "Δx");
    EXPECT_EQ(q[1].name, "Δdepth");
    EXPECT_EQ(q[2].name, "distance");
    EXPECT_DOUBLE_EQ(q[0].value, 3.0);
    EXPECT_DOUBLE_EQ(q[1].value, 4.0);
    EXPECT_DOUBLE_EQ(q[2].value, 5.0);
    for (const auto& x : q) EXPECT_EQ(x.unit, "mm");
}

// Hand calculation, each end placed to ±half a pixel, combined root-sum-square:
//   u(Δx)      reading = √2·0.05 = 0.070711, speed 0 (lateral distances do not scale with c)
//   u(Δdepth)  reading = √2·0.025 = 0.035355, speed = 1 %·4 = 0.04, total = √0.00285 = 0.053385
//   u(dist)    reading² = (3/5)²·2·0.05² + (4/5)²·2·0.025² = 0.0018 + 0.0008 = 0.0026
//              speed = 1 %·Δz²/d = 0.01·16/5 = 0.032, total = √(0.0026 + 0.001024) = 0.060200
TEST(measurement_test, caliper_uncertainty_matches_hand_calculation) {
    auto q = evaluate(make(MeasurementKind::Caliper, {{1, 2}, {4, 6}}), kModel);
    EXPECT_NEAR(q[0].reading_part, std::sqrt(2.0) * 0.05, 1e-12);
    EXPECT_NEAR(q[0].speed_part, 0.0, 1e-15);
    EXPECT_NEAR(q[0].uncertainty, 0.0707106781, 1e-9);
    EXPECT_NEAR(q[1].reading_part, std::sqrt(2.0) * 0.025, 1e-12);
    EXPECT_NEAR(q[1].speed_part, 0.04, 1e-12);
    EXPECT_NEAR(q[1].uncertainty, std::sqrt(0.00285), 1e-12);
    EXPECT_NEAR(q[2].reading_part, std::sqrt(0.0026), 1e-12);
    EXPECT_NEAR(q[2].speed_part, 0.032, 1e-12);
    EXPECT_NEAR(q[2].uncertainty, std::sqrt(0.003624), 1e-12);
}

// A difference of depths does not depend on where the surface is; the order of the ends
// does not matter.
TEST(measurement_test, caliper_is_independent_of_surface_and_point_order) {
    UncertaintyModel shifted = kModel;
    shifted.surface_z_mm = 1.5;
    auto a = evaluate(make(MeasurementKind::Caliper, {{1, 2}, {4, 6}}), kModel);
    auto b = evaluate(make(MeasurementKind::Caliper, {{4, 6}, {1, 2}}), shifted);
    for (size_t i = 0; i < 3; ++i) {
        EXPECT_NEAR(a[i].value, b[i].value, 1e-12);
        EXPECT_NEAR(a[i].uncertainty, b[i].uncertainty, 1e-12);
    }
}

// Depth below the surface: z = 25, surface 5 → 20 mm.
// u: reading = 0.05/2 = 0.025, speed = 1 %·20 = 0.2, total = √(0.000625 + 0.04) = 0.2015564
TEST(measurement_test, depth_marker_measures_from_the_surface) {
    UncertaintyModel m = kModel;
    m.surface_z_mm = 5;
    auto q = evaluate(make(MeasurementKind::DepthMarker, {{2, 25}}), m);
    ASSERT_EQ(q.size(), 1u);
    EXPECT_EQ(q[0].name, "depth");
    EXPECT_DOUBLE_EQ(q[0].value, 20.0);
    EXPECT_NEAR(q[0].reading_part, 0.025, 1e-12);
    EXPECT_NEAR(q[0].speed_part, 0.2, 1e-12);
    EXPECT_NEAR(q[0].uncertainty, std::sqrt(0.040625), 1e-12);
}

// Extent box from opposite corners (10, 30) and (2, 26): length 8, height 4 mm.
TEST(measurement_test, extent_box_length_and_height) {
    auto q = evaluate(make(MeasurementKind::ExtentBox, {{10, 30}, {2, 26}}), kModel);
    ASSERT_EQ(q.size(), 2u);
    EXPECT_EQ(q[0].name, "length");
    EXPECT_EQ(q[1].name, "height");
    EXPECT_DOUBLE_EQ(q[0].value, 8.0);
    EXPECT_DOUBLE_EQ(q[1].value, 4.0);
    EXPECT_NEAR(q[0].uncertainty, std::sqrt(2.0) * 0.05, 1e-12);            // lateral: reading only
    EXPECT_NEAR(q[1].uncertainty, std::sqrt(0.00125 + 0.0016), 1e-12);      // √(2·0.025² + 0.04²)
}

// A circle (a = b): circumference 2πa exactly, area πa².
TEST(measurement_test, ellipse_circle_case_gives_two_pi_a) {
    auto q = evaluate(make(MeasurementKind::Ellipse, {{0, 10}, {5, 10}, {0, 15}}), kModel);
    ASSERT_EQ(q.size(), 4u);
    EXPECT_EQ(q[0].name, "axis 1");
    EXPECT_EQ(q[3].name, "circumference");
    EXPECT_DOUBLE_EQ(q[0].value, 10.0);
    EXPECT_DOUBLE_EQ(q[1].value, 10.0);
    EXPECT_NEAR(q[2].value, kPi * 25, 1e-12);
    EXPECT_EQ(q[2].unit, "mm²");
    EXPECT_NEAR(q[3].value, 2 * kPi * 5, 1e-12 * 2 * kPi * 5);
    EXPECT_NEAR(ellipseCircumferenceRamanujan(7.25, 7.25), 2 * kPi * 7.25, 1e-13);
}

// Ramanujan's second approximation (S. Ramanujan, "Modular equations and approximations to π",
// Quart. J. Math. 45, 1914) against the perimeter integral by quadrature, 10 × 6 semi-axes.
TEST(measurement_test, ramanujan_matches_elliptic_integral_for_10_by_6) {
    const double ref = perimeterByQuadrature(10, 6, 4000);
    // The quadrature itself has converged: doubling the points changes nothing.
    EXPECT_NEAR(ref, perimeterByQuadrature(10, 6, 8000), 1e-12 * ref);
    // 4·10·E(m = 0.64) with Debian's scipy 1.10.1: 40 * scipy.special.ellipe(0.64) = 51.05399772679626
    EXPECT_NEAR(ref, 51.05399772679626, 1e-11);
    EXPECT_NEAR(ellipseCircumferenceRamanujan(10, 6), ref, 1e-6 * ref);
    EXPECT_NEAR(ellipseCircumferenceRamanujan(6, 10), ref, 1e-6 * ref);  // symmetric in a, b
}

// Axis-aligned ellipse: centre (0, 10), end of axis 1 at (5, 10) → a = 5 along x,
// end of axis 2 at (0, 13) → b = 3 along z.  Hand calculation:
//   area A = πab; ∂A/∂x₁ = πb, ∂A/∂x_c = −πb, ∂A/∂z₂ = πa, ∂A/∂z_c = −πa, others 0
//   reading² = 2(πb·0.05)² + 2(πa·0.025)²;  speed: b scales with c, a does not → πab·1 %
//   axis 2 = 2b: reading = 2·√2·0.025, speed = 2b·1 % = 0.06
//   circumference C(a, b): same pattern with ∂C/∂a, ∂C/∂b (central differences here)
TEST(measurement_test, ellipse_uncertainty_matches_hand_calculation) {
    auto q = evaluate(make(MeasurementKind::Ellipse, {{0, 10}, {5, 10}, {0, 13}}), kModel);
    const double a = 5, b = 3;
    EXPECT_DOUBLE_EQ(q[0].value, 10.0);
    EXPECT_DOUBLE_EQ(q[1].value, 6.0);
    EXPECT_NEAR(q[0].uncertainty, 2 * std::sqrt(2.0) * 0.05, 1e-12);
    EXPECT_NEAR(q[1].reading_part, 2 * std::sqrt(2.0) * 0.025, 1e-12);
    EXPECT_NEAR(q[1].speed_part, 0.06, 1e-12);
    const double area_reading = std::sqrt(2 * std::pow(kPi * b * 0.05, 2) + 2 * std::pow(kPi * a * 0.025, 2));
    EXPECT_NEAR(q[2].value, kPi * 15, 1e-12);
    EXPECT_NEAR(q[2].reading_part, area_reading, 1e-12);
    EXPECT_NEAR(q[2].speed_part, kPi * a * b * 0.01, 1e-12);
    EXPECT_NEAR(q[2].uncertainty, std::hypot(area_reading, kPi * 15 * 0.01), 1e-12);

    const double h = 1e-5;
    const double dCda = (ellipseCircumferenceRamanujan(a + h, b) - ellipseCircumferenceRamanujan(a - h, b)) / (2 * h);
    const double dCdb = (ellipseCircumferenceRamanujan(a, b + h) - ellipseCircumferenceRamanujan(a, b - h)) / (2 * h);
    const double c_reading = std::sqrt(2 * std::pow(dCda * 0.05, 2) + 2 * std::pow(dCdb * 0.025, 2));
    EXPECT_NEAR(q[3].value, ellipseCircumferenceRamanujan(a, b), 1e-12);
    EXPECT_NEAR(q[3].reading_part, c_reading, 1e-8);
    EXPECT_NEAR(q[3].speed_part, dCdb * b * 0.01, 1e-8);
}

// Display: value ± expanded uncertainty U = 2 u (k = 2, JCGM 100:2008 6.2.1), U to two
// significant digits and the value to the same place (GUM 7.2.6).
TEST(measurement_test, format_rounds_value_to_the_expanded_uncertainty) {
    EXPECT_EQ(formatQuantity({"distance", 12.3456, 0.123, "mm"}), "12.35 ± 0.25 mm");
    EXPECT_EQ(formatQuantity({"distance", 12.3456, 0.0534, "mm"}), "12.35 ± 0.11 mm");
    EXPECT_EQ(formatQuantity({"distance", 12.3456, 0.34, "mm"}), "12.35 ± 0.68 mm");
    EXPECT_EQ(formatQuantity({"distance", 12.3456, 0.0012, "mm"}), "12.3456 ± 0.0024 mm");
    EXPECT_EQ(formatQuantity({"area", 1234.5, 34, "mm²"}), "1235 ± 68 mm²");
    EXPECT_EQ(formatQuantity({"d", 5.0, 0.96, "mm"}), "5.0 ± 1.9 mm");
    EXPECT_EQ(formatQuantity({"d", -0.001, 0.0, "mm"}), "0.00 ± 0.00 mm");
    const std::vector<Quantity> two{{"Δx", 3, 0.0707, "mm"}, {"Δdepth", 4, 0.0534, "mm"}};
    EXPECT_EQ(formatQuantities(two), "Δx 3.00 ± 0.14 mm; Δdepth 4.00 ± 0.11 mm");
}

// With point-spread widths the placement of a point is rectangular ±W/2 (W/(2√3)) and the grid
// pixel/√12, per point and axis (GUM 4.3.7, rectangular distribution): an ellipse axis of a 6 mm
// cyst imaged with W = 1.7 mm laterally is uncertain by far more than half a pixel.
TEST(measurement_test, placement_from_the_point_spread_width) {
    UncertaintyModel u = kModel;  // pixel 0.1 x 0.05 mm
    u.resolution = [](double, double) { return std::pair{1.7, 0.9}; };
    const auto q = evaluate(make(MeasurementKind::Caliper, {{0, 10}, {6, 10}}), u);
    // Δx = x1 − x0: two points, each W/(2√3) laterally and pixel/√12 for the grid.
    const double place = std::sqrt(2.0) * 1.7 / (2 * std::sqrt(3.0)), grid = std::sqrt(2.0) * 0.1 / std::sqrt(12.0);
    EXPECT_NEAR(q[0].reading_part, std::hypot(place, grid), 1e-12);
    ASSERT_EQ(q[0].components.size(), 3u);
    EXPECT_EQ(q[0].components[0].name, "resolution (point placement)");
    EXPECT_NEAR(q[0].components[0].standard, place, 1e-12);
    EXPECT_NEAR(q[0].components[1].standard, grid, 1e-12);
}

TEST(measurement_test, tooltip_lists_the_budget) {
    auto q = evaluate(make(MeasurementKind::DepthMarker, {{2, 20}}), kModel);
    const std::string t = quantityTooltip(q[0], kModel);
    EXPECT_NE(t.find("1 %"), std::string::npos) << t;
    EXPECT_NE(t.find("speed of sound"), std::string::npos) << t;
    EXPECT_NE(t.find("half a pixel"), std::string::npos) << t;
    EXPECT_NE(t.find("20.00 ± 0.40 mm (k = 2)"), std::string::npos) << t;
}

TEST(measurement_test, wrong_point_count_is_a_clear_error) {
    try {
        evaluate(make(MeasurementKind::Ellipse, {{0, 0}, {1, 1}}), kModel);
        FAIL() << "expected SettingError";
    } catch (const SettingError& e) {
        EXPECT_NE(std::string(e.what()).find("M1"), std::string::npos);
        EXPECT_NE(std::string(e.what()).find("needs 3"), std::string::npos);
    }
}

TEST(measurement_test, kind_names_round_trip_and_ids_increase) {
    for (auto k : {MeasurementKind::Caliper, MeasurementKind::DepthMarker, MeasurementKind::ExtentBox,
                   MeasurementKind::Ellipse})
        EXPECT_EQ(kindFromName(kindName(k)), k);
    EXPECT_FALSE(kindFromName("ruler").has_value());
    EXPECT_EQ(nextMeasurementId({}), "M1");
    EXPECT_EQ(nextMeasurementId({"M1", "M7", "x", "M3"}), "M8");
}
