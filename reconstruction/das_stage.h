// SPDX-License-Identifier: MIT
#pragma once
// Delay-and-sum stage: total focusing method for full-matrix (single_element) captures
// (Holmes, Drinkwater & Wilcox, NDT&E Int. 38 (2005) 701-711: delay (|r - tx| + |r - rx|) / c),
// coherent compounding for plane_wave (Montaldo et al., IEEE TUFFC 56(3), 2009) and
// virtual_source captures, on complex (analytic) samples. Receive apodization with a dynamic
// aperture set by an f-number, transmit weighting, linear or cubic (4-point Lagrange)
// interpolation of the analytic signal after band-limited upsampling (so the interpolation
// loses at most kInterpolationLossTargetDb at the centre frequency), optional coherence-factor
// weighting (Hollman, Rigby & O'Donnell, IEEE Ultrasonics Symposium 1999, in its weighted form).
//
// Amplitude: each pixel's coherent sum is divided by the sum of the weights of its terms
// (transmit weight x receive weight), so a pixel reads the weighted mean of the aligned echo
// amplitudes: equal reflectors read equal at any depth and position inside the aperture,
// whatever the f-number, window or number of elements.
#include <cstddef>
#include <string>
#include <vector>

#include "core/capture.h"
#include "core/parameters.h"

namespace umbra::recon {

struct DasParams {
    std::string method = "delay_and_sum";  ///< "delay_and_sum", or "wavenumber" (f-k / Stolt migration, reconstruction/wavenumber_stage.h)
    std::string aperture = "f_number";  ///< "f_number": dynamic aperture z / F# centred on the pixel; "full": every element
    double f_number = 1.0;              ///< receive (and, for full-matrix, transmit) f-number, > 0; default 1.0
    std::string apodization = "hann";   ///< window across the aperture: "rectangular", "hann", "tukey"
    double tukey_alpha = 0.5;           ///< tapered fraction of the Tukey window, [0, 1]; default 0.5
    std::string transmit_weighting = "uniform";  ///< window over plane-wave angles / virtual sources: "uniform", "hann", "tukey"
    std::string interpolation = "linear";        ///< complex-sample interpolation: "linear" or "cubic" (4-point Lagrange)
    int upsampling = 0;  ///< band-limited upsampling factor of the analytic traces before interpolation; 0 (default) = automatic
    bool coherence_factor = false;               ///< multiply the image by the coherence factor
    bool reciprocity = true;  ///< full-matrix: sum tx < rx pairs once, doubled, plus the diagonal (halves the work)
    int tile_pixels = 1024;   ///< pixels per work tile (advanced; the image does not depend on it)
    /// Elements left out of the sum (0-based here; "3, 17-19" in the recipe counts from 1): their
    /// apodization weight is 0 as transmitter and receiver (a weak or dead element). Default none.
    std::vector<int> excluded_elements;
};

/// Parses an element list such as "3, 17-19" (element numbers from 1, ranges inclusive; "" =
/// none) into sorted 0-based indices. Throws SettingError naming das.excluded_elements.
std::vector<int> parseElementList(const std::string& text);
/// The list as the recipe writes it: 0-based indices -> "3, 17-19" (numbers from 1).
std::string elementListText(const std::vector<int>& zero_based);

/// Declaration of the "das" stage.
core::StageSpec dasSpec();
/// The stage's values from a recipe, checked (f-number > 0 etc.; SettingError otherwise).
DasParams dasParams(const core::Recipe& r);

/// Transmit weights per transmit event: 1 for full-matrix captures; for plane waves and virtual
/// sources the das.transmit_weighting window over the events in angle (or source x) order.
std::vector<float> transmitWeights(const core::CaptureHeader& h, const DasParams& p);

/// Interpolation-loss target of the automatic upsampling factor, dB at the centre frequency.
inline constexpr double kInterpolationLossTargetDb = 0.1;
/// Largest automatic upsampling factor.
inline constexpr int kMaxUpsampling = 16;

/// Amplitude gain (<= 1) of the interpolator for a tone at f_hz sampled at fs_hz: the smaller
/// of the response at the worst fractional delay and the mean complex response over all
/// fractional delays (what a coherent sum of many terms with spread fractions sees).
/// Linear: both are cos(pi f / fs). kind: "linear" or "cubic".
double interpolationGain(const std::string& kind, double f_hz, double fs_hz);
/// Upsampling factor used: p.upsampling when > 0, else the smallest U in [1, kMaxUpsampling]
/// whose interpolation loss at f0 stays within kInterpolationLossTargetDb.
int upsamplingFactor(const DasParams& p, double fs_hz, double f0_hz);
/// Interpolation loss (dB, >= 0) at f0 with the upsampling factor the recipe gives.
double interpolationLossDb(const DasParams& p, double fs_hz, double f0_hz);

/// Window value at normalised aperture position u in [-1, 1] (0 at the centre; 0 outside).
/// kind: "rectangular"/"uniform", "hann", "tukey" (alpha = tapered fraction).
float apodizationWeight(const std::string& kind, double u, double alpha);

namespace detail {
/// Guard samples before sample 0 of each stored complex trace.
constexpr size_t kTracePad = 2;
/// Stored complex samples per trace of n samples (guards before and after).
constexpr size_t traceStride(size_t n) { return n + kTracePad + 3; }
/// Kernels process pixels in groups of this many (tiles are padded to a multiple).
constexpr size_t kLanes = 16;

/// Hot loop signature. For pixel p < n (n a multiple of kLanes): position
/// q = (ta[p] + tb[p]) + off (transmit and receive delays in samples, plus the offset of
/// the trace start and the guards) clamped to [1, hi]; value = interpolation of the
/// interleaved complex trace `tr` at q; weight (k wt[p]) wr[p]; accumulated into the
/// interleaved complex accumulator acc[2p], acc[2p+1].
using DasKernel = void (*)(const float* ta, const float* tb, float off, const float* wt, const float* wr, float k, const float* tr,
                           float hi, size_t n, float* acc);

/// Two transmits with one receive row: exactly DasKernel(ta1, ...) then DasKernel(ta2, ...)
/// (the same operations in the same order), sharing the receive loads and accumulator traffic.
using DasKernel2 = void (*)(const float* ta1, float off1, const float* wt1, float k1, const float* tr1, const float* ta2, float off2,
                            const float* wt2, float k2, const float* tr2, const float* tb, const float* wr, float hi, size_t n,
                            float* acc);

struct DasKernels {
    DasKernel linear, cubic;
    DasKernel2 linear2;  ///< fused pair for linear interpolation
    const char* name;    ///< "avx512", "avx2" or "scalar"
};
/// Portable kernels (any x86-64 or other CPU).
DasKernels scalarKernels();
/// The fastest kernels this CPU runs (chosen at run time: AVX-512, AVX2+FMA, else scalar).
/// Every path gives the same result for any tile size or thread count on one machine.
DasKernels bestKernels();
/// Every kernel set this CPU can run, fastest first (for tests).
std::vector<DasKernels> availableKernels();

/// As the kernels, and also accumulates w |sample|^2 (w = k wt wr, the term's weight) into s2,
/// for the weighted coherence factor.
void dasCoherence(bool cubic, const float* ta, const float* tb, float off, const float* wt, const float* wr, float k, const float* tr,
                  float hi, size_t n, float* acc, float* s2);
}  // namespace detail

}  // namespace umbra::recon
