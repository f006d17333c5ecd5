// SPDX-License-Identifier: MIT
#include "reconstruction/das_stage.h"

#include <cmath>
#include <cstdlib>
#include <algorithm>
#include <numeric>
#include <sstream>

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
            {choiceParam("method", "Imaging method",
                         "delay_and_sum: delay-and-sum in the time domain; wavenumber: f-k migration (full matrix) or Stolt migration "
                         "(plane waves) in the wavenumber domain, for a linear array with evenly spaced elements in a homogeneous medium.",
                         {"delay_and_sum", "wavenumber"}, "delay_and_sum"),
             choiceParam("aperture", "Receive aperture",
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
             [] {
                 auto u = intParam("upsampling", "Upsampling",
                                   "Band-limited upsampling factor of the analytic traces before interpolation; 0 = automatic (the "
                                   "smallest factor that keeps the interpolation loss at the centre frequency within 0.1 dB).",
                                   0, kMaxUpsampling, 0);
                 u.zero_means = "automatic";
                 return u;
             }(),
             flagParam("coherence_factor", "Coherence factor",
                       "Weight each pixel by its weighted coherence factor |sum w s|^2 / (sum w * sum w |s|^2) (1 for a coherent echo).",
                       false),
             flagParam("reciprocity", "Use reciprocity",
                       "Full matrix with the same transmit and receive elements: sum each pair once, doubled (halves the work).", true),
             tile,
             textParam("excluded_elements", "Excluded elements",
                       "Elements left out of the sum as transmitter and receiver (apodization weight 0), numbered from 1, e.g. "
                       "\"3, 17-19\"; empty = none. For weak or dead elements (umbra-cli calibrate --elements).",
                       "", "")}};
}

std::vector<int> parseElementList(const std::string& text) {
    std::vector<int> out;
    auto bad = [&](const std::string& why) {
        throw core::SettingError("das.excluded_elements = \"" + text + "\": " + why +
                                 " (element numbers from 1 and ranges, e.g. \"3, 17-19\")");
    };
    std::string item;
    std::istringstream in(text);
    while (std::getline(in, item, ',')) {
        const auto b = item.find_first_not_of(" \t"), e = item.find_last_not_of(" \t");
        if (b == std::string::npos) {
            if (text.find_first_not_of(" \t,") == std::string::npos) continue;  // blank list
            bad("empty item");
        }
        item = item.substr(b, e - b + 1);
        long lo = 0, hi = 0;
        char* end = nullptr;
        lo = std::strtol(item.c_str(), &end, 10);
        if (end == item.c_str()) bad("\"" + item + "\" is not an element number");
        hi = lo;
        std::string rest(end);
        const auto rb = rest.find_first_not_of(" \t");
        rest = rb == std::string::npos ? std::string() : rest.substr(rb);
        if (!rest.empty()) {
            if (rest[0] != '-') bad("\"" + item + "\" is not an element number or range");
            const std::string tail = rest.substr(1);
            hi = std::strtol(tail.c_str(), &end, 10);
            if (end == tail.c_str() || std::string(end).find_first_not_of(" \t") != std::string::npos)
                bad("\"" + item + "\" is not an element number or range");
        }
        if (lo < 1 || hi < lo || hi > 100000) bad("\"" + item + "\" is out of range");
        for (long k = lo; k <= hi; ++k) out.push_back(int(k - 1));
    }
    std::sort(out.begin(), out.end());
    out.erase(std::unique(out.begin(), out.end()), out.end());
    return out;
}

std::string elementListText(const std::vector<int>& zb) {
    std::vector<int> v = zb;
    std::sort(v.begin(), v.end());
    v.erase(std::unique(v.begin(), v.end()), v.end());
    std::string s;
    for (size_t i = 0; i < v.size();) {
        size_t j = i;
        while (j + 1 < v.size() && v[j + 1] == v[j] + 1) ++j;
        if (!s.empty()) s += ", ";
        s += std::to_string(v[i] + 1);
        if (j > i) {
            s += '-';
            s += std::to_string(v[j] + 1);
        }
        i = j + 1;
    }
    return s;
}

