// SPDX-License-Identifier: MIT
#pragma once
// Band-pass filter stage: an optional zero-phase filter applied in the frequency domain,
// fused with the analytic-signal FFT (the weights multiply the spectrum of each trace).
#include <cstddef>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon {

struct BandpassParams {
    bool enabled = false;  ///< apply the filter; default off (the traces are used as recorded)
    double low_mhz = 0;    ///< lower -6 dB edge, MHz; default 0 = f0 (1 - B) from the capture (>= 0)
    double high_mhz = 0;   ///< upper -6 dB edge, MHz; default 0 = f0 (1 + B) from the capture
};

/// Declaration of the "bandpass" stage (enabled, low_mhz, high_mhz).
core::StageSpec bandpassSpec();
/// The stage's values from a recipe.
BandpassParams bandpassParams(const core::Recipe& r);

/// Zero-phase spectral weights for bins 0..n/2 of an n-point real FFT sampled at fs_hz.
/// Pass band [low, high] with raised-cosine edges a quarter of the pass width wide, centred
/// on the edges (weight 0.5, i.e. -6 dB, at low and high). f0_hz and fractional_bandwidth give
/// the automatic edges. Returns all ones when the filter is disabled. Throws SettingError when
/// low >= high.
std::vector<float> bandpassWeights(const BandpassParams& p, size_t n, double fs_hz, double f0_hz, double fractional_bandwidth);

/// Pure function: one real trace filtered with `weights` (from bandpassWeights for the trace's
/// length). Same length as the input; zero phase.
std::vector<float> bandpass(const std::vector<float>& trace, const std::vector<float>& weights);

}  // namespace umbra::recon
