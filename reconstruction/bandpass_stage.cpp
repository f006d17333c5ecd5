// SPDX-License-Identifier: MIT
#include "reconstruction/bandpass_stage.h"

#include <fftw3.h>

#include <algorithm>
#include <cmath>
#include <mutex>

#include "core/error.h"
#include "reconstruction/detail/fftw_lock.h"
#include "reconstruction/detail/spec_helpers.h"

namespace umbra::recon {

core::StageSpec bandpassSpec() {
    using namespace detail;
    return {"bandpass",
            "Band-pass filter",
            "Optional zero-phase band-pass filter applied to every trace before beamforming.",
            {flagParam("enabled", "Band-pass on",
                       "Apply the band-pass filter to the traces (removes DC and out-of-band noise; off: traces used as recorded).", true),
             modalRealParam("low_mhz", "Low edge",
                            "Lower -6 dB edge in MHz; 0 = automatic: the probe's -6 dB band f0 (1 -/+ B/2) widened by its "
                            "half-width each side, f0 (1 - B), and at least 0.1 f0.",
                            "MHz", 0, 1000, "automatic", 0.1),
             modalRealParam("high_mhz", "High edge", "Upper -6 dB edge in MHz; 0 = automatic: f0 (1 + B).", "MHz", 0, 1000,
                            "automatic", 0.1)}};
}

BandpassParams bandpassParams(const core::Recipe& r) {
    BandpassParams p;
    p.enabled = r.flag("bandpass.enabled");
    p.low_mhz = r.number("bandpass.low_mhz");
    p.high_mhz = r.number("bandpass.high_mhz");
    return p;
}

std::pair<double, double> bandpassEdgesHz(const BandpassParams& p, double f0_hz, double fractional_bandwidth) {
    const double half = (1 + kBandpassMargin) * fractional_bandwidth / 2;
    const double lo = p.low_mhz > 0 ? p.low_mhz * 1e6 : std::max(kBandpassMinLowFraction * f0_hz, f0_hz * (1 - half));
    const double hi = p.high_mhz > 0 ? p.high_mhz * 1e6 : f0_hz * (1 + half);
    if (!(hi > lo))
        throw core::SettingError("band-pass: the low edge (" + std::to_string(lo / 1e6) + " MHz) must be below the high edge (" +
                                 std::to_string(hi / 1e6) + " MHz)");
    return {lo, hi};
}

std::vector<float> bandpassWeights(const BandpassParams& p, size_t n, double fs_hz, double f0_hz, double fractional_bandwidth) {
    std::vector<float> w(n / 2 + 1, 1.0f);
    if (!p.enabled) return w;
    const auto [lo, hi] = bandpassEdgesHz(p, f0_hz, fractional_bandwidth);
    const double tw = 0.25 * (hi - lo);  // transition width, centred on each edge
    auto edge = [&](double f, double e, bool rising) {
        double u = (f - (e - tw / 2)) / tw;  // 0..1 across the transition
        u = std::clamp(u, 0.0, 1.0);
        double v = 0.5 - 0.5 * std::cos(M_PI * u);
        return rising ? v : 1 - v;
    };
    for (size_t k = 0; k < w.size(); ++k) {
        const double f = double(k) * fs_hz / double(n);
        w[k] = float(edge(f, lo, true) * edge(f, hi, false));
    }
    w[0] = 0;  // DC removed whatever the edges
    return w;
}

std::vector<float> bandpass(const std::vector<float>& trace, const std::vector<float>& weights) {
    const size_t n = trace.size();
    if (n == 0) return {};
    if (weights.size() != n / 2 + 1) throw core::SettingError("band-pass: weights do not match the trace length");
    float* in = fftwf_alloc_real(n);
    fftwf_complex* sp = fftwf_alloc_complex(n / 2 + 1);
    fftwf_plan fw, bw;
    {
        std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
        fw = fftwf_plan_dft_r2c_1d(int(n), in, sp, FFTW_ESTIMATE);
        bw = fftwf_plan_dft_c2r_1d(int(n), sp, in, FFTW_ESTIMATE);
    }
    std::copy(trace.begin(), trace.end(), in);
    fftwf_execute(fw);
    for (size_t k = 0; k < n / 2 + 1; ++k) {
        sp[k][0] *= weights[k] / float(n);
        sp[k][1] *= weights[k] / float(n);
    }
    fftwf_execute(bw);
    std::vector<float> out(in, in + n);
    {
        std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
        fftwf_destroy_plan(fw);
        fftwf_destroy_plan(bw);
    }
    fftwf_free(in);
    fftwf_free(sp);
    return out;
}

}  // namespace umbra::recon