DasParams dasParams(const core::Recipe& r) {
    DasParams p;
    p.method = r.text("das.method");
    p.aperture = r.text("das.aperture");
    p.f_number = r.number("das.f_number");
    p.apodization = r.text("das.apodization");
    p.tukey_alpha = r.number("das.tukey_alpha");
    p.transmit_weighting = r.text("das.transmit_weighting");
    p.interpolation = r.text("das.interpolation");
    p.upsampling = r.integer("das.upsampling");
    p.coherence_factor = r.flag("das.coherence_factor");
    p.reciprocity = r.flag("das.reciprocity");
    p.tile_pixels = r.integer("das.tile_pixels");
    if (r.has("das.excluded_elements")) p.excluded_elements = parseElementList(r.text("das.excluded_elements"));
    if (!p.excluded_elements.empty() && p.method == "wavenumber")
        throw core::SettingError("das.excluded_elements: excluding elements needs das.method = delay_and_sum "
                                 "(wavenumber imaging uses every element)");
    if (!(p.f_number > 0) || !std::isfinite(p.f_number))
        throw core::SettingError("das.f_number = " + std::to_string(p.f_number) + ": the f-number must be greater than 0");
    if (p.tile_pixels < 1) throw core::SettingError("das.tile_pixels must be at least 1");
    if (p.upsampling < 0 || p.upsampling > kMaxUpsampling)
        throw core::SettingError("das.upsampling = " + std::to_string(p.upsampling) + ": must be 0 (automatic) to " +
                                 std::to_string(kMaxUpsampling));
    return p;
}

double interpolationGain(const std::string& kind, double f_hz, double fs_hz) {
    if (!(fs_hz > 0) || !(f_hz > 0)) return 1;
    const double th = 2 * M_PI * f_hz / fs_hz;  // phase step per sample
    // Response at fraction f relative to the true value e^{j th f}; mean over f and worst f.
    constexpr int kSteps = 256;
    double mre = 0, mim = 0, worst = 1e300;
    for (int i = 0; i < kSteps; ++i) {
        const double f = (i + 0.5) / kSteps;
        double re = 0, im = 0;
        auto add = [&](double c, double k) {  // coefficient c on the sample at offset k
            re += c * std::cos(th * (k - f));
            im += c * std::sin(th * (k - f));
        };
        if (kind == "cubic") {
            const double fm1 = f - 1, fm2 = f - 2, fp1 = f + 1;
            add(-f * fm1 * fm2 / 6, -1);
            add(fp1 * fm1 * fm2 / 2, 0);
            add(-fp1 * f * fm2 / 2, 1);
            add(fp1 * f * fm1 / 6, 2);
        } else {
            add(1 - f, 0);
            add(f, 1);
        }
        mre += re / kSteps;
        mim += im / kSteps;
        worst = std::min(worst, std::hypot(re, im));
    }
    return std::min(worst, std::hypot(mre, mim));
}

int upsamplingFactor(const DasParams& p, double fs_hz, double f0_hz) {
    if (p.upsampling > 0) return p.upsampling;
    for (int u = 1; u < kMaxUpsampling; ++u)
        if (-20 * std::log10(interpolationGain(p.interpolation, f0_hz, fs_hz * u)) <= kInterpolationLossTargetDb) return u;
    return kMaxUpsampling;
}

double interpolationLossDb(const DasParams& p, double fs_hz, double f0_hz) {
    const int u = upsamplingFactor(p, fs_hz, f0_hz);
    return std::max(0.0, -20 * std::log10(interpolationGain(p.interpolation, f0_hz, fs_hz * u)));
}

