// SPDX-License-Identifier: MIT
#include "reconstruction/envelope_stage.h"

#include <algorithm>
#include <cmath>

namespace umbra::recon {

core::StageSpec envelopeSpec() {
    return {"envelope", "Envelope", "Magnitude of the beamformed complex image (linear amplitude).", {}};
}

std::vector<float> envelope(const std::vector<std::complex<float>>& iq) {
    std::vector<float> e(iq.size());
    for (size_t i = 0; i < iq.size(); ++i) e[i] = std::abs(iq[i]);
    return e;
}

float coherenceFactor(float re, float im, float s2, float w) {
    if (!(s2 > 0) || !(w > 0)) return 0;
    return std::clamp((re * re + im * im) / (w * s2), 0.0f, 1.0f);
}

}  // namespace umbra::recon
