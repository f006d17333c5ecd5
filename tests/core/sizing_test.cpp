// SPDX-License-Identifier: MIT
// Sizing suite on analytic envelopes with known truth. Point-spread: Gaussian amplitude
// exp(−4 ln2 d²/W²) of −6 dB full width W (the amplitude is 0.5 at d = W/2). Drop levels: edges at
// 0.5× (−6 dB) and 0.1× (−20 dB) the peak (common practice). A uniform line of length L blurred by
// this point-spread is 0.5 at its true ends (erfc edge profile), so the −6 dB drop measures L;
// the −20 dB edges lie erfc⁻¹(0.2)·W/(2√ln2) = 0.544 W beyond them (Gaussian edge; the sizing
// suite removes that bias). Tip-to-tip height: depth difference of the two tip echoes (common
// practice).
#include <gtest/gtest.h>

#include <cmath>

#include "core/error.h"
#include "core/sizing.h"

using namespace umbra::core;

namespace {
struct Img {
    std::vector<double> x, z;
    std::vector<float> a;
    void add(double (*f)(double, double, const void*), const void* p) {
        for (size_t iz = 0; iz < z.size(); ++iz)
            for (size_t ix = 0; ix < x.size(); ++ix) a[iz * x.size() + ix] += float(f(x[ix], z[iz], p));
    }
};
Img grid(double x0, double x1, double z0, double z1, double step) {
    Img g;
    for (double v = x0; v <= x1 + 1e-9; v += step) g.x.push_back(v);
    for (double v = z0; v <= z1 + 1e-9; v += step) g.z.push_back(v);
    g.a.assign(g.x.size() * g.z.size(), 0.0f);
    return g;
}
constexpr double kWl = 1.5, kWa = 0.8;  // lateral, axial −6 dB widths, mm
double gauss(double d, double w) { return std::exp(-4 * std::log(2.0) * d * d / (w * w)); }
// Edge profile of a uniform line blurred by the Gaussian: 0.5 erfc(d/(σ√2)), σ = W/(2√(2 ln 2)).
double edgeProfile(double d, double w) { return 0.5 * std::erfc(d / (w / (2 * std::sqrt(2 * std::log(2.0))) * std::sqrt(2.0))); }

struct Blob {
    double x, z, amp;
};
double blob(double x, double z, const void* p) {
    const auto* b = static_cast<const Blob*>(p);
    return b->amp * gauss(x - b->x, kWl) * gauss(z - b->z, kWa);
}
struct Line {
    double x0, x1, z;
};
double line(double x, double z, const void* p) {
    const auto* l = static_cast<const Line*>(p);
    return (edgeProfile(l->x0 - x, kWl) - edgeProfile(l->x1 - x, kWl)) * gauss(z - l->z, kWa);
}
SizingContext ctx() {
    SizingContext c;
    c.resolution = [](double, double) { return LocalResolution{kWl, kWa}; };
    c.speed_rel = 0.01;
    return c;
}
bool covers(const MeasuredValue& m, double truth) { return std::abs(m.value - truth) <= m.budget.expanded(); }
}  // namespace

// A 6 mm line: −6 dB length 6 mm (not resolution-limited); −20 dB, corrected, also 6 mm.
TEST(sizing_test, drop6_and_drop20_on_an_extended_line) {
    Img g = grid(-8, 8, 5, 15, 0.05);
    const Line l{-3, 3, 10};
    g.add(line, &l);
    const auto r6 = measureInBox(SizingTool::Drop6, g.a, g.x, g.z, {-7, 7}, {7, 13}, ctx());
    ASSERT_TRUE(r6.found);
    EXPECT_NEAR(r6.length->value, 6.0, 0.03);
    EXPECT_TRUE(covers(*r6.length, 6.0));
    EXPECT_FALSE(r6.length->upper_bound);
    EXPECT_NEAR(r6.height->value, kWa, 0.02);  // a line has no height: the point-spread's
    EXPECT_TRUE(r6.height->upper_bound);        // ... and it is flagged as such
    EXPECT_TRUE(r6.resolution_limited);
    const auto r20 = measureInBox(SizingTool::Drop20, g.a, g.x, g.z, {-7, 7}, {7, 13}, ctx());
    EXPECT_NEAR(r20.drop.lengthMm(), 6.0 + 2 * 0.544 * kWl, 0.05);  // raw −20 dB extent
    EXPECT_NEAR(r20.length->value, 6.0, 0.05);                      // beam spread removed
    EXPECT_TRUE(covers(*r20.length, 6.0));
    // The budget lists named components, each positive.
    ASSERT_GE(r6.length->budget.components.size(), 2u);
    EXPECT_EQ(r6.length->budget.components[0].name, "resolution (edge placement)");
    for (const auto& c : r6.length->budget.components) EXPECT_GT(c.standard, 0) << c.name;
}

// A point: −6 dB sizes give the point-spread widths, flagged resolution-limited (upper bound).
TEST(sizing_test, point_reflector_is_resolution_limited) {
    Img g = grid(-4, 4, 6, 14, 0.05);
    const Blob b{0.3, 10.2, 1.0};
    g.add(blob, &b);
    const auto r = measureInBox(SizingTool::Drop6, g.a, g.x, g.z, {-3, 8}, {3, 12}, ctx());
    EXPECT_TRUE(r.resolution_limited);
    EXPECT_TRUE(r.length->upper_bound);
    EXPECT_TRUE(r.height->upper_bound);
    EXPECT_NEAR(r.length->value, kWl, 0.02);
    EXPECT_NEAR(r.height->value, kWa, 0.02);
    EXPECT_TRUE(covers(*r.x, 0.3));
    EXPECT_TRUE(covers(*r.depth, 10.2));
    EXPECT_FALSE(r.offer_tips);
    bool warned = false;
    for (const auto& w : r.warnings) warned |= w.find("resolution-limited") != std::string::npos;
    EXPECT_TRUE(warned);
}

