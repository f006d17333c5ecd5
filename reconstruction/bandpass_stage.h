// SPDX-License-Identifier: MIT
#pragma once
// Band-pass filter stage: an optional zero-phase filter applied in the frequency domain,
// fused with the analytic-signal FFT (the weights multiply the spectrum of each trace).
#include <cstddef>
#include <utility>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon {

/// Automatic edges: the probe's -6 dB band is f0 (1 -/+ B/2) (B = -6 dB fractional bandwidth);
/// the filter's -6 dB edges sit this fraction of the probe's half band outside it, i.e. at
/// f0 (1 -/+ (1 + margin) B/2) = f0 (1 -/+ B): where a Gaussian echo spectrum is 24 dB down, so
/// the probe's band lies in the filter's flat part and a Gaussian echo loses about 0.2 dB.
inline constexpr double kBandpassMargin = 1.0;
/// Lowest automatic low edge, as a fraction of f0 (wide-band probes: DC and drift stay out).
inline constexpr double kBandpassMinLowFraction = 0.1;

struct BandpassParams {
    bool enabled = true;  ///< apply the filter; default on (off: the traces are used as recorded)
    double low_mhz = 0;   ///< lower -6 dB edge, MHz; default 0 = automatic: max(f0 (1 - B), 0.1 f0)
    double high_mhz = 0;  ///< upper -6 dB edge, MHz; default 0 = automatic: f0 (1 + B)
};

/// The -6 dB edges (Hz) the parameters give for a probe of centre f0_hz and -6 dB fractional
/// bandwidth B. Throws SettingError when low >= high.
std::pair<double, double> bandpassEdgesHz(const BandpassParams& p, double f0_hz, double fractional_bandwidth);

/// Declaration of the "bandpass" stage (enabled, low_mhz, high_mhz).
core::StageSpec bandpassSpec();
/// The stage's values from a recipe.
BandpassParams bandpassParams(const core::Recipe& r);

/// Zero-phase spectral weights for bins 0..n/2 of an n-point real FFT sampled at fs_hz.
/// Pass band [low, high] with raised-cosine edges a quarter of the pass width wide, centred
/// on the edges (weight 0.5, i.e. -6 dB, at low and high); the DC bin is always 0. f0_hz and
/// fractional_bandwidth give the automatic edges. Returns all ones when the filter is disabled.
/// Throws SettingError when low >= high.
std::vector<float> bandpassWeights(const BandpassParams& p, size_t n, double fs_hz, double f0_hz, double fractional_bandwidth);

/// Pure function: one real trace filtered with `weights` (from bandpassWeights for the trace's
/// length). Same length as the input; zero phase.
std::vector<float> bandpass(const std::vector<float>& trace, const std::vector<float>& weights);

}  // namespace umbra::recon
