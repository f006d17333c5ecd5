// SPDX-License-Identifier: MIT
#pragma once
// Log-compression stage (display only): dB = 20 log10(a / reference) + gain, clipped to
// [-dynamic range, 0]. The reference is the image peak or a user amplitude.
#include <string>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon {

struct LogCompressionParams {
    double gain_db = 0;                ///< added after the reference, dB; default 0
    double dynamic_range_db = 60;      ///< shown range below 0 dB, dB, > 0; default 60
    std::string reference = "peak";    ///< "peak" (image maximum = 0 dB) or "user"
    double reference_amplitude = 1.0;  ///< linear amplitude (capture units) that is 0 dB when reference = user; default 1
};

/// Declaration of the "log_compression" stage (all display-only).
core::StageSpec logCompressionSpec();
/// The stage's values from a recipe.
LogCompressionParams logCompressionParams(const core::Recipe& r);

/// Pure function: dB values of linear amplitudes `a` (any unit), in [-dynamic range, 0].
std::vector<float> logCompressValues(const std::vector<float>& a, const LogCompressionParams& p);

}  // namespace umbra::recon