// Two tip echoes 3 mm apart in depth (the lower 4 dB weaker): the −6 dB drop sees both peaks
// above its level and offers tip sizing; the tips tool gives 3.0 mm and marks both tips.
TEST(sizing_test, two_tips_warn_drop_and_size_tip_to_tip) {
    Img g = grid(-4, 6, 6, 16, 0.05);
    const Blob t1{1.0, 9.5, 1.0}, t2{0.0, 12.5, 0.63};
    g.add(blob, &t1);
    g.add(blob, &t2);
    const auto d = measureInBox(SizingTool::Drop6, g.a, g.x, g.z, {-3, 7}, {5, 15}, ctx());
    EXPECT_TRUE(d.offer_tips);
    EXPECT_EQ(d.peaks.size(), 2u);
    const auto t = measureInBox(SizingTool::Tips, g.a, g.x, g.z, {-3, 7}, {5, 15}, ctx());
    ASSERT_TRUE(t.found);
    ASSERT_EQ(t.tips.size(), 2u);
    EXPECT_NEAR(t.tips[0].z_mm, 9.5, 0.03);
    EXPECT_NEAR(t.tips[1].z_mm, 12.5, 0.03);
    EXPECT_NEAR(t.height->value, 3.0, 0.05);
    EXPECT_TRUE(covers(*t.height, 3.0));
    EXPECT_FALSE(t.resolution_limited);
    // A lower tip 16 dB down (below −6 dB, above −20 dB): no drop warning, tips still found.
    Img h = grid(-4, 6, 6, 16, 0.05);
    const Blob t3{0.0, 12.5, 0.16};
    h.add(blob, &t1);
    h.add(blob, &t3);
    EXPECT_FALSE(measureInBox(SizingTool::Drop6, h.a, h.x, h.z, {-3, 7}, {5, 15}, ctx()).offer_tips);
    EXPECT_NEAR(measureInBox(SizingTool::Tips, h.a, h.x, h.z, {-3, 7}, {5, 15}, ctx()).height->value, 3.0, 0.05);
    // A single echo: no tip pair.
    Img one = grid(-4, 6, 6, 16, 0.05);
    one.add(blob, &t1);
    EXPECT_FALSE(measureInBox(SizingTool::Tips, one.a, one.x, one.z, {-3, 7}, {5, 15}, ctx()).found);
}

// Length along the scan axis: a reflector 9 mm long in y seen through a Gaussian elevation beam
// of −6 dB width 3 mm, one frame per mm: −6 dB drop gives 9 mm.
TEST(sizing_test, scan_length_minus_6_db) {
    std::vector<double> y, p;
    for (int i = -10; i <= 10; ++i) {
        y.push_back(i);
        p.push_back(edgeProfile(-2 - i, 3.0) - edgeProfile(7 - i, 3.0));
    }
    const auto r = scanLength(y, p, kSixDbDropRatio, 3.0);
    ASSERT_TRUE(r.found);
    EXPECT_NEAR(r.length->value, 9.0, 0.1);
    EXPECT_TRUE(covers(*r.length, 9.0));
    EXPECT_FALSE(r.resolution_limited);
    // A short one (1 mm) is flagged.
    for (size_t i = 0; i < y.size(); ++i) p[i] = edgeProfile(-0.5 - y[i], 3.0) - edgeProfile(0.5 - y[i], 3.0);
    EXPECT_TRUE(scanLength(y, p, kSixDbDropRatio, 3.0).resolution_limited);
    EXPECT_THROW(scanLength({0, 0}, {1, 1}, 0.5, 3.0), SettingError);
}

// End to end between two points: 3-4-5 triangle (geometry).
TEST(sizing_test, end_to_end_distance) {
    const auto m = endToEnd({0, 0}, {3, 4}, 1.5, 3.0, 0.1, 1.0);
    EXPECT_DOUBLE_EQ(m.value, 5.0);
    EXPECT_GT(m.budget.combined(), 0);
}

TEST(sizing_test, bad_boxes_and_json_keys) {
    Img g = grid(-4, 4, 6, 14, 0.1);
    const Blob b{0, 10, 1.0};
    g.add(blob, &b);
    EXPECT_THROW(measureInBox(SizingTool::Peak, g.a, g.x, g.z, {std::nan(""), 8}, {3, 12}, ctx()), SettingError);
    EXPECT_FALSE(measureInBox(SizingTool::Peak, g.a, g.x, g.z, {20, 20}, {30, 30}, ctx()).found);
    const auto r = measureInBox(SizingTool::Peak, g.a, g.x, g.z, {-3, 8}, {3, 12}, ctx());
    const std::string j = sizingJson(r, 0);
    for (const char* k : {"\"tool\"", "\"frame\"", "\"x_mm\"", "\"depth_mm\"", "\"length_mm\"", "\"height_mm\"", "\"peak_db\"",
                          "\"uncertainty_mm\"", "\"resolution_limited\"", "\"warnings\""})
        EXPECT_NE(j.find(k), std::string::npos) << k;
}
