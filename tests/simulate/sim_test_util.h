// SPDX-License-Identifier: MIT
#pragma once
// Helpers for the simulator tests: scene JSON building, an FFT-based analytic signal, and
// sub-sample peak location of an envelope.
#include <algorithm>
#include <cmath>
#include <complex>
#include <nlohmann/json.hpp>
#include <vector>

#include "reconstruction/simulate/scene.h"
#include "reconstruction/simulate/simulator.h"

namespace simtest {

using cd = std::complex<double>;

/// In-place radix-2 FFT (n a power of two); inverse when inv is true (scaled by 1/n).
inline void fft(std::vector<cd>& a, bool inv) {
    const size_t n = a.size();
    for (size_t i = 1, j = 0; i < n; ++i) {
        size_t bit = n >> 1;
        for (; j & bit; bit >>= 1) j ^= bit;
        j ^= bit;
        if (i < j) std::swap(a[i], a[j]);
    }
    for (size_t len = 2; len <= n; len <<= 1) {
        const double ang = 2 * M_PI / double(len) * (inv ? 1 : -1);
        const cd wl(std::cos(ang), std::sin(ang));
        for (size_t i = 0; i < n; i += len) {
            cd w(1);
            for (size_t j = 0; j < len / 2; ++j) {
                const cd u = a[i + j], v = a[i + j + len / 2] * w;
                a[i + j] = u + v;
                a[i + j + len / 2] = u - v;
                w *= wl;
            }
        }
    }
    if (inv)
        for (auto& x : a) x /= double(n);
}

inline size_t pow2(size_t n) {
    size_t p = 1;
    while (p < n) p <<= 1;
    return p;
}

/// Analytic-signal envelope |x + i H{x}| (frequency-domain Hilbert transform, zero padded).
inline std::vector<double> envelope(const float* x, size_t n) {
    const size_t m = pow2(2 * n);
    std::vector<cd> a(m);
    for (size_t i = 0; i < n; ++i) a[i] = x[i];
    fft(a, false);
    for (size_t k = 1; k < m / 2; ++k) a[k] *= 2.0;
    for (size_t k = m / 2 + 1; k < m; ++k) a[k] = 0;
    fft(a, true);
    std::vector<double> e(n);
    for (size_t i = 0; i < n; ++i) e[i] = std::abs(a[i]);
    return e;
}

struct Peak {
    double index = 0;      ///< sub-sample position
    double amplitude = 0;  ///< interpolated envelope peak
};

/// Peak of the envelope within [lo, hi): parabola through the log of the three samples around
/// the maximum (exact for a Gaussian envelope).
inline Peak envelopePeak(const std::vector<double>& e, size_t lo, size_t hi) {
    hi = std::min(hi, e.size() - 1);
    size_t i = std::max<size_t>(lo, 1);
    for (size_t k = std::max<size_t>(lo, 1); k < hi; ++k)
        if (e[k] > e[i]) i = k;
    const double a = std::log(e[i - 1]), b = std::log(e[i]), c = std::log(e[i + 1]);
    const double den = a - 2 * b + c;
    const double d = den != 0 ? 0.5 * (a - c) / den : 0.0;
    return {double(i) + d, std::exp(b - 0.25 * (a - c) * d)};
}

/// A minimal valid scene as JSON; tests edit it before parsing.
inline nlohmann::json baseScene() {
    return nlohmann::json::parse(R"JSON({
      "title": "test scene (synthetic)",
      "scenario": "unit_test",
      "seed": 7,
      "array": {"elements": 8, "pitch_mm": 0.6, "element_width_mm": 0.5,
                "centre_frequency_mhz": 5, "fractional_bandwidth": 0.6},
      "transmit": {"kind": "single_element"},
      "sampling": {"frequency_mhz": 50, "samples": 1200},
      "medium": {"speed_m_s": 5920}
    })JSON");
}

inline umbra::recon::sim::Scene scene(const nlohmann::json& j) { return umbra::recon::sim::parseScene(j.dump(), "test.json"); }

inline umbra::recon::sim::SimulatedCapture run(const nlohmann::json& j, unsigned threads = 2) {
    umbra::recon::sim::SimOptions o;
    o.threads = threads;
    o.created_utc = "2026-01-01T00:00:00Z";
    return umbra::recon::sim::simulate(scene(j), o);
}

/// Trace (frame, transmit, receive) of an in-memory capture.
inline const float* trace(const umbra::recon::sim::SimulatedCapture& c, size_t f, size_t t, size_t r) {
    return c.block(f, t) + r * c.header.samples;
}

}  // namespace simtest
