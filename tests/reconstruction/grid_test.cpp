// SPDX-License-Identifier: MIT
// Automatic image region. Expected values are worked by hand from the capture's timing:
// recorded depth = (start time + samples / fs) c / 2 (pulse-echo), and the rule of
// docs/reconstruction.md for a medium of known thickness d: 0 to min(recorded depth, 1.15 d).
#include <gtest/gtest.h>

#include "recon_test_util.h"
#include "reconstruction/grid_stage.h"
#include "reconstruction/pipeline.h"

using namespace umbra;

namespace {
// 64 elements at 0.6 mm pitch, 5920 m/s, 50 MHz, 1000 samples: recorded depth
// 1000 / 50e6 * 5920 / 2 = 59.2 mm (the weld-coupon demo's layout).
core::CaptureHeader steelHeader() {
    testutil::SynthSpec s;
    s.pitch = 0.6e-3;
    s.c = 5920;
    s.fs = 50e6;
    s.samples = 1000;
    return testutil::makeHeader(s);
}
}  // namespace

TEST(grid_test, automatic_depth_is_the_recorded_range_without_a_thickness) {
    const auto h = steelHeader();
    const auto g = recon::resolveGrid(h, recon::defaultRecipe());
    EXPECT_NEAR(g.z_min_m, 0.0, 1e-12);
    EXPECT_NEAR(g.z_max_m, 59.2e-3, 1e-9);
    EXPECT_NEAR(g.x_min_m, -31.5 * 0.6e-3, 1e-12);
    EXPECT_NEAR(g.x_max_m, 31.5 * 0.6e-3, 1e-12);
}

TEST(grid_test, automatic_depth_stops_a_margin_below_the_back_wall) {
    auto h = steelHeader();
    h.medium.thickness_m = 20e-3;  // 20 mm plate: 0 to 1.15 x 20 = 23 mm, back-wall repeat at 40 mm left out
    auto g = recon::resolveGrid(h, recon::defaultRecipe());
    EXPECT_NEAR(g.z_min_m, 0.0, 1e-12);
    EXPECT_NEAR(g.z_max_m, 23.0e-3, 1e-9);
    EXPECT_LT(g.z_max_m, 2 * *h.medium.thickness_m);

    h.medium.thickness_m = 60e-3;  // thicker than the recording reaches: the recorded depth wins
    g = recon::resolveGrid(h, recon::defaultRecipe());
    EXPECT_NEAR(g.z_max_m, 59.2e-3, 1e-9);

    h.receive.start_time_s.assign(h.transmits(), 4e-6);  // late start (11.84 mm): region still from the surface
    h.medium.thickness_m = 20e-3;
    g = recon::resolveGrid(h, recon::defaultRecipe());
    EXPECT_NEAR(g.z_min_m, 0.0, 1e-12);
    EXPECT_NEAR(g.z_max_m, 23.0e-3, 1e-9);
}

TEST(grid_test, a_user_region_overrides_the_thickness_rule) {
    auto h = steelHeader();
    h.medium.thickness_m = 20e-3;
    auto r = recon::defaultRecipe();
    r.setNumber("grid.z_min_mm", 0);
    r.setNumber("grid.z_max_mm", 45);  // to see the first back-wall repeat at 40 mm
    const auto g = recon::resolveGrid(h, r);
    EXPECT_NEAR(g.z_max_m, 45e-3, 1e-12);
}
