// SPDX-License-Identifier: MIT
// Analytic-signal stage against scipy.signal.hilbert and against the Bedrosian envelope of a
// Gaussian-modulated cosine.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <random>

#include "recon_test_util.h"
#include "reconstruction/analytic_stage.h"
#include "reconstruction/bandpass_stage.h"

using namespace umbra;

// Hilbert transform and Bedrosian theorem (derived): exp(-t^2/2 sigma^2) cos(2 pi f0 t) has analytic envelope
// exp(-t^2/2 sigma^2) within 1e-4 for fractional bandwidth <= 0.6 (Bedrosian theorem).
TEST(hilbert_test, gaussian_pulse_envelope_matches_bedrosian) {
    const double f0 = 5e6, fs = 50e6, B = 0.6, sig = testutil::sigmaFor(f0, B);
    const size_t n = 1000;
    std::vector<float> x(n);
    std::vector<double> env(n);
    for (size_t k = 0; k < n; ++k) {
        const double t = (double(k) - 500.3) / fs;
        env[k] = std::exp(-t * t / (2 * sig * sig));
        x[k] = float(env[k] * std::cos(2 * M_PI * f0 * t));
    }
    const auto a = recon::analyticSignal(x);
    double worst = 0;
    for (size_t k = 0; k < n; ++k) worst = std::max(worst, std::fabs(std::abs(a[k]) - env[k]));
    EXPECT_LT(worst, 1e-4);
}

// The envelope |analytic| agrees with scipy.signal.hilbert (Debian's /usr/bin/python3) on the
// same band-limited noise within 1e-3 relative to the peak; odd and even lengths.
TEST(hilbert_test, envelope_matches_scipy_signal_hilbert) {
    for (size_t n : {777u, 1024u}) {
        std::mt19937 rng(7);
        std::normal_distribution<float> g;
        std::vector<float> x(n);
        for (auto& v : x) v = g(rng);
        // band-limit so the envelope is smooth
        x = recon::bandpass(x, recon::bandpassWeights({true, 3, 7}, n, 50e6, 5e6, 0.6));
        const auto in = testutil::tempPath("hilbert_in_" + std::to_string(n) + ".txt");
        const auto out = testutil::tempPath("hilbert_out_" + std::to_string(n) + ".txt");
        {
            std::ofstream f(in);
            f.precision(9);
            for (float v : x) f << v << "\n";
        }
        const std::string cmd = "/usr/bin/python3 -c \"import numpy as np, scipy.signal as s; x = np.loadtxt('" + in +
                                "'); np.savetxt('" + out + "', np.abs(s.hilbert(x)), fmt='%.9e')\"";
        ASSERT_EQ(std::system(cmd.c_str()), 0) << "needs Debian's /usr/bin/python3 with numpy and scipy: " << cmd;
        std::ifstream f(out);
        std::vector<double> ref;
        double v;
        while (f >> v) ref.push_back(v);
        ASSERT_EQ(ref.size(), n);
        const auto a = recon::analyticSignal(x);
        double peak = 0, worst = 0;
        for (size_t k = 0; k < n; ++k) peak = std::max(peak, ref[k]);
        for (size_t k = 0; k < n; ++k) worst = std::max(worst, std::fabs(std::abs(a[k]) - ref[k]));
        EXPECT_LT(worst / peak, 1e-3) << "n = " << n;
        EXPECT_GT(peak, 0);
    }
}

// Band-pass weights: -6 dB (0.5) at the edges, 1 in the middle of the band, 0 far outside.
// Zero-phase filter definition (common practice).
TEST(hilbert_test, bandpass_edges_are_minus_6db) {
    const size_t n = 1000;
    const double fs = 50e6;
    const auto w = recon::bandpassWeights({true, 2, 8}, n, fs, 5e6, 0.6);
    auto at = [&](double f) { return w[size_t(std::lround(f / fs * n))]; };
    EXPECT_NEAR(at(2e6), 0.5, 1e-6);
    EXPECT_NEAR(at(8e6), 0.5, 1e-6);
    EXPECT_NEAR(at(5e6), 1.0, 1e-6);
    EXPECT_NEAR(at(0.5e6), 0.0, 1e-6);
    EXPECT_NEAR(at(15e6), 0.0, 1e-6);
    EXPECT_THROW(recon::bandpassWeights({true, 8, 2}, n, fs, 5e6, 0.6), core::SettingError);
}
