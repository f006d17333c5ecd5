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

AnalyticSignal::AnalyticSignal(size_t n, size_t upsample) : n_(n), up_(upsample < 1 ? 1 : upsample) {
    const size_t m = n ? n : 1;
    rin_ = fftwf_alloc_real(m);
    rout_ = fftwf_alloc_real(m);
    auto* sp = fftwf_alloc_complex(m / 2 + 1);
    auto* wk = fftwf_alloc_complex(m / 2 + 1);
    spec_ = sp;
    work_ = wk;
    std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
    fwd_ = fftwf_plan_dft_r2c_1d(int(m), rin_, sp, FFTW_ESTIMATE);
    bwd_ = fftwf_plan_dft_c2r_1d(int(m), wk, rout_, FFTW_ESTIMATE);
    if (up_ > 1) {
        auto* us = fftwf_alloc_complex(m * up_);
        auto* uo = fftwf_alloc_complex(m * up_);
        up_spec_ = us;
        up_out_ = uo;
        up_plan_ = fftwf_plan_dft_1d(int(m * up_), us, uo, FFTW_BACKWARD, FFTW_ESTIMATE);
    }
}

AnalyticSignal::~AnalyticSignal() {
    {
        std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
        fftwf_destroy_plan(static_cast<fftwf_plan>(fwd_));
        fftwf_destroy_plan(static_cast<fftwf_plan>(bwd_));
        if (up_plan_) fftwf_destroy_plan(static_cast<fftwf_plan>(up_plan_));
    }
    fftwf_free(rin_);
    fftwf_free(rout_);
    fftwf_free(spec_);
    fftwf_free(work_);
    if (up_spec_) fftwf_free(up_spec_);
    if (up_out_) fftwf_free(up_out_);
}

// Analytic signal z = IFFT(h X) with h[0] = 1, h[k] = 2 for 0 < k < n/2, h[n/2] = 1 (even n),
// 0 above: its real part is the (filtered) trace and its imaginary part the Hilbert transform,
// IFFT(-j sign(k) X). Both come from half-length real inverse transforms (c2r), so no
// full-length complex FFT and no zeroed half spectrum are needed.
void AnalyticSignal::run(const float* in, float* out, const float* weights) {
    const size_t n = n_;
    if (n == 0) return;
    auto* sp = static_cast<fftwf_complex*>(spec_);
    auto* wk = static_cast<fftwf_complex*>(work_);
    const size_t nb = n / 2 + 1;
    const bool even = (n % 2) == 0;
    std::memcpy(rin_, in, n * sizeof(float));
    fftwf_execute_dft_r2c(static_cast<fftwf_plan>(fwd_), rin_, sp);
    const float inv = 1.0f / float(n);
    if (up_ > 1) {
        // Analytic spectrum h X (h = 1 at DC and Nyquist, 2 between) zero-padded to n U bins:
        // the inverse gives the same band-limited signal sampled U times as densely.
        auto* us = static_cast<fftwf_complex*>(up_spec_);
        auto* uo = static_cast<fftwf_complex*>(up_out_);
        const size_t m = n * up_;
        std::memset(us, 0, m * sizeof(fftwf_complex));
        for (size_t k = 0; k < nb; ++k) {
            const float hk = (k == 0 || (even && k == nb - 1)) ? inv : 2 * inv;
            const float wgt = weights ? weights[k] : 1.0f;
            us[k][0] = sp[k][0] * wgt * hk;
            us[k][1] = sp[k][1] * wgt * hk;
        }
        fftwf_execute_dft(static_cast<fftwf_plan>(up_plan_), us, uo);
        std::memcpy(out, uo, m * sizeof(fftwf_complex));
        return;
    }
    // Real part.
    const float* re = in;
    if (weights) {
        for (size_t k = 0; k < nb; ++k) {
            sp[k][0] *= weights[k];
            sp[k][1] *= weights[k];
            wk[k][0] = sp[k][0] * inv;
            wk[k][1] = sp[k][1] * inv;
        }
        fftwf_execute_dft_c2r(static_cast<fftwf_plan>(bwd_), wk, rout_);
        std::memcpy(rin_, rout_, n * sizeof(float));
        re = rin_;
    }
    // Imaginary part: -j X[k] = (im, -re) for 0 < k < n/2; zero at DC and Nyquist.
    wk[0][0] = wk[0][1] = 0;
    for (size_t k = 1; k < nb; ++k) {
        wk[k][0] = sp[k][1] * inv;
        wk[k][1] = -sp[k][0] * inv;
    }
    if (even) wk[nb - 1][0] = wk[nb - 1][1] = 0;
    fftwf_execute_dft_c2r(static_cast<fftwf_plan>(bwd_), wk, rout_);
    for (size_t k = 0; k < n; ++k) {
        out[2 * k] = re[k];
        out[2 * k + 1] = rout_[k];
    }
}

std::vector<std::complex<float>> analyticSignal(const std::vector<float>& trace) {
    std::vector<std::complex<float>> out(trace.size());
    if (trace.empty()) return out;
    AnalyticSignal a(trace.size());
    a.run(trace.data(), reinterpret_cast<float*>(out.data()));
    return out;
}

}  // namespace umbra::recon
