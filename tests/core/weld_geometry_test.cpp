// SPDX-License-Identifier: MIT
// Weld overlay geometry against hand-worked trigonometry: fusion faces of V, X, U and J
// preparations, reinforcement profiles, and the skip mirrors of the unfolded specimen.
#include <gtest/gtest.h>

#include <cmath>

#include "core/error.h"
#include "core/weld_geometry.h"

using namespace umbra::core;

namespace {

constexpr double kPi = 3.14159265358979323846;
double tand(double deg) { return std::tan(deg * kPi / 180); }

const WeldPolyline& line(const std::vector<WeldPolyline>& ls, WeldLineKind k, int nth = 0) {
    for (const auto& l : ls)
        if (l.kind == k && nth-- == 0) return l;
    throw std::runtime_error("no such line");
}

// x of a polyline at depth z (linear between its points), for faces monotonic in z.
double xAt(const WeldPolyline& l, double z) {
    for (size_t i = 1; i < l.points.size(); ++i) {
        const auto& a = l.points[i - 1];
        const auto& b = l.points[i];
        if ((z - a.z_mm) * (z - b.z_mm) <= 0 && a.z_mm != b.z_mm)
            return a.x_mm + (b.x_mm - a.x_mm) * (z - a.z_mm) / (b.z_mm - a.z_mm);
    }
    return NAN;
}

}  // namespace

// Single V, T = 20 mm, bevel 30°, gap 2 mm, no land, centred at 0: the +x face is
// x = 1 + (20 - z) tan 30° (the demo scene's comment; hand-worked: 12.5470 mm at the surface,
// 7.0622 mm at z = 9.5 mm, where the demo scene puts its fusion-face flaw).
TEST(weld_geometry_test, single_v_faces_follow_the_bevel) {
    WeldGeometry w;
    const auto ls = weldPolylines(w, -30, 30);
    const auto& left = line(ls, WeldLineKind::FusionFace, 0);
    const auto& right = line(ls, WeldLineKind::FusionFace, 1);
    EXPECT_NEAR(xAt(right, 0), 1 + 20 * tand(30), 1e-9);
    EXPECT_NEAR(xAt(right, 0), 12.547005, 1e-6);
    EXPECT_NEAR(xAt(right, 9.5), 7.062178, 1e-6);
    EXPECT_NEAR(xAt(right, 20), 1.0, 1e-12);
    EXPECT_NEAR(xAt(left, 9.5), -7.062178, 1e-6);
    EXPECT_NEAR(grooveWidthAt(w, 0), 25.094011, 1e-6);
    // Back wall at T over the requested span.
    const auto& bw = line(ls, WeldLineKind::BackWall);
    ASSERT_EQ(bw.points.size(), 2u);
    EXPECT_EQ(bw.points[0], (WeldPoint{-30, 20}));
    EXPECT_EQ(bw.points[1], (WeldPoint{30, 20}));
}

// A 2 mm root face: vertical land from z = 18 to 20 mm, bevel above it:
// x = 1 + (18 - z) tan 30° -> 11.3923 mm at the surface (hand-worked).
TEST(weld_geometry_test, root_face_is_a_vertical_land) {
    WeldGeometry w;
    w.root_face_mm = 2;
    w.centre_x_mm = 5;
    const auto ls = weldPolylines(w, -30, 30);
    const auto& right = line(ls, WeldLineKind::FusionFace, 1);
    EXPECT_NEAR(xAt(right, 0), 5 + 11.392305, 1e-6);
    EXPECT_NEAR(xAt(right, 18), 6.0, 1e-12);
    EXPECT_NEAR(xAt(right, 19), 6.0, 1e-12);
    EXPECT_NEAR(xAt(right, 20), 6.0, 1e-12);
}

