// SPDX-License-Identifier: MIT
// What a simulated capture carries besides traces: synthetic provenance, truth (hole centres,
// points), scan positions for encoded frames, times for cine, and a header that passes the
// format v1 checks.
#include <gtest/gtest.h>

#include "core/error.h"
#include "sim_test_util.h"

using namespace simtest;

TEST(capture_content_test, header_is_valid_and_labelled_synthetic) {
    auto j = baseScene();
    j["reflectors"]["side_drilled_holes"] = {{{"centre_mm", {1, 10}}, {"diameter_mm", 2.5}}};
    j["reflectors"]["points"] = {{{"position_mm", {0, 0.5, 5}}, {"amplitude", 0.7}}};
    j["frames"] = {{"kind", "encoded"}, {"count", 3}, {"start_mm", -1}, {"step_mm", 1}};
    auto sc = scene(j);
    auto h = umbra::recon::sim::makeHeader(sc);
    EXPECT_TRUE(umbra::core::checkHeader(h).empty());
    EXPECT_TRUE(h.isSynthetic());
    EXPECT_EQ(h.provenance.at("data"), "synthetic demonstration data");
    EXPECT_EQ(h.provenance.at("scenario"), "unit_test");
    ASSERT_TRUE(h.scan);
    ASSERT_EQ(h.scan->position_m.size(), 3u);
    EXPECT_DOUBLE_EQ(h.scan->position_m[2], 1e-3);
    ASSERT_TRUE(h.truth);
    ASSERT_EQ(h.truth->scatterer_position_m.size(), 2u);
    EXPECT_DOUBLE_EQ(h.truth->scatterer_position_m[1][0], 1e-3);  // hole centre, not its surface
    EXPECT_DOUBLE_EQ(h.truth->scatterer_position_m[1][2], 10e-3);
    EXPECT_DOUBLE_EQ(h.truth->scatterer_amplitude[0], 0.7);
}

// An encoded scan sees a flaw only in the frames within its y extent (elevation beam 2 mm).
TEST(capture_content_test, flaw_appears_only_within_its_y_extent) {
    auto j = baseScene();
    j["sampling"]["samples"] = 600;
    j["reflectors"]["planar_flaws"] = {{{"start_mm", {0, 8}}, {"end_mm", {0, 10}}, {"y_range_mm", {-2, 4}}}};
    j["frames"] = {{"kind", "encoded"}, {"count", 17}, {"start_mm", -8}, {"step_mm", 1}};
    auto cap = run(j);
    auto energy = [&](size_t f) {
        double e = 0;
        const float* b = cap.block(f, 3);
        for (size_t i = 0; i < cap.header.blockSize(); ++i) e += double(b[i]) * b[i];
        return e;
    };
    // Weight = fraction of a Gaussian beam profile (-6 dB full width 2 mm, sigma = 2 / 2.3548 mm)
    // falling on [-2, 4] mm: frame at y = 1 -> erf(3 / (sqrt(2) sigma)) = 0.9996; at y = -2 (an
    // end) -> 0.5, so energy ratio (0.5 / 0.9996)^2 = 0.2502; at y = -8 or 8 -> below 2e-6.
    const double inside = energy(9);  // y = 1 mm
    EXPECT_GT(inside, 0);
    EXPECT_LT(energy(0), 1e-9 * inside);   // y = -8 mm
    EXPECT_LT(energy(16), 1e-9 * inside);  // y = 8 mm
    EXPECT_NEAR(energy(6) / inside, 0.2502, 0.003);  // y = -2 mm
}

TEST(capture_content_test, cine_frames_have_times_and_move) {
    auto j = baseScene();
    j["sampling"]["samples"] = 600;
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 8}}, {"amplitude", 1}}};
    j["frames"] = {{"kind", "cine"}, {"count", 3}, {"interval_ms", 50}, {"velocity_mm_s", {0, 10}}};
    auto cap = run(j);
    ASSERT_TRUE(cap.header.scan);
    ASSERT_EQ(cap.header.scan->time_s.size(), 3u);
    EXPECT_DOUBLE_EQ(cap.header.scan->time_s[2], 0.1);
    // Frame 2: the point has moved 1 mm deeper -> pulse-echo delay grows by 2 mm / c.
    auto peakAt = [&](size_t f) {
        auto env = envelope(trace(cap, f, 4, 4), cap.header.samples);
        return envelopePeak(env, 1, cap.header.samples - 2).index;
    };
    const double x4 = 0.3e-3;
    EXPECT_NEAR(peakAt(0), 2 * std::hypot(x4, 8e-3) / 5920 * 50e6, 0.1);
    EXPECT_NEAR(peakAt(2), 2 * std::hypot(x4, 9e-3) / 5920 * 50e6, 0.1);
}
