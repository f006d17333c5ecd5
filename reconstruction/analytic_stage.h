// SPDX-License-Identifier: MIT
#pragma once
// Analytic-signal stage: x(t) -> x(t) + j H{x}(t) by FFT (negative frequencies removed,
// positive doubled; DC and Nyquist kept once), so delay-and-sum works on complex (I/Q)
// samples and the envelope |.| is right for any transmit kind.
#include <complex>
#include <cstddef>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon {

/// Declaration of the "analytic" stage (no parameters: always on, the envelope needs it).
core::StageSpec analyticSpec();

/// Reusable per-worker context for traces of a fixed length n: holds FFTW plans and buffers,
/// so `run` allocates nothing. Construct and destroy on any thread (planning is serialised).
/// With upsample = U > 1 the output is the band-limited interpolation of the analytic signal
/// at U times the sampling rate (spectrum zero-padded before the inverse FFT): n U complex
/// samples, of which every U-th equals the U = 1 output.
class AnalyticSignal {
public:
    explicit AnalyticSignal(size_t n, size_t upsample = 1);
    ~AnalyticSignal();
    AnalyticSignal(const AnalyticSignal&) = delete;
    AnalyticSignal& operator=(const AnalyticSignal&) = delete;
    size_t size() const { return n_; }
    size_t upsample() const { return up_; }
    /// Analytic signal of `in` (n real samples, any unit) into `out` (n U complex samples,
    /// interleaved re, im; same unit). `weights` (n/2+1 spectral weights, e.g. band-pass) or null.
    void run(const float* in, float* out, const float* weights = nullptr);

private:
    size_t n_;
    float* rin_;   // [n] input copy (aligned)
    float* rout_;  // [n] inverse output
    void* spec_;   // fftwf_complex[n/2+1], spectrum of the input
    void* work_;   // fftwf_complex[n/2+1], spectrum to invert
    void* fwd_;    // fftwf_plan r2c
    void* bwd_;    // fftwf_plan c2r
    size_t up_ = 1;
    void* up_spec_ = nullptr;  // fftwf_complex[n U], zero-padded analytic spectrum (U > 1)
    void* up_out_ = nullptr;   // fftwf_complex[n U], its inverse
    void* up_plan_ = nullptr;  // fftwf_plan complex backward of size n U
};

/// Pure function: the analytic signal of one real trace (same length).
std::vector<std::complex<float>> analyticSignal(const std::vector<float>& trace);

}  // namespace umbra::recon
