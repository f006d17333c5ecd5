// SPDX-License-Identifier: MIT
// −6 dB drop sizing against analytic widths.
//  * Gaussian blob A·exp(−x²/2σx² − z²/2σz²): the amplitude is 0.5·peak (−6.02 dB; ultrasonic
//    testing practice, common practice) at x = σ·sqrt(2 ln 2), so the −6 dB full width is 2·sqrt(2 ln 2)·σ
//    (= the FWHM of the Gaussian, since the image holds amplitude, not power).
//  * A rectangular plateau of value 1 over n pixels on a zero background: the level 0.5 lies
//    half-way between the last pixel of the plateau and the first outside, so the width is n
//    pixel steps exactly.
#include <gtest/gtest.h>

#include <cmath>

#include "core/drop_sizing.h"
#include "core/error.h"

using namespace umbra::core;

namespace {
struct Grid {
    std::vector<double> x, z;
    std::vector<float> a;
};
Grid grid(double x0, double dx, size_t nx, double z0, double dz, size_t nz) {
    Grid g;
    for (size_t i = 0; i < nx; ++i) g.x.push_back(x0 + dx * double(i));
    for (size_t i = 0; i < nz; ++i) g.z.push_back(z0 + dz * double(i));
    g.a.assign(nx * nz, 0.0f);
    return g;
}
}  // namespace

TEST(drop_sizing_test, gaussian_blob_width_is_two_sqrt_two_ln2_sigma) {
    // Pixel 0.05 mm (x) and 0.04 mm (z); blob off the pixel grid at (1.013, 20.017) mm.
    Grid g = grid(-5, 0.05, 201, 15, 0.04, 251);
    const double cx = 1.013, cz = 20.017, sx = 0.8, sz = 0.3;
    for (size_t iz = 0; iz < g.z.size(); ++iz)
        for (size_t ix = 0; ix < g.x.size(); ++ix) {
            const double dx = g.x[ix] - cx, dz = g.z[iz] - cz;
            g.a[iz * g.x.size() + ix] = float(3.0 * std::exp(-dx * dx / (2 * sx * sx) - dz * dz / (2 * sz * sz)));
        }
    const DropSizing s = dropSize(g.a, g.x, g.z, {-3, 17}, {4, 23});
    ASSERT_TRUE(s.found);
    EXPECT_FALSE(s.anyOpen());
    const double k = 2.0 * std::sqrt(2.0 * std::log(2.0));  // 2.35482
    // The level is half the peak PIXEL, which sits off the true centre by (ox, oz): along the row,
    // exp(−x²/2σx²) = 0.5·exp(−ox²/2σx²) gives the half-width sqrt(2σx² ln2 + ox²) (likewise in
    // z). Linear interpolation adds ≈ h²/8 · |f''/f'| per edge: < 3e-4 mm here.
    const double ox = s.peak_x_mm - cx, oz = s.peak_z_mm - cz;
    EXPECT_NEAR(s.lengthMm(), 2 * std::sqrt(2 * sx * sx * std::log(2.0) + ox * ox), 1e-3);
    EXPECT_NEAR(s.heightMm(), 2 * std::sqrt(2 * sz * sz * std::log(2.0) + oz * oz), 1e-3);
    // ... and within 2e-3 mm of the analytic 2·sqrt(2 ln 2)·σ.
    EXPECT_NEAR(s.lengthMm(), k * sx, 2e-3);
    EXPECT_NEAR(s.heightMm(), k * sz, 2e-3);
    EXPECT_NEAR(0.5 * (s.left_x_mm + s.right_x_mm), cx, 1e-3);
    EXPECT_NEAR(0.5 * (s.top_z_mm + s.bottom_z_mm), cz, 1e-3);
    EXPECT_NEAR(s.peak_x_mm, cx, 0.025 + 1e-9);
    EXPECT_NEAR(s.peak_z_mm, cz, 0.02 + 1e-9);

    // −20 dB (ratio 0.1): half-width σ·sqrt(2 ln 10).
    const DropSizing s20 = dropSize(g.a, g.x, g.z, {-4.9, 15.1}, {4.9, 24.9}, 0.1);
    EXPECT_NEAR(s20.lengthMm(), 2 * std::sqrt(2 * sx * sx * std::log(10.0) + ox * ox), 2e-3);
}

TEST(drop_sizing_test, rectangle_plateau_width_is_its_pixel_count) {
    Grid g = grid(0, 0.1, 100, 10, 0.2, 50);
    // Plateau over x pixels 30..44 (15 pixels) and z pixels 20..27 (8 pixels).
    for (size_t iz = 20; iz <= 27; ++iz)
        for (size_t ix = 30; ix <= 44; ++ix) g.a[iz * 100 + ix] = 1.0f;
    const DropSizing s = dropSize(g.a, g.x, g.z, {1.0, 12.0}, {9.0, 18.0});
    ASSERT_TRUE(s.found);
    EXPECT_NEAR(s.lengthMm(), 15 * 0.1, 1e-9);
    EXPECT_NEAR(s.heightMm(), 8 * 0.2, 1e-9);
    EXPECT_NEAR(s.left_x_mm, 2.95, 1e-9);   // half-way between pixel 29 (2.9) and 30 (3.0)
    EXPECT_NEAR(s.bottom_z_mm, 15.5, 1e-9); // half-way between pixel 27 (15.4) and 28 (15.6)
}

TEST(drop_sizing_test, peak_is_the_one_inside_the_box_and_open_edges_are_flagged) {
    Grid g = grid(0, 0.1, 100, 0, 0.1, 100);
    for (size_t iz = 0; iz < 100; ++iz)
        for (size_t ix = 0; ix < 100; ++ix) g.a[iz * 100 + ix] = 0.01f;
    g.a[50 * 100 + 80] = 10.0f;  // strong echo outside the box
    for (size_t ix = 10; ix <= 40; ++ix) g.a[30 * 100 + ix] = 2.0f;  // long, thin indication
    // Box from x = 2.0 to 3.0 mm cuts the indication: both lateral edges are open.
    const DropSizing s = dropSize(g.a, g.x, g.z, {2.0, 2.0}, {3.0, 4.0});
    ASSERT_TRUE(s.found);
    EXPECT_FLOAT_EQ(float(s.peak_value), 2.0f);
    EXPECT_EQ(s.peak_iz, 30u);
    EXPECT_TRUE(s.left_open);
    EXPECT_TRUE(s.right_open);
    EXPECT_FALSE(s.top_open);
    // One pixel high on a 0.01 background: level 1.0 lies (2 − 1)/(2 − 0.01) of a step out on each side.
    const double h = 2 * 0.1 * (1.0 / 1.99);
    EXPECT_NEAR(s.heightMm(), h, 1e-6);

    EXPECT_FALSE(dropSize(g.a, g.x, g.z, {20, 20}, {30, 30}).found);  // box outside the image
    EXPECT_THROW(dropSize(g.a, g.x, g.z, {0, 0}, {1, 1}, 1.5), SettingError);
    EXPECT_THROW(dropSize(std::vector<float>(3), g.x, g.z, {0, 0}, {1, 1}), SettingError);
}
