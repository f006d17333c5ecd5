// SPDX-License-Identifier: MIT
#include "reconstruction/log_compression_stage.h"

#include <algorithm>
#include <cmath>

#include "reconstruction/detail/spec_helpers.h"

namespace umbra::recon {

core::StageSpec logCompressionSpec() {
    using namespace detail;
    return {"log_compression",
            "Log compression",
            "Amplitude to dB relative to a reference, plus gain, clipped to the dynamic range.",
            {realParam("gain_db", "Gain", "Gain added after referencing, dB.", "dB", -200, 200, 0, true, 1),
             realParam("dynamic_range_db", "Dynamic range", "Range shown below 0 dB, dB; values below are clipped.", "dB", 1, 200, 60,
                       true, 1),
             choiceParam("reference", "Reference", "0 dB is the image peak (peak) or a fixed amplitude (user).", {"peak", "user"},
                         "peak", true),
             realParam("reference_amplitude", "Reference amplitude", "Linear amplitude, in the capture's RF units, shown as 0 dB when the reference is user.",
                       "RF units", 1e-30, 1e30, 1.0, true)}};
}

LogCompressionParams logCompressionParams(const core::Recipe& r) {
    LogCompressionParams p;
    p.gain_db = r.number("log_compression.gain_db");
    p.dynamic_range_db = r.number("log_compression.dynamic_range_db");
    p.reference = r.text("log_compression.reference");
    p.reference_amplitude = r.number("log_compression.reference_amplitude");
    return p;
}

std::vector<float> logCompressValues(const std::vector<float>& a, const LogCompressionParams& p) {
    double ref = p.reference_amplitude;
    if (p.reference == "peak") {
        float m = 0;
        for (float v : a) m = std::max(m, v);
        ref = m;
    }
    std::vector<float> out(a.size());
    const float lo = float(-p.dynamic_range_db);
    if (!(ref > 0)) {
        std::fill(out.begin(), out.end(), lo);
        return out;
    }
    const double inv = 1.0 / ref;
    for (size_t i = 0; i < a.size(); ++i) {
        double v = a[i] > 0 ? 20.0 * std::log10(double(a[i]) * inv) + p.gain_db : -1e30;
        out[i] = float(std::clamp(v, double(lo), 0.0));
    }
    return out;
}

}  // namespace umbra::recon
