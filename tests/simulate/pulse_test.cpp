// SPDX-License-Identifier: MIT
// The simulated pulse: -6 dB bandwidth, -6 dB duration and envelope against the analytic
// Gaussian (derived: Gaussian Fourier pair; Hilbert transform and Bedrosian theorem).
#include <gtest/gtest.h>

#include "reconstruction/simulate/pulse.h"
#include "sim_test_util.h"

using namespace simtest;
using umbra::recon::sim::GaussianPulse;

namespace {
/// Pulse-echo trace of one element from one point on axis; no attenuation, noise or wall.
umbra::recon::sim::SimulatedCapture onePoint(double bw, double z_mm = 10) {
    auto j = baseScene();
    j["array"]["elements"] = 1;
    j["array"]["fractional_bandwidth"] = bw;
    j["sampling"]["samples"] = 1024;
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, z_mm}}, {"amplitude", 1}}};
    return run(j);
}

/// -6 dB fractional bandwidth of a trace from its amplitude spectrum (FFT, zero padded 16x,
/// band edges by linear interpolation).
double measuredFractionalBandwidth(const float* x, size_t n, double fs) {
    const size_t m = pow2(n) * 16;
    std::vector<cd> a(m);
    for (size_t i = 0; i < n; ++i) a[i] = x[i];
    fft(a, false);
    std::vector<double> mag(m / 2);
    for (size_t k = 0; k < m / 2; ++k) mag[k] = std::abs(a[k]);
    const size_t kp = size_t(std::max_element(mag.begin(), mag.end()) - mag.begin());
    const double half = 0.5 * mag[kp];
    size_t lo = kp, hi = kp;
    while (lo > 0 && mag[lo] > half) --lo;
    while (hi + 1 < mag.size() && mag[hi] > half) ++hi;
    const double flo = double(lo) + (half - mag[lo]) / (mag[lo + 1] - mag[lo]);
    const double fhi = double(hi - 1) + (mag[hi - 1] - half) / (mag[hi - 1] - mag[hi]);
    const double df = fs / double(m);
    const double f_centre = 0.5 * (flo + fhi) * df;
    return (fhi - flo) * df / f_centre;
}
}  // namespace

// Derived from the Gaussian Fourier pair: T(-6 dB) = 4 ln2 / (pi B f0); 5 MHz, B 0.6 -> 0.294 us.
TEST(pulse_test, minus6db_duration_matches_gaussian_fourier_pair) {
    GaussianPulse p(5e6, 0.6);
    const double t6 = 2 * p.sigma() * std::sqrt(2 * std::log(2.0));
    EXPECT_NEAR(t6, 4 * std::log(2.0) / (M_PI * 0.6 * 5e6), 1e-3 * t6);
    EXPECT_NEAR(t6 * 1e6, 0.294, 1e-3);
    // The envelope really is half its peak there.
    EXPECT_NEAR(p.envelope(t6 / 2), 0.5, 1e-12);
}

// Requirement: the -6 dB bandwidth of the simulated pulse equals the requested fraction within
// 5 % (FFT of a simulated trace; the spectrum of a Gaussian-modulated cosine is Gaussian).
TEST(pulse_test, simulated_minus6db_bandwidth_matches_request_within_5_percent) {
    for (double bw : {0.4, 0.6, 0.7, 1.0}) {
        auto cap = onePoint(bw);
        const double got = measuredFractionalBandwidth(trace(cap, 0, 0, 0), cap.header.samples, 50e6);
        EXPECT_NEAR(got, bw, 0.05 * bw) << "requested " << bw;
    }
}

// Derived (Hilbert transform and Bedrosian theorem): the analytic envelope of
// exp(-t^2/2s^2) cos(2 pi f0 t) is the Gaussian within 1e-4 of the peak for B <= 0.6, about
// 1 % at B = 1.0. The simulated echo of a point must match A exp(-(t - tau)^2 / 2 s^2).
TEST(pulse_test, envelope_matches_analytic_gaussian) {
    const double c = 5920, z = 10e-3, fs = 50e6;
    for (double bw : {0.3, 0.6, 1.0}) {
        auto cap = onePoint(bw);
        const float* x = trace(cap, 0, 0, 0);
        auto env = envelope(x, cap.header.samples);
        GaussianPulse p(5e6, bw);
        const double tau = 2 * z / c;
        // Amplitude from the model: on axis D = 1, 2-D spreading (10 mm / r) over two legs of 10 mm.
        const double A = 1.0;
        double worst = 0;
        for (size_t k = 0; k < cap.header.samples; ++k) {
            const double t = double(k) / fs;
            worst = std::max(worst, std::abs(env[k] - A * p.envelope(t - tau)));
        }
        if (bw <= 0.6) EXPECT_LT(worst, 1e-4 * A) << "B = " << bw;
        else EXPECT_LT(worst, 0.02 * A) << "B = " << bw;  // ~1 % expected at B = 1.0
    }
}

// The pulse table's blend of neighbouring delay fractions stays within its stated bound
// (2 pi f_max / (M fs))^2 / 8 of the exact pulse evaluated at the exact time.
TEST(pulse_test, tabulated_pulse_matches_exact_evaluation) {
    GaussianPulse p(5e6, 0.6);
    umbra::recon::sim::PulseTable tab(p, 50e6);
    const double fmax = 5e6 * (1 + 0.6);
    const double bound = std::pow(2 * M_PI * fmax / (tab.fractions() * 50e6), 2) / 8 + 1e-6;  // + float rounding
    for (double delay : {100.0, 100.37, 100.5, 100.999, 101.0 / 3.0 + 60}) {
        std::vector<float> tr(300, 0.0f);
        tab.add(tr.data(), 300, delay, 1.0f);
        double worst = 0;
        for (int k = 0; k < 300; ++k) worst = std::max(worst, std::abs(tr[size_t(k)] - p((k - delay) / 50e6)));
        EXPECT_LT(worst, bound) << "delay " << delay;
    }
}
