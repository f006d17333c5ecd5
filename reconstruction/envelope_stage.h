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

/// Weighted coherence factor |sum w_i s_i|^2 / (sum w_i * sum w_i |s_i|^2) of one pixel, in
/// [0, 1] (0 when nothing summed): 1 for a perfectly coherent echo whatever the weights. With
/// equal weights it is Hollman's |sum s_i|^2 / (N sum |s_i|^2) (Hollman, Rigby & O'Donnell,
/// IEEE Ultrasonics Symposium 1999). sum = (sum_re, sum_im) = sum w_i s_i, sum_wsq = sum w_i
/// |s_i|^2, sum_w = sum w_i (weights >= 0).
float coherenceFactor(float sum_re, float sum_im, float sum_wsq, float sum_w);

}  // namespace umbra::recon