// Double V (X), T = 20, land 2 mm at mid-thickness, no gap: each bevel is 9 mm high, so the
// groove is 2 × 9 tan 30° = 10.3923 mm wide at both surfaces and closed over z = 9..11 mm.
TEST(weld_geometry_test, double_v_is_symmetric_about_mid_thickness) {
    WeldGeometry w;
    w.shape = WeldShape::X;
    w.root_gap_mm = 0;
    w.root_face_mm = 2;
    EXPECT_NEAR(grooveWidthAt(w, 0), 10.392305, 1e-6);
    EXPECT_NEAR(grooveWidthAt(w, 20), 10.392305, 1e-6);
    EXPECT_NEAR(grooveWidthAt(w, 10), 0.0, 1e-12);
    EXPECT_NEAR(grooveWidthAt(w, 4.5), 2 * 4.5 * tand(30), 1e-9);
    EXPECT_NEAR(grooveWidthAt(w, 15.5), 2 * 4.5 * tand(30), 1e-9);
    // The back cap defaults to the groove width at the back wall.
    const auto ls = weldPolylines(w, -30, 30);
    const auto& root = line(ls, WeldLineKind::Root);
    EXPECT_NEAR(root.points.front().x_mm, -5.196152, 1e-6);
    EXPECT_NEAR(root.points.back().x_mm, 5.196152, 1e-6);
}

// U, T = 20, land 2, R = 5 mm, bevel 10°, no gap. The groove radius is centred at depth
// 20 - 2 - 5 = 13 mm over the land's edge; it meets the straight face where its tangent is 10°
// from the normal, at z = 13 + 5 sin 10° = 13.8682 mm, x = 5 cos 10° = 4.9240 mm; the face then
// reaches the surface at 4.9240 + 13.8682 tan 10° = 7.3694 mm. On the arc at z = 15.5 mm:
// x = sqrt(5² - 2.5²) = 4.3301 mm (hand-worked).
TEST(weld_geometry_test, u_groove_radius_then_straight_face) {
    WeldGeometry w;
    w.shape = WeldShape::U;
    w.root_gap_mm = 0;
    w.root_face_mm = 2;
    w.groove_radius_mm = 5;
    w.bevel_angle_deg = 10;
    EXPECT_NEAR(grooveWidthAt(w, 0) / 2, 7.369384, 1e-6);
    EXPECT_NEAR(grooveWidthAt(w, 13.868241) / 2, 4.924039, 1e-6);
    EXPECT_NEAR(grooveWidthAt(w, 15.5) / 2, 4.330127, 1e-6);
    EXPECT_NEAR(grooveWidthAt(w, 18) / 2, 0.0, 1e-9);
    // Every polyline point of the arc lies on the circle (5° sampling).
    const auto ls = weldPolylines(w, -30, 30);
    const auto& right = line(ls, WeldLineKind::FusionFace, 1);
    int on_arc = 0;
    for (const auto& p : right.points)
        if (p.z_mm > 13.868 && p.z_mm < 18 - 1e-9) {
            EXPECT_NEAR(std::hypot(p.x_mm, p.z_mm - 13), 5.0, 1e-9);
            ++on_arc;
        }
    EXPECT_GE(on_arc, 14);  // 80° of arc at 5° steps
}

// J: only the +x plate is prepared; the -x face is square at -gap/2.
TEST(weld_geometry_test, j_groove_has_one_square_face) {
    WeldGeometry w;
    w.shape = WeldShape::J;
    w.root_gap_mm = 1;
    w.root_face_mm = 2;
    w.groove_radius_mm = 5;
    w.bevel_angle_deg = 10;
    const auto ls = weldPolylines(w, -30, 30);
    const auto& left = line(ls, WeldLineKind::FusionFace, 0);
    for (const auto& p : left.points) EXPECT_DOUBLE_EQ(p.x_mm, -0.5);
    EXPECT_NEAR(xAt(line(ls, WeldLineKind::FusionFace, 1), 0), 0.5 + 7.369384, 1e-6);
}

