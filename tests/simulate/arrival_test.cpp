// SPDX-License-Identifier: MIT
// Arrival times of direct, back-wall and side-drilled-hole echoes against path / c
// (time of flight, the delay law of the total focusing method: Holmes, Drinkwater & Wilcox,
// NDT&E Int. 38 (2005); plane waves: Montaldo et al., IEEE TUFFC 56(3) 2009), found by the
// analytic-envelope peak with sub-sample (log-parabola) interpolation. Tolerance 0.1 sample.
#include <gtest/gtest.h>

#include "sim_test_util.h"

using namespace simtest;

namespace {
constexpr double kC = 5920, kFs = 50e6;

std::vector<double> elementX(int n, double pitch) {
    std::vector<double> x;
    for (int i = 0; i < n; ++i) x.push_back((i - (n - 1) / 2.0) * pitch);
    return x;
}

/// Sample index of the envelope peak nearest `expected` (searched within +-40 samples).
double arrival(const float* tr, size_t n, double expected) {
    auto env = envelope(tr, n);
    const size_t lo = size_t(std::max(1.0, expected - 40)), hi = size_t(std::min(double(n - 2), expected + 40));
    return envelopePeak(env, lo, hi).index;
}
}  // namespace

TEST(arrival_test, point_echo_arrives_at_tx_plus_rx_path_over_c_within_0_1_sample) {
    auto j = baseScene();
    j["reflectors"]["points"] = {{{"position_mm", {1.3, 0, 9.7}}, {"amplitude", 1}}};
    auto cap = run(j);
    const auto ex = elementX(8, 0.6e-3);
    const double px = 1.3e-3, pz = 9.7e-3;
    for (size_t t = 0; t < 8; ++t)
        for (size_t r = 0; r < 8; ++r) {
            const double path = std::hypot(px - ex[t], pz) + std::hypot(px - ex[r], pz);
            const double expected = path / kC * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, expected), expected, 0.1) << "tx " << t << " rx " << r;
        }
}

TEST(arrival_test, back_wall_echo_at_2_thickness_over_c_and_repeat_at_4_thickness) {
    auto j = baseScene();
    j["medium"]["thickness_mm"] = 12.5;
    j["reflectors"]["back_wall"] = {{"repeats", 1}};
    auto cap = run(j);
    const auto ex = elementX(8, 0.6e-3);
    const double T = 12.5e-3;
    for (size_t t = 0; t < 8; t += 3)
        for (size_t r = 0; r < 8; ++r) {
            const double dx = ex[r] - ex[t];
            const double e1 = std::hypot(dx, 2 * T) / kC * kFs;  // image source at depth 2T
            const double e2 = std::hypot(dx, 4 * T) / kC * kFs;  // first repeat (double round trip)
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, e1), e1, 0.1) << "tx " << t << " rx " << r;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, e2), e2, 0.1) << "repeat, tx " << t << " rx " << r;
        }
    // Pulse-echo: exactly 2T/c.
    EXPECT_NEAR(arrival(trace(cap, 0, 3, 3), cap.header.samples, 2 * T / kC * kFs), 2 * T / kC * kFs, 0.1);
}

// The echo of a side-drilled hole comes from its near surface: pulse-echo path 2(|C - e| - a);
// pitch-catch path min over the circle of |S - P| + |P - R| (found here by brute force).
TEST(arrival_test, side_drilled_hole_echo_comes_from_near_surface) {
    auto j = baseScene();
    j["reflectors"]["side_drilled_holes"] = {{{"centre_mm", {-0.8, 10}}, {"diameter_mm", 2.5}}};
    auto cap = run(j);
    const auto ex = elementX(8, 0.6e-3);
    const double cx = -0.8e-3, cz = 10e-3, a = 1.25e-3;
    for (size_t t = 0; t < 8; t += 2)
        for (size_t r = 0; r < 8; ++r) {
            double best = 1e9;
            for (int k = 0; k < 200000; ++k) {
                const double phi = 2 * M_PI * k / 200000.0;
                const double x = cx + a * std::cos(phi), z = cz + a * std::sin(phi);
                best = std::min(best, std::hypot(x - ex[t], z) + std::hypot(x - ex[r], z));
            }
            const double expected = best / kC * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, expected), expected, 0.1) << "tx " << t << " rx " << r;
            if (t == r) {
                EXPECT_NEAR(best, 2 * (std::hypot(cx - ex[t], cz) - a), 1e-9);
            }
            // Not the centre: the centre would be 2a/c later.
            EXPECT_GT(std::hypot(cx - ex[t], cz) + std::hypot(cx - ex[r], cz) - best, 1.9 * a);
        }
}

