// SPDX-License-Identifier: MIT
#pragma once
// Envelope stage: the magnitude |I + jQ| of the beamformed complex image (linear amplitude),
// optionally weighted by the coherence factor computed during delay-and-sum.
#include <complex>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon {

/// Declaration of the "envelope" stage (no parameters).
core::StageSpec envelopeSpec();

/// Pure function: |iq[i]| for every pixel (same unit as the samples).
std::vector<float> envelope(const std::vector<std::complex<float>>& iq);

/// Coherence factor |sum|^2 / (N sum |s_i|^2) of one pixel, in [0, 1] (0 when nothing summed)
/// (Hollman, Rigby & O'Donnell, IEEE Ultrasonics Symposium 1999).
float coherenceFactor(float sum_re, float sum_im, float sum_sq, float count);

}  // namespace umbra::recon