std::vector<float> transmitWeights(const core::CaptureHeader& h, const DasParams& p) {
    const size_t ntx = h.transmits();
    std::vector<float> w(ntx, 1.0f);
    if (h.transmit.kind == core::TransmitKind::SingleElement || ntx < 2 || p.transmit_weighting == "uniform") return w;
    std::vector<size_t> order(ntx);
    std::iota(order.begin(), order.end(), 0);
    auto key = [&](size_t t) {
        return h.transmit.kind == core::TransmitKind::PlaneWave ? h.transmit.angle_rad[t] : h.transmit.virtual_source_m[t][0];
    };
    std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) { return key(a) < key(b); });
    for (size_t k = 0; k < ntx; ++k) {
        const double u = (double(k) - double(ntx - 1) / 2) / (double(ntx + 1) / 2);
        w[order[k]] = apodizationWeight(p.transmit_weighting, u, p.tukey_alpha);
    }
    return w;
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
namespace {

inline void lagrange4(float f, float& c0, float& c1, float& c2, float& c3) {
    const float fm1 = f - 1, fm2 = f - 2, fp1 = f + 1;
    c0 = -f * fm1 * fm2 * (1.0f / 6);
    c1 = fp1 * fm1 * fm2 * 0.5f;
    c2 = -fp1 * f * fm2 * 0.5f;
    c3 = fp1 * f * fm1 * (1.0f / 6);
}

void linearScalar(const float* __restrict ta, const float* __restrict tb, float off, const float* __restrict wt, const float* __restrict wr,
                  float k, const float* __restrict tr, float hi, size_t n, float* __restrict acc) {
    for (size_t p = 0; p < n; ++p) {
        float q = (ta[p] + tb[p]) + off;
        q = q < 1.0f ? 1.0f : q;
        q = q > hi ? hi : q;
        const int i = int(q);
        const float f = q - float(i);
        const float* s = tr + 2 * i;
        const float w = (k * wt[p]) * wr[p];
        acc[2 * p] += w * (s[0] + f * (s[2] - s[0]));
        acc[2 * p + 1] += w * (s[1] + f * (s[3] - s[1]));
    }
}

void cubicScalar(const float* __restrict ta, const float* __restrict tb, float off, const float* __restrict wt, const float* __restrict wr,
                 float k, const float* __restrict tr, float hi, size_t n, float* __restrict acc) {
    for (size_t p = 0; p < n; ++p) {
        float q = (ta[p] + tb[p]) + off;
        q = q < 1.0f ? 1.0f : q;
        q = q > hi ? hi : q;
        const int i = int(q);
        float c0, c1, c2, c3;
        lagrange4(q - float(i), c0, c1, c2, c3);
        const float* s = tr + 2 * (i - 1);
        const float w = (k * wt[p]) * wr[p];
        acc[2 * p] += w * (c0 * s[0] + c1 * s[2] + c2 * s[4] + c3 * s[6]);
        acc[2 * p + 1] += w * (c0 * s[1] + c1 * s[3] + c2 * s[5] + c3 * s[7]);
    }
}

void linear2Scalar(const float* ta1, float off1, const float* wt1, float k1, const float* tr1, const float* ta2, float off2,
                   const float* wt2, float k2, const float* tr2, const float* tb, const float* wr, float hi, size_t n, float* acc) {
    linearScalar(ta1, tb, off1, wt1, wr, k1, tr1, hi, n, acc);
    linearScalar(ta2, tb, off2, wt2, wr, k2, tr2, hi, n, acc);
}

}  // namespace

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
}  // namespace detail
}  // namespace umbra::recon
#include <immintrin.h>
namespace umbra::recon {
namespace detail {
namespace {

// Each (re, im) pair is gathered as one 64-bit element; the interpolation runs on interleaved
// complex values, with the per-pixel fraction and weight duplicated into both halves.
#define UMBRA_AVX512 __attribute__((target("avx512f,avx512dq,avx512vl,avx2,fma")))
#define UMBRA_AVX2 __attribute__((target("avx2,fma")))

// Linear interpolation without gathers: one 16-byte load per pixel fetches (re, im) of sample i
// and i + 1 together; two permutes split them. Same arithmetic as linearScalar's vector form.
UMBRA_AVX512 inline void loadPairs(const float* tr, __m256i i, __m512& A, __m512& B) {
    alignas(32) int idx[8];
    _mm256_store_si256(reinterpret_cast<__m256i*>(idx), i);
    __m512 z0 = _mm512_insertf32x4(_mm512_setzero_ps(), _mm_loadu_ps(tr + 2 * idx[0]), 0);
    z0 = _mm512_insertf32x4(z0, _mm_loadu_ps(tr + 2 * idx[1]), 1);
    z0 = _mm512_insertf32x4(z0, _mm_loadu_ps(tr + 2 * idx[2]), 2);
    z0 = _mm512_insertf32x4(z0, _mm_loadu_ps(tr + 2 * idx[3]), 3);
    __m512 z1 = _mm512_insertf32x4(_mm512_setzero_ps(), _mm_loadu_ps(tr + 2 * idx[4]), 0);
    z1 = _mm512_insertf32x4(z1, _mm_loadu_ps(tr + 2 * idx[5]), 1);
    z1 = _mm512_insertf32x4(z1, _mm_loadu_ps(tr + 2 * idx[6]), 2);
    z1 = _mm512_insertf32x4(z1, _mm_loadu_ps(tr + 2 * idx[7]), 3);
    const __m512i ea = _mm512_set_epi64(14, 12, 10, 8, 6, 4, 2, 0), eb = _mm512_set_epi64(15, 13, 11, 9, 7, 5, 3, 1);
    A = _mm512_castpd_ps(_mm512_permutex2var_pd(_mm512_castps_pd(z0), ea, _mm512_castps_pd(z1)));
    B = _mm512_castpd_ps(_mm512_permutex2var_pd(_mm512_castps_pd(z0), eb, _mm512_castps_pd(z1)));
}

UMBRA_AVX512 void linearLoadsAvx512(const float* ta, const float* tb, float off, const float* wt, const float* wr, float k, const float* tr,
                                    float hi, size_t n, float* acc) {
    const __m256 one = _mm256_set1_ps(1.0f), vhi = _mm256_set1_ps(hi), vk = _mm256_set1_ps(k), voff = _mm256_set1_ps(off);
    const __m512i dup = _mm512_set_epi32(7, 7, 6, 6, 5, 5, 4, 4, 3, 3, 2, 2, 1, 1, 0, 0);
#define D(x) _mm512_mask_permutexvar_ps(_mm512_setzero_ps(), 0xFFFF, dup, _mm512_insertf32x8(_mm512_setzero_ps(), x, 0))
    for (size_t p = 0; p < n; p += 8) {
        __m256 q = _mm256_add_ps(_mm256_add_ps(_mm256_loadu_ps(ta + p), _mm256_loadu_ps(tb + p)), voff);
        q = _mm256_min_ps(_mm256_max_ps(q, one), vhi);
        const __m256i i = _mm256_cvttps_epi32(q);
        const __m256 f = _mm256_sub_ps(q, _mm256_cvtepi32_ps(i));
        const __m256 w = _mm256_mul_ps(_mm256_mul_ps(vk, _mm256_loadu_ps(wt + p)), _mm256_loadu_ps(wr + p));
        __m512 a, b;
        loadPairs(tr, i, a, b);
        const __m512 v = _mm512_fmadd_ps(D(f), _mm512_sub_ps(b, a), a);
        _mm512_storeu_ps(acc + 2 * p, _mm512_fmadd_ps(D(w), v, _mm512_loadu_ps(acc + 2 * p)));
    }
#undef D
}

UMBRA_AVX512 void linear2LoadsAvx512(const float* ta1, float off1, const float* wt1, float k1, const float* tr1, const float* ta2,
                                     float off2, const float* wt2, float k2, const float* tr2, const float* tb, const float* wr, float hi,
                                     size_t n, float* acc) {
    const __m256 one = _mm256_set1_ps(1.0f), vhi = _mm256_set1_ps(hi);
    const __m256 vk1 = _mm256_set1_ps(k1), vo1 = _mm256_set1_ps(off1), vk2 = _mm256_set1_ps(k2), vo2 = _mm256_set1_ps(off2);
    const __m512i dup = _mm512_set_epi32(7, 7, 6, 6, 5, 5, 4, 4, 3, 3, 2, 2, 1, 1, 0, 0);
#define D(x) _mm512_mask_permutexvar_ps(_mm512_setzero_ps(), 0xFFFF, dup, _mm512_insertf32x8(_mm512_setzero_ps(), x, 0))
    for (size_t p = 0; p < n; p += 8) {
        const __m256 b = _mm256_loadu_ps(tb + p), r = _mm256_loadu_ps(wr + p);
        __m256 q1 = _mm256_add_ps(_mm256_add_ps(_mm256_loadu_ps(ta1 + p), b), vo1);
        __m256 q2 = _mm256_add_ps(_mm256_add_ps(_mm256_loadu_ps(ta2 + p), b), vo2);
        q1 = _mm256_min_ps(_mm256_max_ps(q1, one), vhi);
        q2 = _mm256_min_ps(_mm256_max_ps(q2, one), vhi);
        const __m256i i1 = _mm256_cvttps_epi32(q1), i2 = _mm256_cvttps_epi32(q2);
        const __m256 f1 = _mm256_sub_ps(q1, _mm256_cvtepi32_ps(i1)), f2 = _mm256_sub_ps(q2, _mm256_cvtepi32_ps(i2));
        const __m256 w1 = _mm256_mul_ps(_mm256_mul_ps(vk1, _mm256_loadu_ps(wt1 + p)), r);
        const __m256 w2 = _mm256_mul_ps(_mm256_mul_ps(vk2, _mm256_loadu_ps(wt2 + p)), r);
        __m512 a1, b1, a2, b2;
        loadPairs(tr1, i1, a1, b1);
        loadPairs(tr2, i2, a2, b2);
        const __m512 v1 = _mm512_fmadd_ps(D(f1), _mm512_sub_ps(b1, a1), a1);
        const __m512 v2 = _mm512_fmadd_ps(D(f2), _mm512_sub_ps(b2, a2), a2);
        __m512 ac = _mm512_loadu_ps(acc + 2 * p);
        ac = _mm512_fmadd_ps(D(w1), v1, ac);
        ac = _mm512_fmadd_ps(D(w2), v2, ac);
        _mm512_storeu_ps(acc + 2 * p, ac);
    }
#undef D
}

void linear2Avx2(const float* ta1, float off1, const float* wt1, float k1, const float* tr1, const float* ta2, float off2,
                 const float* wt2, float k2, const float* tr2, const float* tb, const float* wr, float hi, size_t n, float* acc);

// 4-point Lagrange: one 32-byte load per pixel fetches (re, im) of samples i-1 .. i+2; a 4 x 8
// transpose of 64-bit pairs (eight permutes) gives the four sample vectors.
UMBRA_AVX512 void cubicAvx512(const float* ta, const float* tb, float off, const float* wt, const float* wr, float k, const float* tr,
                              float hi, size_t n, float* acc) {
    const __m256 one = _mm256_set1_ps(1.0f), vhi = _mm256_set1_ps(hi), vk = _mm256_set1_ps(k), voff = _mm256_set1_ps(off);
    const __m256 two = _mm256_set1_ps(2.0f), half = _mm256_set1_ps(0.5f), sixth = _mm256_set1_ps(1.0f / 6);
    const __m512i dup = _mm512_set_epi32(7, 7, 6, 6, 5, 5, 4, 4, 3, 3, 2, 2, 1, 1, 0, 0);
    const __m512i t0 = _mm512_set_epi64(13, 9, 5, 1, 12, 8, 4, 0), t1 = _mm512_set_epi64(15, 11, 7, 3, 14, 10, 6, 2);
    const __m512i lo = _mm512_set_epi64(11, 10, 9, 8, 3, 2, 1, 0), hi4 = _mm512_set_epi64(15, 14, 13, 12, 7, 6, 5, 4);
#define D(x) _mm512_mask_permutexvar_ps(_mm512_setzero_ps(), 0xFFFF, dup, _mm512_insertf32x8(_mm512_setzero_ps(), x, 0))
#define PAIR(j0, j1) \
    _mm512_mask_insertf64x4(zero8, 0xFF, _mm512_mask_insertf64x4(zero8, 0xFF, zero8, _mm256_loadu_pd(d + idx[j0] - 1), 0), \
                            _mm256_loadu_pd(d + idx[j1] - 1), 1)
    const double* d = reinterpret_cast<const double*>(tr);  // element m = complex sample m (re, im)
    const __m512d zero8 = _mm512_setzero_pd();
    for (size_t p = 0; p < n; p += 8) {
        __m256 q = _mm256_add_ps(_mm256_add_ps(_mm256_loadu_ps(ta + p), _mm256_loadu_ps(tb + p)), voff);
        q = _mm256_min_ps(_mm256_max_ps(q, one), vhi);
        const __m256i i = _mm256_cvttps_epi32(q);
        const __m256 f = _mm256_sub_ps(q, _mm256_cvtepi32_ps(i));
        const __m256 fm1 = _mm256_sub_ps(f, one), fm2 = _mm256_sub_ps(f, two), fp1 = _mm256_add_ps(f, one);
        // Same operation order as lagrange4.
        const __m256 c0 = _mm256_mul_ps(_mm256_mul_ps(_mm256_mul_ps(_mm256_sub_ps(_mm256_setzero_ps(), f), fm1), fm2), sixth);
        const __m256 c1 = _mm256_mul_ps(_mm256_mul_ps(_mm256_mul_ps(fp1, fm1), fm2), half);
        const __m256 c2 = _mm256_mul_ps(_mm256_mul_ps(_mm256_mul_ps(_mm256_sub_ps(_mm256_setzero_ps(), fp1), f), fm2), half);
        const __m256 c3 = _mm256_mul_ps(_mm256_mul_ps(_mm256_mul_ps(fp1, f), fm1), sixth);
        const __m256 w = _mm256_mul_ps(_mm256_mul_ps(vk, _mm256_loadu_ps(wt + p)), _mm256_loadu_ps(wr + p));
        alignas(32) int idx[8];
        _mm256_store_si256(reinterpret_cast<__m256i*>(idx), i);
        const __m512d z01 = PAIR(0, 1), z23 = PAIR(2, 3), z45 = PAIR(4, 5), z67 = PAIR(6, 7);
        const __m512d a0 = _mm512_permutex2var_pd(z01, t0, z23), a1 = _mm512_permutex2var_pd(z01, t1, z23);
        const __m512d b0 = _mm512_permutex2var_pd(z45, t0, z67), b1 = _mm512_permutex2var_pd(z45, t1, z67);
        const __m512 s0 = _mm512_castpd_ps(_mm512_permutex2var_pd(a0, lo, b0)), s1 = _mm512_castpd_ps(_mm512_permutex2var_pd(a0, hi4, b0));
        const __m512 s2 = _mm512_castpd_ps(_mm512_permutex2var_pd(a1, lo, b1)), s3 = _mm512_castpd_ps(_mm512_permutex2var_pd(a1, hi4, b1));
        __m512 v = _mm512_mul_ps(D(c0), s0);
        v = _mm512_fmadd_ps(D(c1), s1, v);
        v = _mm512_fmadd_ps(D(c2), s2, v);
        v = _mm512_fmadd_ps(D(c3), s3, v);
        _mm512_storeu_ps(acc + 2 * p, _mm512_fmadd_ps(D(w), v, _mm512_loadu_ps(acc + 2 * p)));
    }
#undef PAIR
#undef D
}

UMBRA_AVX2 void linearAvx2(const float* ta, const float* tb, float off, const float* wt, const float* wr, float k, const float* tr,
                           float hi, size_t n, float* acc) {
    const __m128 one = _mm_set1_ps(1.0f), vhi = _mm_set1_ps(hi), vk = _mm_set1_ps(k), voff = _mm_set1_ps(off);
    const __m256i dup = _mm256_set_epi32(3, 3, 2, 2, 1, 1, 0, 0);
    for (size_t p = 0; p < n; p += 4) {
        __m128 q = _mm_add_ps(_mm_add_ps(_mm_loadu_ps(ta + p), _mm_loadu_ps(tb + p)), voff);
        q = _mm_min_ps(_mm_max_ps(q, one), vhi);
        const __m128i i = _mm_cvttps_epi32(q);
        const __m128 f = _mm_sub_ps(q, _mm_cvtepi32_ps(i));
        const __m128 w = _mm_mul_ps(_mm_mul_ps(vk, _mm_loadu_ps(wt + p)), _mm_loadu_ps(wr + p));
        alignas(16) int idx[4];
        _mm_store_si128(reinterpret_cast<__m128i*>(idx), i);
        // 16 bytes per pixel: (re, im) of samples i and i + 1; split into a = s_i, b = s_i+1.
        const __m256d z0 = _mm256_castps_pd(_mm256_insertf128_ps(_mm256_castps128_ps256(_mm_loadu_ps(tr + 2 * idx[0])), _mm_loadu_ps(tr + 2 * idx[1]), 1));
        const __m256d z1 = _mm256_castps_pd(_mm256_insertf128_ps(_mm256_castps128_ps256(_mm_loadu_ps(tr + 2 * idx[2])), _mm_loadu_ps(tr + 2 * idx[3]), 1));
        const __m256 a = _mm256_castpd_ps(_mm256_permute4x64_pd(_mm256_unpacklo_pd(z0, z1), 0xD8));
        const __m256 b = _mm256_castpd_ps(_mm256_permute4x64_pd(_mm256_unpackhi_pd(z0, z1), 0xD8));
        const __m256 f2 = _mm256_permutevar8x32_ps(_mm256_insertf128_ps(_mm256_setzero_ps(), f, 0), dup);
        const __m256 w2 = _mm256_permutevar8x32_ps(_mm256_insertf128_ps(_mm256_setzero_ps(), w, 0), dup);
        const __m256 v = _mm256_fmadd_ps(f2, _mm256_sub_ps(b, a), a);
        _mm256_storeu_ps(acc + 2 * p, _mm256_fmadd_ps(w2, v, _mm256_loadu_ps(acc + 2 * p)));
    }
}

void linear2Avx2(const float* ta1, float off1, const float* wt1, float k1, const float* tr1, const float* ta2, float off2,
                 const float* wt2, float k2, const float* tr2, const float* tb, const float* wr, float hi, size_t n, float* acc) {
    linearAvx2(ta1, tb, off1, wt1, wr, k1, tr1, hi, n, acc);
    linearAvx2(ta2, tb, off2, wt2, wr, k2, tr2, hi, n, acc);
}

}  // namespace

std::vector<DasKernels> availableKernels() {
    std::vector<DasKernels> v;
    __builtin_cpu_init();
    if (__builtin_cpu_supports("avx512f") && __builtin_cpu_supports("avx512dq") && __builtin_cpu_supports("avx512vl") &&
        __builtin_cpu_supports("fma"))
        v.push_back(DasKernels{linearLoadsAvx512, cubicAvx512, linear2LoadsAvx512, "avx512"});
    if (__builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma")) v.push_back(DasKernels{linearAvx2, cubicScalar, linear2Avx2, "avx2"});
    v.push_back(scalarKernels());
    return v;
}
#else
std::vector<DasKernels> availableKernels() { return {scalarKernels()}; }
#endif

DasKernels bestKernels() {
    static const DasKernels k = availableKernels().front();
    return k;
}

DasKernels scalarKernels() { return DasKernels{linearScalar, cubicScalar, linear2Scalar, "scalar"}; }

void dasCoherence(bool cubic, const float* ta, const float* tb, float off, const float* wt, const float* wr, float k, const float* tr,
                  float hi, size_t n, float* acc, float* s2) {
    for (size_t p = 0; p < n; ++p) {
        float q = (ta[p] + tb[p]) + off;
        q = q < 1.0f ? 1.0f : q;
        q = q > hi ? hi : q;
        const int i = int(q);
        const float f = q - float(i);
        float re, im;
        if (cubic) {
            float c0, c1, c2, c3;
            lagrange4(f, c0, c1, c2, c3);
            const float* s = tr + 2 * (i - 1);
            re = c0 * s[0] + c1 * s[2] + c2 * s[4] + c3 * s[6];
            im = c0 * s[1] + c1 * s[3] + c2 * s[5] + c3 * s[7];
        } else {
            const float* s = tr + 2 * i;
            re = s[0] + f * (s[2] - s[0]);
            im = s[1] + f * (s[3] - s[1]);
        }
        const float w = (k * wt[p]) * wr[p];
        acc[2 * p] += w * re;
        acc[2 * p + 1] += w * im;
        s2[p] += w * (re * re + im * im);
    }
}

}  // namespace detail
}  // namespace umbra::recon
