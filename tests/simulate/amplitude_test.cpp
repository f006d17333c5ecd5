// SPDX-License-Identifier: MIT
// Amplitudes: element directivity (soft-baffled strip: Selfridge, Kino & Khuri-Yakub,
// Appl. Phys. Lett. 37 (1980): D = sinc(pi w sin(theta)/lambda) cos(theta)), attenuation
// (one-way coefficient in dB/cm/MHz applied over the round trip at f0), 2-D cylindrical spreading.
#include <gtest/gtest.h>

#include "sim_test_util.h"

using namespace simtest;

namespace {
double peakOf(const umbra::recon::sim::SimulatedCapture& cap, size_t t, size_t r) {
    auto env = envelope(trace(cap, 0, t, r), cap.header.samples);
    return envelopePeak(env, 1, cap.header.samples - 2).amplitude;
}
/// Written out here from the paper's formula, independent of the simulator's helper.
double softBaffleStrip(double theta, double w, double lambda) {
    const double u = M_PI * w * std::sin(theta) / lambda;
    return (u == 0 ? 1.0 : std::sin(u) / u) * std::cos(theta);
}
}  // namespace

// One wide element (2 mm at lambda = 1.184 mm, first null at asin(lambda/w) = 36.3 deg) and a
// point at the same 15 mm range at several angles: pulse-echo amplitude ratio = D(theta)^2.
TEST(amplitude_test, directivity_matches_soft_baffled_strip_at_several_angles) {
    const double lambda = 5920.0 / 5e6, w = 2e-3, R = 15e-3;
    double on_axis = 0;
    for (double deg : {0.0, 10.0, 20.0, 30.0, 45.0, 60.0}) {
        auto j = baseScene();
        j["array"]["elements"] = 1;
        j["array"]["pitch_mm"] = 2;
        j["array"]["element_width_mm"] = 2;
        const double th = deg * M_PI / 180;
        j["reflectors"]["points"] = {{{"position_mm", {R * std::sin(th) * 1e3, 0, R * std::cos(th) * 1e3}}, {"amplitude", 1}}};
        auto cap = run(j);
        const double a = peakOf(cap, 0, 0);
        if (deg == 0) { on_axis = a; continue; }
        const double d = softBaffleStrip(th, w, lambda);
        EXPECT_NEAR(a / on_axis, d * d, 2e-3) << deg << " deg";
    }
}

// Common practice (convention): alpha in dB/cm/MHz one way; a round trip to depth z loses
// 2 alpha f0 z dB. 0.5 dB/cm/MHz, 5 MHz, z = 30 mm -> 15 dB -> amplitude ratio 0.1778.
TEST(amplitude_test, attenuation_reduces_amplitude_by_stated_db_per_cm_per_mhz) {
    auto j = baseScene();
    j["array"]["elements"] = 1;
    j["medium"]["speed_m_s"] = 1540;
    j["sampling"]["frequency_mhz"] = 40;
    j["sampling"]["samples"] = 2048;
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 30}}, {"amplitude", 1}}};
    const double a0 = peakOf(run(j), 0, 0);
    j["medium"]["attenuation_db_per_cm_mhz"] = 0.5;
    const double a1 = peakOf(run(j), 0, 0);
    EXPECT_NEAR(20 * std::log10(a1 / a0), -15.0, 0.05);
    EXPECT_NEAR(a1 / a0, 0.1778, 0.001);
}

// 2-D cylindrical spreading, sqrt(r_ref/r) per leg: doubling the range halves the pulse-echo
// amplitude; a point of amplitude 1 at 10 mm on axis gives a peak of 1 (r_ref = 10 mm).
TEST(amplitude_test, cylindrical_spreading_one_over_sqrt_r_per_leg) {
    auto j = baseScene();
    j["array"]["elements"] = 1;
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 10}}, {"amplitude", 1}}};
    const double a10 = peakOf(run(j), 0, 0);
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 20}}, {"amplitude", 1}}};
    const double a20 = peakOf(run(j), 0, 0);
    EXPECT_NEAR(a10, 1.0, 1e-3);
    EXPECT_NEAR(a20 / a10, 0.5, 1e-3);
}

// Noise rms = reference / 10^(SNR/20), band-limited to the pulse band.
TEST(amplitude_test, noise_rms_follows_snr_relative_to_back_wall) {
    auto j = baseScene();
    j["medium"]["thickness_mm"] = 20;
    j["reflectors"]["back_wall"] = {{"repeats", 0}};
    j["noise"] = {{"snr_db", 30}, {"reference", "back_wall"}};
    j["sampling"]["samples"] = 1024;
    auto cap = run(j);
    // Back wall of the element at the array centre (index 4): 2-D spreading over 40 mm -> sqrt(10/40).
    const double ref = std::sqrt(10.0 / 40.0);
    double e2 = 0;
    size_t n = 0;
    for (size_t t = 0; t < 8; ++t)
        for (size_t r = 0; r < 8; ++r) {
            const float* x = trace(cap, 0, t, r);
            for (size_t k = 20; k < 250; ++k) { e2 += double(x[k]) * x[k]; ++n; }  // before any echo
        }
    const double rms = std::sqrt(e2 / double(n));
    EXPECT_NEAR(rms, ref / std::pow(10.0, 30 / 20.0), 0.05 * ref / std::pow(10.0, 30 / 20.0));
    // Band-limited: most of its power lies within f0 +- B f0 (Gaussian band, sigma_f = B f0 / 2.355).
    // Noise-only part of every trace (before the back wall), power spectra summed.
    std::vector<double> psd(128, 0.0);
    for (size_t t = 0; t < 8; ++t)
        for (size_t r = 0; r < 8; ++r) {
            const float* x = trace(cap, 0, t, r);
            std::vector<cd> a(256);
            for (size_t k = 0; k < 256; ++k) a[k] = x[k + 20];
            fft(a, false);
            for (size_t k = 0; k < 128; ++k) psd[k] += std::norm(a[k]);
        }
    double in = 0, all = 0;
    for (size_t k = 1; k < 128; ++k) {
        const double f = double(k) * 50e6 / 256, p = psd[k];
        all += p;
        if (std::abs(f - 5e6) < 0.6 * 5e6) in += p;
    }
    EXPECT_GT(in / all, 0.95);
}

// Reciprocity (derived: every path model here is symmetric in source and receiver): in a
// full-matrix capture trace (t, r) equals trace (r, t) for points, holes and the back wall.
TEST(amplitude_test, full_matrix_capture_is_reciprocal) {
    auto j = baseScene();
    j["medium"]["thickness_mm"] = 15;
    j["medium"]["attenuation_db_per_cm_mhz"] = 0.1;
    j["reflectors"]["back_wall"] = {{"repeats", 1}};
    j["reflectors"]["points"] = {{{"position_mm", {1.1, 0, 6}}, {"amplitude", 1}}};
    j["reflectors"]["side_drilled_holes"] = {{{"centre_mm", {-1.5, 10}}, {"diameter_mm", 2}}};
    auto cap = run(j);
    float peak = 0, worst = 0;
    for (size_t t = 0; t < 8; ++t)
        for (size_t r = 0; r < 8; ++r) {
            const float* a = trace(cap, 0, t, r);
            const float* b = trace(cap, 0, r, t);
            for (size_t k = 0; k < cap.header.samples; ++k) {
                peak = std::max(peak, std::abs(a[k]));
                worst = std::max(worst, std::abs(a[k] - b[k]));
            }
        }
    EXPECT_GT(peak, 0.1f);
    EXPECT_LT(worst, 1e-5f * peak);
}
