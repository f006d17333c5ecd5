// SPDX-License-Identifier: MIT
#include "reconstruction/analytic_stage.h"

#include <fftw3.h>

#include <cstring>

#include "reconstruction/detail/fftw_lock.h"

namespace umbra::recon {

core::StageSpec analyticSpec() {
    return {"analytic", "Analytic signal",
            "Hilbert transform by FFT: each trace becomes complex (I/Q) before delay-and-sum; always on.", {}};
}

AnalyticSignal::AnalyticSignal(size_t n) : n_(n) {
    const size_t m = n ? n : 1;
    rin_ = fftwf_alloc_real(m);
    auto* sp = fftwf_alloc_complex(m / 2 + 1);
    auto* full = fftwf_alloc_complex(m);
    spec_ = sp;
    full_ = full;
    std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
    fwd_ = fftwf_plan_dft_r2c_1d(int(m), rin_, sp, FFTW_ESTIMATE);
    bwd_ = fftwf_plan_dft_1d(int(m), full, full, FFTW_BACKWARD, FFTW_ESTIMATE);
}

AnalyticSignal::~AnalyticSignal() {
    {
        std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
        fftwf_destroy_plan(static_cast<fftwf_plan>(fwd_));
        fftwf_destroy_plan(static_cast<fftwf_plan>(bwd_));
    }
    fftwf_free(rin_);
    fftwf_free(spec_);
    fftwf_free(full_);
}

void AnalyticSignal::run(const float* in, float* out, const float* weights) {
    const size_t n = n_;
    if (n == 0) return;
    auto* sp = static_cast<fftwf_complex*>(spec_);
    auto* full = static_cast<fftwf_complex*>(full_);
    std::memcpy(rin_, in, n * sizeof(float));
    fftwf_execute_dft_r2c(static_cast<fftwf_plan>(fwd_), rin_, sp);
    // h[0] = 1, h[1..ceil(n/2)-1] = 2, h[n/2] = 1 for even n, rest 0; scaled by 1/n for the inverse.
    const float inv = 1.0f / float(n);
    const size_t half = n / 2;
    const bool even = (n % 2) == 0;
    for (size_t k = 0; k <= half; ++k) {
        float h = (k == 0 || (even && k == half)) ? inv : 2 * inv;
        if (weights) h *= weights[k];
        full[k][0] = sp[k][0] * h;
        full[k][1] = sp[k][1] * h;
    }
    std::memset(full + half + 1, 0, (n - half - 1) * sizeof(fftwf_complex));
    fftwf_execute_dft(static_cast<fftwf_plan>(bwd_), full, full);
    std::memcpy(out, full, n * 2 * sizeof(float));
}

std::vector<std::complex<float>> analyticSignal(const std::vector<float>& trace) {
    std::vector<std::complex<float>> out(trace.size());
    if (trace.empty()) return out;
    AnalyticSignal a(trace.size());
    a.run(trace.data(), reinterpret_cast<float*>(out.data()));
    return out;
}

}  // namespace umbra::recon
