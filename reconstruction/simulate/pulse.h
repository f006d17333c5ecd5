// SPDX-License-Identifier: MIT
#pragma once
// Gaussian-modulated cosine pulse p(t) = exp(-t^2 / (2 sigma^2)) cos(2 pi f0 t).
//
// Its amplitude spectrum is a Gaussian around f0 with standard deviation sigma_f = 1/(2 pi sigma).
// The -6 dB (half amplitude) full bandwidth is B f0 = 2 sigma_f sqrt(2 ln 2), hence
//     sigma = sqrt(2 ln 2) / (pi B f0)
// and the -6 dB envelope duration is T = 2 sigma sqrt(2 ln 2) = 4 ln 2 / (pi B f0).
// The pulse is the received pulse-echo waveform: the requested bandwidth is the one a capture shows.
#include <cmath>
#include <vector>

namespace umbra::recon::sim {

class GaussianPulse {
public:
    /// centre_frequency_hz > 0, fractional_bandwidth in (0, 2].
    GaussianPulse(double centre_frequency_hz, double fractional_bandwidth);

    double centreFrequency() const { return f0_; }
    double fractionalBandwidth() const { return bw_; }
    /// Time-domain standard deviation of the Gaussian envelope, s.
    double sigma() const { return sigma_; }
    /// Half-length of the support used when adding the pulse to a trace, s (5 sigma: the
    /// envelope there is exp(-12.5) = 3.7e-6).
    double halfSupport() const { return 5.0 * sigma_; }
    /// Pulse value at time t (s) relative to its centre.
    double operator()(double t) const {
        return std::exp(-t * t / (2 * sigma_ * sigma_)) * std::cos(2 * M_PI * f0_ * t);
    }
    /// Analytic envelope (Gaussian) at t, s.
    double envelope(double t) const { return std::exp(-t * t / (2 * sigma_ * sigma_)); }

private:
    double f0_, bw_, sigma_;
};

/// Pulse tabulated for fast accumulation into traces sampled at fs. Row j holds the pulse at
/// the window's samples for a delay fraction j/M of a sample; a delay between two rows is the
/// linear blend of those rows. Blend error bound: (2 pi f_max / (M fs))^2 / 8 of the peak,
/// with f_max = f0 + 3 sigma_f (about 1e-6 for M = 256 at fs / f0 = 8).
class PulseTable {
public:
    PulseTable(const GaussianPulse& p, double sampling_frequency_hz, int fractions = 256);
    /// Adds amplitude * p(t_k - delay) to trace[k] for every k in the support,
    /// where t_k = k / fs and `delay_samples` = delay * fs (may be fractional or negative).
    /// Returns the number of samples written.
    int add(float* trace, int n_samples, double delay_samples, float amplitude) const;
    int halfWidth() const { return half_; }  ///< samples each side of the centre
    int fractions() const { return m_; }

private:
    int m_, half_, width_;
    std::vector<float> rows_;  ///< (m_ + 1) rows of width_ samples
};

}  // namespace umbra::recon::sim
