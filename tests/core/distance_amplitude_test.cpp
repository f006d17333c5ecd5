// SPDX-License-Identifier: MIT
// The distance–amplitude curve against hand-computed values ("derived": each expected value is
// worked out from the stated fit, 20 log10 of amplitudes interpolated linearly in depth, by hand
// in the comment beside it). Curve used: 5 mm → amplitude 8, 15 mm → 2, 25 mm → 1, so the levels
// are 20 log10 8 = 18.0618 dB, 20 log10 2 = 6.0206 dB and 0 dB.
#include <gtest/gtest.h>

#include <cmath>

#include "core/distance_amplitude.h"
#include "core/error.h"

using namespace umbra::core;

namespace {
DacPoint pt(double depth_mm, double amplitude) {
    DacPoint p;
    p.depth_m = depth_mm * 1e-3;
    p.amplitude = amplitude;
    return p;
}
DistanceAmplitudeCurve threePoints() {
    DistanceAmplitudeCurve c;
    // Added out of order: withPoint keeps them in depth order.
    c = withPoint(c, pt(25, 1));
    c = withPoint(c, pt(5, 8));
    c = withPoint(c, pt(15, 2));
    return c;
}
double db(double ratio) { return 20.0 * std::log10(ratio); }
}  // namespace

TEST(distance_amplitude_test, points_are_kept_in_depth_order) {
    const auto c = threePoints();
    ASSERT_EQ(c.points.size(), 3u);
    EXPECT_DOUBLE_EQ(c.points[0].depth_m, 5e-3);
    EXPECT_DOUBLE_EQ(c.points[1].depth_m, 15e-3);
    EXPECT_DOUBLE_EQ(c.points[2].depth_m, 25e-3);
    EXPECT_THROW(withPoint(c, pt(10, 0)), SettingError);
    EXPECT_THROW(withPoint(c, pt(10, -1)), SettingError);
    EXPECT_THROW(withPoint(c, pt(NAN, 1)), SettingError);
}

TEST(distance_amplitude_test, derived_level_is_linear_in_db_between_points) {
    const auto c = threePoints();
    // At a point: its own level, inside the range.
    auto l = dacLevel(c, 15e-3);
    ASSERT_TRUE(l);
    EXPECT_NEAR(l->level_db, 6.020599913, 1e-9);  // 20 log10 2
    EXPECT_FALSE(l->outside);
    // Half way between 5 and 15 mm: (18.0618 + 6.0206) / 2 = 12.0412 dB = 20 log10 4 (the
    // geometric mean of 8 and 2), derived.
    l = dacLevel(c, 10e-3);
    EXPECT_NEAR(l->level_db, 12.041199827, 1e-9);
    EXPECT_FALSE(l->outside);
    // A quarter of the way: 18.0618 − 0.25 × 12.0412 = 15.0515 dB = 20 log10(8 / √2), derived.
    EXPECT_NEAR(dacLevel(c, 7.5e-3)->level_db, db(8 / std::sqrt(2.0)), 1e-9);
    // Between 15 and 25 mm at 20 mm: 6.0206 / 2 = 3.0103 dB = 20 log10 √2, derived.
    EXPECT_NEAR(dacLevel(c, 20e-3)->level_db, 3.010299957, 1e-9);
}

TEST(distance_amplitude_test, derived_db_re_curve_and_outside_flag) {
    const auto c = threePoints();
    // Amplitude 4 at 10 mm is on the curve: 0 dB.
    auto r = dbReCurve(c, 4.0, 10e-3);
    ASSERT_TRUE(r);
    EXPECT_NEAR(r->db, 0.0, 1e-9);
    EXPECT_FALSE(r->outside);
    // Amplitude 1 at 20 mm: 20 log10(1 / √2) = −3.0103 dB, derived.
    EXPECT_NEAR(dbReCurve(c, 1.0, 20e-3)->db, -3.010299957, 1e-9);
    // Amplitude 2 at 7.5 mm: 20 log10(2 / 5.65685) = −9.0309 dB, derived.
    EXPECT_NEAR(dbReCurve(c, 2.0, 7.5e-3)->db, -9.030899870, 1e-9);
    // Above the shallowest point the end level is held and flagged: 8 at 3 mm → 0 dB, outside.
    r = dbReCurve(c, 8.0, 3e-3);
    EXPECT_NEAR(r->db, 0.0, 1e-9);
    EXPECT_TRUE(r->outside);
    // Below the deepest: held at 0 dB; 0.5 at 30 mm → 20 log10 0.5 = −6.0206 dB, outside.
    r = dbReCurve(c, 0.5, 30e-3);
    EXPECT_NEAR(r->db, -6.020599913, 1e-9);
    EXPECT_TRUE(r->outside);
    // The ends themselves are inside.
    EXPECT_FALSE(dbReCurve(c, 1.0, 5e-3)->outside);
    EXPECT_FALSE(dbReCurve(c, 1.0, 25e-3)->outside);
    // No reading for a zero amplitude or an empty curve.
    EXPECT_FALSE(dbReCurve(c, 0.0, 10e-3));
    EXPECT_FALSE(dbReCurve(DistanceAmplitudeCurve{}, 1.0, 10e-3));
    const auto range = depthRange(c);
    ASSERT_TRUE(range);
    EXPECT_DOUBLE_EQ(range->first, 5e-3);
    EXPECT_DOUBLE_EQ(range->second, 25e-3);
}