// Plane wave at angle a: time zero when the wavefront passes the origin, transmit delay
// (z cos a + x sin a)/c (Montaldo et al. 2009), plus the receive path.
TEST(arrival_test, plane_wave_echo_follows_montaldo_delay) {
    auto j = baseScene();
    j["transmit"] = {{"kind", "plane_wave"}, {"angles_deg", {-10, 0, 7.5}}};
    j["reflectors"]["points"] = {{{"position_mm", {0.7, 0, 11}}, {"amplitude", 1}}};
    auto cap = run(j);
    const auto ex = elementX(8, 0.6e-3);
    const double angles[3] = {-10, 0, 7.5};
    for (size_t t = 0; t < 3; ++t) {
        const double a = angles[t] * M_PI / 180;
        for (size_t r = 0; r < 8; ++r) {
            const double path = 11e-3 * std::cos(a) + 0.7e-3 * std::sin(a) + std::hypot(0.7e-3 - ex[r], 11e-3);
            const double expected = path / kC * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, expected), expected, 0.1) << "angle " << angles[t];
        }
    }
}

// Diverging virtual source v (z < 0), time zero at the origin: (|r - v| - |v|)/c + receive path.
TEST(arrival_test, virtual_source_echo_referenced_to_origin) {
    auto j = baseScene();
    j["transmit"] = {{"kind", "virtual_source"}, {"sources_mm", {{0, 0, -5}, {1.5, 0, -8}}}};
    j["reflectors"]["points"] = {{{"position_mm", {0.4, 0, 12}}, {"amplitude", 1}}};
    auto cap = run(j);
    const auto ex = elementX(8, 0.6e-3);
    const double vs[2][2] = {{0, -5e-3}, {1.5e-3, -8e-3}};
    for (size_t t = 0; t < 2; ++t)
        for (size_t r = 0; r < 8; ++r) {
            const double path = std::hypot(0.4e-3 - vs[t][0], 12e-3 - vs[t][1]) - std::hypot(vs[t][0], vs[t][1]) + std::hypot(0.4e-3 - ex[r], 12e-3);
            const double expected = path / kC * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, expected), expected, 0.1) << "source " << t;
        }
}

// start_time_s shifts the samples: sample k is at start + k/fs.
TEST(arrival_test, start_time_shifts_sample_zero) {
    auto j = baseScene();
    j["sampling"]["start_time_us"] = 1.5;
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 10}}, {"amplitude", 1}}};
    auto cap = run(j);
    const double ex0 = -3.5 * 0.6e-3;
    const double expected = (2 * std::hypot(ex0, 10e-3) / kC - 1.5e-6) * kFs;
    EXPECT_NEAR(arrival(trace(cap, 0, 0, 0), cap.header.samples, expected), expected, 0.1);
    EXPECT_DOUBLE_EQ(cap.header.receive.start_time_s[0], 1.5e-6);
}

// Plane wave on the back wall (image of the plane wave across z = T): (2T cos a + x_r sin a)/c;
// and on a side-drilled hole: min over the circle of (z cos a + x sin a) + |P - receiver|.
TEST(arrival_test, plane_wave_back_wall_and_hole_follow_the_same_delay_convention) {
    auto j = baseScene();
    j["array"]["elements"] = 32;
    j["transmit"] = {{"kind", "plane_wave"}, {"angles_deg", {-8, 5}}};
    j["medium"]["thickness_mm"] = 15;
    j["reflectors"]["back_wall"] = {{"repeats", 0}};
    j["reflectors"]["side_drilled_holes"] = {{{"centre_mm", {0.5, 7}}, {"diameter_mm", 2}}};
    auto cap = run(j);
    const auto ex = elementX(32, 0.6e-3);
    const double angles[2] = {-8, 5}, T = 15e-3, cx = 0.5e-3, cz = 7e-3, a = 1e-3;
    size_t checked = 0;
    for (size_t t = 0; t < 2; ++t) {
        const double al = angles[t] * M_PI / 180;
        for (size_t r = 0; r < 32; r += 5) {
            // Only receivers the reflected plane wave reaches: its ray left the array at
            // x_r - 2T tan(a), which must lie inside the aperture (with a few wavelengths' margin).
            if (std::abs(ex[r] - 2 * T * std::tan(al)) > 9.6e-3 - 3 * 1.184e-3) continue;
            ++checked;
            const double wall = (2 * T * std::cos(al) + ex[r] * std::sin(al)) / kC * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, wall), wall, 0.1) << "wall, angle " << angles[t];
            double best = 1e9;
            for (int k = 0; k < 200000; ++k) {
                const double phi = 2 * M_PI * k / 200000.0;
                const double x = cx + a * std::cos(phi), z = cz + a * std::sin(phi);
                best = std::min(best, z * std::cos(al) + x * std::sin(al) + std::hypot(x - ex[r], z));
            }
            const double hole = best / kC * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, hole), hole, 0.1) << "hole, angle " << angles[t];
        }
    }
    EXPECT_GE(checked, 6u);
}
