// SPDX-License-Identifier: MIT
#include "reconstruction/das_stage.h"

#include <cmath>

#include "core/error.h"
#include "reconstruction/detail/spec_helpers.h"

namespace umbra::recon {

core::StageSpec dasSpec() {
    using namespace detail;
    auto tile = intParam("tile_pixels", "Tile size (advanced)",
                         "Pixels per work tile for the worker threads; the image does not depend on it.", 16, 65536, 1024);
    return {"das",
            "Delay-and-sum",
            "Total focusing method (full matrix) or coherent compounding (plane wave, virtual source) on complex samples.",
            {choiceParam("aperture", "Receive aperture",
                         "f_number: dynamic aperture of width depth / f-number centred on each pixel; full: every element.",
                         {"f_number", "full"}, "f_number"),
             realParam("f_number", "f-number", "Depth over aperture width for the dynamic aperture (receive, and transmit for full matrix).",
                       "", 0.1, 100, 1.0, false, 0.1),
             choiceParam("apodization", "Apodization", "Window across the aperture.", {"rectangular", "hann", "tukey"}, "hann"),
             realParam("tukey_alpha", "Tukey taper", "Tapered fraction of the Tukey window (0 = rectangular, 1 = Hann).", "", 0, 1, 0.5,
                       false, 0.05),
             choiceParam("transmit_weighting", "Transmit weighting",
                         "Window over plane-wave angles or virtual sources (in angle order).", {"uniform", "hann", "tukey"}, "uniform"),
             choiceParam("interpolation", "Interpolation", "Interpolation of the complex samples at the delay: linear or cubic (Lagrange).",
                         {"linear", "cubic"}, "linear"),
             flagParam("coherence_factor", "Coherence factor", "Weight each pixel by its coherence factor |sum|^2 / (N sum |.|^2).", false),
             flagParam("reciprocity", "Use reciprocity",
                       "Full matrix with the same transmit and receive elements: sum each pair once, doubled (halves the work).", true),
             tile}};
}

DasParams dasParams(const core::Recipe& r) {
    DasParams p;
    p.aperture = r.text("das.aperture");
    p.f_number = r.number("das.f_number");
    p.apodization = r.text("das.apodization");
    p.tukey_alpha = r.number("das.tukey_alpha");
    p.transmit_weighting = r.text("das.transmit_weighting");
    p.interpolation = r.text("das.interpolation");
    p.coherence_factor = r.flag("das.coherence_factor");
    p.reciprocity = r.flag("das.reciprocity");
    p.tile_pixels = r.integer("das.tile_pixels");
    if (!(p.f_number > 0) || !std::isfinite(p.f_number))
        throw core::SettingError("das.f_number = " + std::to_string(p.f_number) + ": the f-number must be greater than 0");
    if (p.tile_pixels < 1) throw core::SettingError("das.tile_pixels must be at least 1");
    return p;
}

float apodizationWeight(const std::string& kind, double u, double alpha) {
    const double a = std::fabs(u);
    if (a > 1) return 0;
    if (kind == "hann") return float(0.5 * (1 + std::cos(M_PI * a)));
    if (kind == "tukey") {
        if (alpha <= 0 || a <= 1 - alpha) return 1;
        return float(0.5 * (1 + std::cos(M_PI * (a - (1 - alpha)) / alpha)));
    }
    return 1;
}

namespace detail {

#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__)
#define UMBRA_CLONES __attribute__((target_clones("avx512f", "avx2", "default")))
#else
#define UMBRA_CLONES
#endif

UMBRA_CLONES
void dasLinear(const float* __restrict base, const float* __restrict tof, const float* __restrict wt, const float* __restrict wr,
               float k, const float* __restrict tr, float hi, size_t n, float* __restrict ar, float* __restrict ai) {
#pragma GCC ivdep
    for (size_t p = 0; p < n; ++p) {
        float q = base[p] + tof[p];
        q = q < 1.0f ? 1.0f : q;
        q = q > hi ? hi : q;
        const int i = int(q);
        const float f = q - float(i);
        const float* s = tr + 2 * i;
        const float re = s[0] + f * (s[2] - s[0]);
        const float im = s[1] + f * (s[3] - s[1]);
        const float w = k * wt[p] * wr[p];
        ar[p] += w * re;
        ai[p] += w * im;
    }
}

UMBRA_CLONES
void dasCubic(const float* __restrict base, const float* __restrict tof, const float* __restrict wt, const float* __restrict wr,
              float k, const float* __restrict tr, float hi, size_t n, float* __restrict ar, float* __restrict ai) {
#pragma GCC ivdep
    for (size_t p = 0; p < n; ++p) {
        float q = base[p] + tof[p];
        q = q < 1.0f ? 1.0f : q;
        q = q > hi ? hi : q;
        const int i = int(q);
        const float f = q - float(i);
        const float* s = tr + 2 * (i - 1);
        const float fm1 = f - 1, fm2 = f - 2, fp1 = f + 1;
        const float c0 = -f * fm1 * fm2 * (1.0f / 6), c1 = fp1 * fm1 * fm2 * 0.5f;
        const float c2 = -fp1 * f * fm2 * 0.5f, c3 = fp1 * f * fm1 * (1.0f / 6);
        const float re = c0 * s[0] + c1 * s[2] + c2 * s[4] + c3 * s[6];
        const float im = c0 * s[1] + c1 * s[3] + c2 * s[5] + c3 * s[7];
        const float w = k * wt[p] * wr[p];
        ar[p] += w * re;
        ai[p] += w * im;
    }
}

void dasCoherence(bool cubic, const float* base, const float* tof, const float* wt, const float* wr, float k, float mult,
                  const float* tr, float hi, size_t n, float* ar, float* ai, float* s2, float* cnt) {
    for (size_t p = 0; p < n; ++p) {
        float q = base[p] + tof[p];
        q = q < 1.0f ? 1.0f : q;
        q = q > hi ? hi : q;
        const int i = int(q);
        const float f = q - float(i);
        float re, im;
        if (cubic) {
            const float* s = tr + 2 * (i - 1);
            const float fm1 = f - 1, fm2 = f - 2, fp1 = f + 1;
            const float c0 = -f * fm1 * fm2 * (1.0f / 6), c1 = fp1 * fm1 * fm2 * 0.5f;
            const float c2 = -fp1 * f * fm2 * 0.5f, c3 = fp1 * f * fm1 * (1.0f / 6);
            re = c0 * s[0] + c1 * s[2] + c2 * s[4] + c3 * s[6];
            im = c0 * s[1] + c1 * s[3] + c2 * s[5] + c3 * s[7];
        } else {
            const float* s = tr + 2 * i;
            re = s[0] + f * (s[2] - s[0]);
            im = s[1] + f * (s[3] - s[1]);
        }
        const float w1 = wt[p] * wr[p];
        const float w = k * w1;
        ar[p] += w * re;
        ai[p] += w * im;
        // Each of the `mult` equal terms has weight k / mult.
        const float wu = w1 * (k / mult);
        s2[p] += mult * wu * wu * (re * re + im * im);
        cnt[p] += w1 > 0 ? mult : 0.0f;
    }
}

}  // namespace detail
}  // namespace umbra::recon