TEST(distance_amplitude_test, derived_one_point_curve_and_repeated_depths) {
    // One point: a flat level, outside everywhere but at its own depth (an old single reference).
    DistanceAmplitudeCurve one = withPoint({}, pt(10, 0.5));
    EXPECT_NEAR(dbReCurve(one, 0.25, 10e-3)->db, -6.020599913, 1e-9);  // 20 log10(0.25 / 0.5)
    EXPECT_FALSE(dbReCurve(one, 0.25, 10e-3)->outside);
    EXPECT_TRUE(dbReCurve(one, 0.25, 12e-3)->outside);
    EXPECT_NEAR(dbReCurve(one, 0.25, 12e-3)->db, -6.020599913, 1e-9);
    // Two readings of the hole at 15 mm (2 and 8) are averaged in dB: (6.0206 + 18.0618) / 2
    // = 12.0412 dB = 20 log10 4, derived.
    auto c = withPoint(threePoints(), pt(15, 8));
    EXPECT_NEAR(dacLevel(c, 15e-3)->level_db, db(4), 1e-9);
    // and the interpolation uses that average: at 20 mm (12.0412 + 0) / 2 = 20 log10 2.
    EXPECT_NEAR(dacLevel(c, 20e-3)->level_db, db(2), 1e-9);
}

TEST(distance_amplitude_test, derived_tcg_from_curve) {
    const auto c = threePoints();
    // Gains L(5 mm) − L(z_i): 0, 18.0618 − 6.0206 = 12.0412, 18.0618 − 0 = 18.0618 dB, derived.
    const auto g = tcgFromCurve(c);
    ASSERT_EQ(g.size(), 3u);
    EXPECT_DOUBLE_EQ(g[0].first, 5e-3);
    EXPECT_NEAR(g[0].second, 0.0, 1e-12);
    EXPECT_NEAR(g[1].second, db(4), 1e-9);
    EXPECT_NEAR(g[2].second, db(8), 1e-9);
    EXPECT_EQ(tcgCurveText(g), "5.0000:0.0000,15.0000:12.0412,25.0000:18.0618");
    // Equal holes display equal: amplitude on the curve times the gain is the shallowest
    // point's amplitude at every point.
    for (size_t i = 0; i < g.size(); ++i)
        EXPECT_NEAR(c.points[i].amplitude * std::pow(10.0, g[i].second / 20), 8.0, 1e-9);
    // Refused: one depth only, or amplitudes read after TCG.
    EXPECT_THROW(tcgFromCurve(withPoint({}, pt(10, 1))), SettingError);
    auto after = c;
    after.basis = AmplitudeBasis::AfterTcg;
    EXPECT_THROW(tcgFromCurve(after), SettingError);
}

TEST(distance_amplitude_test, amplitude_settings_and_fingerprint) {
    auto real = [](const char* name, bool display) {
        ParamSpec p;
        p.name = name;
        p.label = name;
        p.kind = ParamKind::Real;
        p.min = -100;
        p.max = 100;
        p.default_number = 1;
        p.display_only = display;
        return p;
    };
    const std::vector<StageSpec> stages = {
        {"das", "Delay-and-sum", "", {real("f_number", false)}},
        {"grid", "Grid", "", {real("step_mm", false), real("x_min_mm", false)}},
        {"tgc", "TCG", "", {real("attenuation_db_per_cm_mhz", true)}},
        {"log_compression", "Log", "", {real("gain_db", true)}},
    };
    const Recipe a(stages);
    EXPECT_EQ(amplitudeKeys(a, AmplitudeBasis::BeforeTcg), (std::vector<std::string>{"das.f_number", "grid.step_mm"}));
    EXPECT_EQ(amplitudeKeys(a, AmplitudeBasis::AfterTcg),
              (std::vector<std::string>{"das.f_number", "grid.step_mm", "tgc.attenuation_db_per_cm_mhz"}));
    Recipe b = a;
    b.setNumber("grid.x_min_mm", -20);          // crops only
    b.setNumber("log_compression.gain_db", 6);  // display only
    b.setNumber("tgc.attenuation_db_per_cm_mhz", 0.5);
    EXPECT_TRUE(amplitudeDifferences(a, b, AmplitudeBasis::BeforeTcg).empty());
    EXPECT_EQ(amplitudeFingerprint(a, AmplitudeBasis::BeforeTcg), amplitudeFingerprint(b, AmplitudeBasis::BeforeTcg));
    EXPECT_EQ(amplitudeDifferences(a, b, AmplitudeBasis::AfterTcg), (std::vector<std::string>{"tgc.attenuation_db_per_cm_mhz"}));
    b.setNumber("das.f_number", 2);
    EXPECT_EQ(amplitudeDifferences(a, b, AmplitudeBasis::BeforeTcg), (std::vector<std::string>{"das.f_number"}));
    EXPECT_NE(amplitudeFingerprint(a, AmplitudeBasis::BeforeTcg), amplitudeFingerprint(b, AmplitudeBasis::BeforeTcg));
    EXPECT_EQ(amplitudeFingerprint(a, AmplitudeBasis::BeforeTcg).size(), 16u);
}
