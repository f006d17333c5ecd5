// SPDX-License-Identifier: MIT
#pragma once
// Additive electronic noise, band-limited to the pulse band: white Gaussian noise filtered by
// the pulse itself (sampled, truncated at +-3 sigma, normalised to unit energy so the output
// rms equals the requested rms). Each trace has its own random stream keyed by
// (seed, frame, transmit, receive), so the result does not depend on thread count.
#include <cstdint>
#include <vector>

#include "reconstruction/simulate/pulse.h"

namespace umbra::recon::sim {

class NoiseGenerator {
public:
    NoiseGenerator(const GaussianPulse& p, double sampling_frequency_hz);
    /// Adds noise of the given rms to trace[0..n).
    void add(float* trace, int n, double rms, uint64_t seed, uint64_t frame, uint64_t transmit, uint64_t receive) const;
    const std::vector<double>& taps() const { return taps_; }

private:
    std::vector<double> taps_;
};

}  // namespace umbra::recon::sim
