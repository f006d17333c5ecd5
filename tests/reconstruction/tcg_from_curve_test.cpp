// SPDX-License-Identifier: MIT
// A TCG made from a distance–amplitude curve, run through the TCG stage's own curve rule,
// makes equal reflectors display equal: gain(z) = L(shallowest) − L(z) at every depth inside
// the curve (derived: both the curve and the stage interpolate dB linearly in depth and hold
// the end values beyond), within the 1e-4 dB the curve text is rounded to.
#include <gtest/gtest.h>

#include <cmath>

#include "core/distance_amplitude.h"
#include "reconstruction/tgc_stage.h"

using namespace umbra;

TEST(tcg_from_curve_test, derived_gain_flattens_the_curve_at_every_depth) {
    core::DistanceAmplitudeCurve c;
    // Amplitudes of four holes falling with depth (invented values, not a physical model).
    const double depth_mm[] = {5, 10, 15, 20};
    const double amp[] = {1.0, 0.62, 0.45, 0.30};
    for (int i = 0; i < 4; ++i) {
        core::DacPoint p;
        p.depth_m = depth_mm[i] * 1e-3;
        p.amplitude = amp[i];
        c = core::withPoint(c, p);
    }
    recon::TgcParams tp;
    tp.mode = "curve";
    tp.curve = core::tcgCurveText(core::tcgFromCurve(c));
    std::vector<double> z;
    for (int i = 0; i <= 300; ++i) z.push_back(i * 0.1e-3);  // 0 to 30 mm
    const auto g = recon::tgcGainDb(tp, 0, 5, z);
    const double l0 = 20 * std::log10(amp[0]);
    for (size_t i = 0; i < z.size(); ++i) {
        const auto l = core::dacLevel(c, z[i]);
        ASSERT_TRUE(l);
        // An echo on the curve, after this gain, has the shallowest hole's level.
        EXPECT_NEAR(l->level_db + g[i], l0, 1e-4) << "at " << z[i] * 1e3 << " mm";
    }
    // At the holes themselves: gains 0, 20 log10(1/0.62) = 4.152, 20 log10(1/0.45) = 6.936,
    // 20 log10(1/0.30) = 10.458 dB (derived).
    const auto gh = recon::tgcGainDb(tp, 0, 5, {5e-3, 10e-3, 15e-3, 20e-3});
    EXPECT_NEAR(gh[0], 0.0, 1e-4);
    EXPECT_NEAR(gh[1], 4.1521, 1e-4);
    EXPECT_NEAR(gh[2], 6.9357, 1e-4);
    EXPECT_NEAR(gh[3], 10.4576, 1e-4);
}