// Cap and root bead: parabolic profiles through the toes with the entered heights.
TEST(weld_geometry_test, cap_and_root_reinforcement) {
    WeldGeometry w;
    w.cap_width_mm = 28;
    w.cap_height_mm = 2;
    w.root_height_mm = 1.5;
    const auto ls = weldPolylines(w, -30, 30);
    const auto& cap = line(ls, WeldLineKind::Cap);
    EXPECT_EQ(cap.points.front(), (WeldPoint{-14, 0}));
    EXPECT_EQ(cap.points.back(), (WeldPoint{14, 0}));
    double top = 0;
    for (const auto& p : cap.points) top = std::min(top, p.z_mm);
    EXPECT_DOUBLE_EQ(top, -2.0);  // above the surface (negative depth)
    const auto& root = line(ls, WeldLineKind::Root);
    EXPECT_DOUBLE_EQ(root.points.front().x_mm, -2.0);  // default width: gap 2 mm + 2 mm
    double bottom = 0;
    for (const auto& p : root.points) bottom = std::max(bottom, p.z_mm);
    EXPECT_DOUBLE_EQ(bottom, 21.5);
}

// Skips: mirrored in the back wall (z -> 2T - z), then shifted by 2T (z -> 2T + z). The face
// crossing z = 9.5 mm directly crosses 30.5 mm in the first skip and 49.5 mm in the second.
TEST(weld_geometry_test, skip_views_mirror_in_the_back_wall) {
    WeldGeometry w;
    EXPECT_DOUBLE_EQ(skipDepth(9.5, 20, 1), 30.5);
    EXPECT_DOUBLE_EQ(skipDepth(9.5, 20, 2), 49.5);
    const auto s1 = weldPolylines(w, -30, 30, 1);
    const auto s2 = weldPolylines(w, -30, 30, 2);
    EXPECT_NEAR(xAt(line(s1, WeldLineKind::FusionFace, 1), 30.5), 7.062178, 1e-6);
    EXPECT_NEAR(xAt(line(s2, WeldLineKind::FusionFace, 1), 49.5), 7.062178, 1e-6);
    EXPECT_NEAR(xAt(line(s1, WeldLineKind::FusionFace, 1), 40), 12.547005, 1e-6);  // surface -> 2T
    EXPECT_DOUBLE_EQ(line(s1, WeldLineKind::Surface).points[0].z_mm, 40.0);
    EXPECT_DOUBLE_EQ(line(s2, WeldLineKind::BackWall).points[0].z_mm, 60.0);
    for (const auto& l : s1) EXPECT_EQ(l.skip, 1);
    EXPECT_EQ(weldOverlay(w, -30, 30).size(), 15u);  // 5 lines in each of 3 skips
}

TEST(weld_geometry_test, bad_geometry_is_refused_naming_the_field) {
    auto message = [](const WeldGeometry& w) {
        try {
            checkWeld(w);
        } catch (const SettingError& e) {
            return std::string(e.what());
        }
        return std::string("no error");
    };
    WeldGeometry w;
    w.root_face_mm = 20;
    EXPECT_EQ(message(w).rfind("weld.root_face_mm:", 0), 0u);
    w = {};
    w.bevel_angle_deg = 85;
    EXPECT_EQ(message(w).rfind("weld.bevel_angle_deg:", 0), 0u);
    w = {};
    w.shape = WeldShape::U;
    w.thickness_mm = 10;
    w.root_face_mm = 2;
    w.groove_radius_mm = 20;
    w.bevel_angle_deg = 10;  // arc meets the face at 8 - 20 + 20 sin 10° = -8.5 mm: above the plate
    EXPECT_EQ(message(w).rfind("weld.groove_radius_mm:", 0), 0u);
    w = {};
    w.thickness_mm = NAN;
    EXPECT_EQ(message(w).rfind("weld.thickness_mm:", 0), 0u);
    EXPECT_EQ(message(WeldGeometry{}), "no error");
    EXPECT_EQ(weldShapeFromName("X"), WeldShape::X);
    EXPECT_FALSE(weldShapeFromName("K").has_value());
}
