// SPDX-License-Identifier: MIT
// Wavenumber (f-k) imaging: full-matrix f-k migration and plane-wave Stolt migration.
//
// Notation: k = omega / c; element grid x_j = x0 + j dx (j = 0 .. n-1); lateral wavenumbers
// k_i = i dk, dk = 2 pi / (Mx dx) (Mx the padded lateral FFT size); time window of Nw samples from
// t_b, zero-padded to Mt. The image is the 2-D Fourier series
//     I(x, z) = sum_Kx sum_Kz F(Kx, Kz) exp(i Kx (x - x0)) exp(i Kz z)
// with F filled by the Stolt mapping from the data spectrum (1-D interpolation along frequency).
//
// Amplitude. With the weight W = k^-1/2 (k / kz)^3/2 per one-way propagation (kz = k cos phi,
// phi the ray angle from z), the receive back-propagation kernel
// (1/Mx) sum_k W exp(i k (x - xe) + i kz z) is, by stationary phase, dx / sqrt(2 pi z) times a
// pure delay |r - e| / c (and a constant phase): the migration then equals a delay-and-sum of
// the analytic traces with weight dx / sqrt(2 pi z) per element (squared for the full matrix),
// times the angle window. Dividing each pixel by that weight summed over the elements that
// reach it gives the weighted mean of the aligned echoes, the delay-and-sum convention.
#include "reconstruction/wavenumber_stage.h"

#include <fftw3.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <complex>
#include <cstring>
#include <functional>
#include <numeric>
#include <thread>

#include "core/error.h"
#include "reconstruction/bandpass_stage.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/detail/fftw_lock.h"
#include "reconstruction/detail/spec_helpers.h"
#include "reconstruction/detail/thread_pool.h"

namespace umbra::recon {

using cfloat = std::complex<float>;

core::StageSpec wavenumberSpec() {
    using namespace detail;
    return {"wavenumber",
            "Wavenumber imaging",
            "f-k migration (full matrix) and Stolt migration (plane waves), used when das.method = wavenumber: linear arrays with "
            "evenly spaced elements, homogeneous medium.",
            {modalRealParam("lateral_padding", "Lateral padding",
                            "Zero-padded lateral FFT extent over the array's length (keeps the image from wrapping round sideways); "
                            "automatic: the array, the region beside it and the aperture's spread at the deepest row.",
                            "", 0, 4, "automatic", 0.25),
             realParam("temporal_padding", "Temporal padding",
                       "Zero-padded time FFT length over the samples used (smooth spectra for the Stolt interpolation, no wrap in time).",
                       "", 1.5, 4, 2.0, false, 0.25),
             realParam("max_angle_deg", "Largest angle (full aperture)",
                       "Largest propagation angle from the depth axis used when das.aperture = full.", "deg", 10, 80, 60, false, 5)}};
}

WavenumberParams wavenumberParams(const core::Recipe& r) {
    WavenumberParams p;
    p.lateral_padding = r.number("wavenumber.lateral_padding");
    p.temporal_padding = r.number("wavenumber.temporal_padding");
    p.max_angle_deg = r.number("wavenumber.max_angle_deg");
    if (!(p.lateral_padding == 0 || (p.lateral_padding >= 1.25 && p.lateral_padding <= 4)))
        throw core::SettingError("wavenumber.lateral_padding = " + std::to_string(p.lateral_padding) + ": must be 0 (automatic) or 1.25 to 4");
    if (!(p.temporal_padding >= 1.5 && p.temporal_padding <= 4))
        throw core::SettingError("wavenumber.temporal_padding = " + std::to_string(p.temporal_padding) + ": must be 1.5 to 4");
    if (!(p.max_angle_deg >= 10 && p.max_angle_deg <= 80))
        throw core::SettingError("wavenumber.max_angle_deg = " + std::to_string(p.max_angle_deg) + ": must be 10 to 80 degrees");
    return p;
}

size_t fastFftSize(size_t n) {
    for (size_t m = std::max<size_t>(n, 1);; ++m) {
        size_t r = m;
        for (size_t f : {2, 3, 5})
            while (r % f == 0) r /= f;
        if (r == 1) return m;
    }
}

namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr size_t kMaxTransformBytes = size_t(1) << 30;
constexpr size_t kRawBlockBytes = size_t(64) << 20;  // raw traces read per batch of transmits
constexpr int kTaps = 6;          // Lanczos-3 interpolation along frequency
constexpr int kFractions = 512;   // table resolution of the fractional bin position
constexpr size_t kChunk = 8;      // frequency bins per strided lateral FFT (one cache line)
constexpr int kAngleTable = 4096;
constexpr int kPhaseTable = 4096;

using Clock = std::chrono::steady_clock;
double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

// Element columns of an evenly spaced linear array along x: x_e = x0 + col[e] dx.
struct ArrayGrid {
    double x0 = 0, dx = 0;
    size_t n = 0;
    std::vector<size_t> col;
};

ArrayGrid arrayGrid(const core::CaptureHeader& h) {
    const auto& P = h.array.element_position_m;
    if (P.size() < 2) throw core::SettingError("wavenumber imaging needs an array of at least 2 elements");
    ArrayGrid g;
    std::vector<double> xs;
    for (const auto& p : P) {
        if (std::fabs(p[1]) > 1e-9 || std::fabs(p[2]) > 1e-9)
            throw core::SettingError("wavenumber imaging needs a linear array along x at z = 0 (an element lies off the x axis)");
        xs.push_back(p[0]);
    }
    std::vector<double> s = xs;
    std::sort(s.begin(), s.end());
    double dmin = 1e300;
    for (size_t i = 1; i < s.size(); ++i) dmin = std::min(dmin, s[i] - s[i - 1]);
    if (!(dmin > 1e-9)) throw core::SettingError("wavenumber imaging: two elements share one position");
    g.x0 = s.front();
    g.dx = dmin;
    g.n = size_t(std::llround((s.back() - s.front()) / dmin)) + 1;
    for (double x : xs) {
        const double j = (x - g.x0) / g.dx;
        if (std::fabs(j - std::round(j)) > 1e-3)
            throw core::SettingError("wavenumber imaging needs evenly spaced elements: the element at x = " + std::to_string(x * 1e3) +
                                     " mm is not on a whole number of the smallest gap (" + std::to_string(g.dx * 1e3) + " mm) from the first");
        g.col.push_back(size_t(std::llround(j)));
    }
    if (g.n > 8 * P.size()) throw core::SettingError("wavenumber imaging needs evenly spaced elements (the gaps are uneven)");
    return g;
}

// Lanczos-3 taps for fractional positions f = i / kFractions: weights of samples at offsets -2 .. 3.
std::vector<float> lanczosTable() {
    std::vector<float> t(size_t(kFractions + 1) * kTaps);
    auto sinc = [](double x) { return std::fabs(x) < 1e-12 ? 1.0 : std::sin(kPi * x) / (kPi * x); };
    for (int i = 0; i <= kFractions; ++i) {
        const double f = double(i) / kFractions;
        double w[kTaps], sum = 0;
        for (int d = 0; d < kTaps; ++d) {
            const double x = double(d - 2) - f;
            w[d] = std::fabs(x) < 3 ? sinc(x) * sinc(x / 3) : 0.0;
            sum += w[d];
        }
        for (int d = 0; d < kTaps; ++d) t[size_t(i) * kTaps + size_t(d)] = float(w[d] / sum);
    }
    return t;
}

#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__)
#define UMBRA_FK_WIDE __attribute__((target_clones("avx512f", "avx2", "default")))
#else
#define UMBRA_FK_WIDE
#endif

// One plane-wave Stolt column: lateral wavenumber Kx, angle (ca = cos a, sa = sin a), n depth
// wavenumbers Kz = kz0 + i dkz.
struct PlaneWaveColumn {
    float Kx, ca, sa, kz0, dkz, k_lo, k_hi, inv_tan, c_over_dw, mb0, cT, pref;
};

// For each Kz: k = (Kx^2 + Kz^2) / (2 (Kz ca + Kx sa)); fractional spectrum bin q, weight w
// (pref x aperture x W x Jacobian; 0 where the mapping leaves the band, is evanescent or outside
// the aperture) and phase k c T (rad). Branch-free so it vectorises (clones per CPU).
UMBRA_FK_WIDE void planeWaveMapping(const PlaneWaveColumn& r, const float* __restrict table, int table_n, size_t n, float* __restrict q,
                                    float* __restrict w, float* __restrict th) {
    for (size_t i = 0; i < n; ++i) {
        const float Kz = r.kz0 + float(i) * r.dkz;
        const float den = 2 * (Kz * r.ca + r.Kx * r.sa);
        const float k = (r.Kx * r.Kx + Kz * Kz) / (den > 0 ? den : 1.0f);
        const float kz = Kz - k * r.ca, kx = r.Kx - k * r.sa;
        const bool ok = den > 0 && k >= r.k_lo && k <= r.k_hi && kz > 0;
        const float kzs = ok ? kz : 1.0f;
        float u = std::fabs(kx) / kzs * r.inv_tan;
        const bool inside = u <= 1.0f;
        u = inside ? u : 1.0f;
        const float wa = table[int(u * float(table_n) + 0.5f)];
        const float jac = 1 / (r.ca + (k + kx * r.sa) / kzs);
        w[i] = (ok && inside) ? r.pref * wa * k / (kzs * std::sqrt(kzs)) * jac : 0.0f;
        q[i] = k * r.c_over_dw - r.mb0;
        th[i] = k * r.cT;
    }
}

// One full-matrix Stolt pair (kt, kr) (a = kt^2, b = kr^2, akt = |kt|, akr = |kr|), n depth
// wavenumbers Kz = kz0 + i dkz.
struct FmcColumn {
    float a, b, akt, akr, kz0, dkz, k_lo, k_hi, inv_tan, c_over_dw, mb0, cT, pref;
};

// For each Kz: u = (Kz + (b - a)/Kz)/2 = sqrt(k^2 - kt^2), v = Kz - u, k = sqrt(u^2 + a); bin q,
// weight w (pref x apertures x W_t W_r x Jacobian = pref wa k / (sqrt(uv) Kz); 0 outside) and
// phase k c T. Branch-free, vector clones per CPU.
UMBRA_FK_WIDE void fmcMapping(const FmcColumn& r, const float* __restrict table, int table_n, size_t n, float* __restrict q,
                              float* __restrict w, float* __restrict th) {
    for (size_t i = 0; i < n; ++i) {
        const float Kz = r.kz0 + float(i) * r.dkz;
        const float Kzs = Kz > 0 ? Kz : 1.0f;
        const float u = (Kzs + (r.b - r.a) / Kzs) * 0.5f, v = Kzs - u;
        bool ok = Kz > 0 && u > 0 && v > 0;
        const float us = ok ? u : 1.0f, vs = ok ? v : 1.0f;
        const float k = std::sqrt(us * us + r.a);
        ok = ok && k >= r.k_lo && k <= r.k_hi;
        float ut = r.akt / us * r.inv_tan, ur = r.akr / vs * r.inv_tan;
        const bool inside = ut <= 1.0f && ur <= 1.0f;
        ut = ut <= 1.0f ? ut : 1.0f;
        ur = ur <= 1.0f ? ur : 1.0f;
        const float wa = table[int(ut * float(table_n) + 0.5f)] * table[int(ur * float(table_n) + 0.5f)];
        w[i] = (ok && inside) ? r.pref * wa * k / (std::sqrt(us * vs) * Kzs) : 0.0f;
        q[i] = k * r.c_over_dw - r.mb0;
        th[i] = k * r.cT;
    }
}

struct FftwFree {
    void operator()(void* p) const { fftwf_free(p); }
};
using CBuf = std::unique_ptr<cfloat[], FftwFree>;
CBuf allocComplex(size_t n) {
    auto* p = reinterpret_cast<cfloat*>(fftwf_alloc_complex(std::max<size_t>(n, 1)));
    if (!p) throw std::bad_alloc();
    return CBuf(p);
}

struct Plan {
    fftwf_plan p = nullptr;
    Plan() = default;
    explicit Plan(fftwf_plan q) : p(q) {}
    Plan(Plan&& o) noexcept : p(o.p) { o.p = nullptr; }
    Plan& operator=(Plan&& o) noexcept {
        std::swap(p, o.p);
        return *this;
    }
    ~Plan() {
        if (p) {
            std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
            fftwf_destroy_plan(p);
        }
    }
};

}  // namespace

void checkWavenumberCapture(const core::CaptureHeader& h) {
    if (h.medium.wedge) throw core::SettingError("wavenumber imaging needs a homogeneous medium: the capture has a wedge (use das.method = delay_and_sum)");
    if (h.transmit.kind == core::TransmitKind::VirtualSource)
        throw core::SettingError("wavenumber imaging handles full-matrix and plane-wave captures, not virtual sources (use das.method = delay_and_sum)");
    const auto& st = h.receive.start_time_s;
    for (double t : st)
        if (std::fabs(t - st.front()) > 1e-12)
            throw core::SettingError("wavenumber imaging needs the same start time for every transmit (they differ: " + std::to_string(st.front() * 1e6) +
                                     " us and " + std::to_string(t * 1e6) + " us)");
    const ArrayGrid g = arrayGrid(h);
    auto unique = [&](const std::vector<int32_t>& v, const char* what) {
        std::vector<int32_t> s = v;
        std::sort(s.begin(), s.end());
        if (std::adjacent_find(s.begin(), s.end()) != s.end())
            throw core::SettingError(std::string("wavenumber imaging needs each ") + what + " element once");
        for (int32_t e : s)
            if (e < 0 || size_t(e) >= h.array.elementCount()) throw core::SettingError(std::string("wavenumber imaging: ") + what + " element index out of range");
    };
    unique(h.receive.element_index, "receive");
    if (h.transmit.kind == core::TransmitKind::SingleElement) unique(h.transmit.source_element, "transmit");
}

struct WavenumberImager::Impl {
    const core::CaptureReader& cap;
    core::CaptureHeader h;
    core::Recipe recipe;
    Grid grid;
    DasParams das;
    WavenumberParams wp;
    ArrayGrid ag;
    bool fmc = true;
    double c = 0, fs = 0, t_b = 0, t_c = 0;
    size_t ns = 0, nrx = 0, ntx = 0, n_lo = 0, nw = 0, mt = 0, mx = 0;
    size_t mb0 = 0, nb = 0, nbp = 0;   // first stored frequency bin, stored bins, stored bins padded to kChunk
    double k_lo = 0, k_hi = 0;         // wavenumber band used, rad/m
    double tan_lim = 0;                // largest tan(angle) in the aperture
    double sin_lim = 0;                // its sine
    bool angle_window = true;          // f_number aperture: window over angle; full: window over elements
    int apod_kind = 1;                 // 0 rectangular, 1 hann, 2 tukey
    double dk = 0;                     // lateral wavenumber step, rad/m
    long kt_max = 0, kx_max = 0;       // one-way and output lateral wavenumber index bounds
    size_t nz_n = 0, rz = 1;           // native depth FFT size and output decimation
    long j_lo = 0, j_hi = 0, j_c = 0;  // depth wavenumber bins Kz = j dKz
    double dkz = 0;
    size_t lx = 0;                     // native lateral FFT size
    std::vector<float> bp;             // band-pass weights of the stored bins
    std::vector<cfloat> centring;      // exp(i w_m t_c) per stored bin
    std::vector<float> tx_weight;      // per transmit (plane waves)
    std::vector<float> space_w;        // per element column (full aperture window), else 1
    std::vector<float> lanczos;
    std::vector<float> angle_table;    // aperture weight at u = tan(angle) / tan_lim, kAngleTable + 1 steps over [0, 1]
    std::vector<cfloat> phase_table;   // exp(-i 2 pi n / kPhaseTable), n = 0 .. kPhaseTable
    std::vector<float> norm;           // [nz_out][nx_out] aperture weight sum per pixel (0: pixel not imaged)
    std::vector<size_t> col_i0, col_i1;  // per output column: native lateral samples either side
    std::vector<float> col_fr;         // and the fraction between them
    bool symmetric = false;            // full matrix, one element set, reciprocity on: kt <= kr pairs once, doubled
    std::vector<double> cum_window;    // cumulative integral of the aperture window over u in [-1, 1]
    std::vector<double> col_prefix_tx, col_prefix_rx;  // prefix sums of space_w over columns used
    std::vector<size_t> tx_col, rx_col;
    int threads = 1;
    std::unique_ptr<detail::ThreadPool> pool;

    CBuf data;                         // FMC [Mx][Mx][nbp]; plane wave [ntx][Mx][nbp]
    size_t data_size = 0;
    CBuf kspace;                       // [2 kx_max + 1][nKz]
    std::vector<float> raw;            // a block of transmits [block_tx][nrx][ns]
    size_t block_tx = 1;
    Plan lateral_plan;                 // strided FFT along the receive index, kChunk bins
    Plan transmit_plan;                // full matrix: strided FFT along the transmit index, kChunk bins
    struct Worker {
        float* rin = nullptr;
        cfloat* spec = nullptr;
        cfloat* zbuf = nullptr;
        cfloat* xbuf = nullptr;
        std::vector<float> q, w, th;  // Stolt column scratch
        ~Worker() {
            fftwf_free(rin);
            fftwf_free(spec);
            fftwf_free(zbuf);
            fftwf_free(xbuf);
        }
    };
    std::vector<Worker> workers;
    Plan r2c, zplan, xplan;
    std::vector<cfloat> zrows;         // [nz_out][2 kx_max + 1] after the depth transform

    Impl(const core::CaptureReader& cr, const core::Recipe& r, const Grid& g, int nthreads) : cap(cr), h(cr.header()), recipe(r), grid(g) {
        checkWavenumberCapture(h);
        das = dasParams(recipe);
        wp = wavenumberParams(recipe);
        if (das.coherence_factor)
            throw core::SettingError("das.coherence_factor needs the individual delay-and-sum terms: not available with das.method = wavenumber");
        ag = arrayGrid(h);
        fmc = h.transmit.kind == core::TransmitKind::SingleElement;
        c = resolvedSpeed(h, recipe);
        fs = h.receive.sampling_frequency_hz;
        ns = h.samples;
        nrx = h.receives();
        ntx = h.transmits();
        if (ns == 0 || nrx == 0 || ntx == 0 || !(fs > 0)) throw core::InputError(cr.path(), "/data/rf", "the capture holds no traces to reconstruct");
        const double f0 = h.array.centre_frequency_hz;
        const double B = std::max(h.array.fractional_bandwidth > 0 ? h.array.fractional_bandwidth : 0.6, 0.2);
        for (auto e : h.receive.element_index) rx_col.push_back(ag.col[size_t(e)]);
        if (fmc)
            for (auto e : h.transmit.source_element) tx_col.push_back(ag.col[size_t(e)]);
        tx_weight = transmitWeights(h, das);

        // Aperture: window over the ray angle (f-number: u = 2 F# tan(phi)) or over the elements.
        apod_kind = das.apodization == "rectangular" ? 0 : das.apodization == "hann" ? 1 : 2;
        angle_window = das.aperture != "full";
        tan_lim = angle_window ? 1 / (2 * das.f_number) : std::tan(wp.max_angle_deg * kPi / 180);
        space_w.assign(ag.n, 1.0f);
        if (!angle_window) {
            const double half = (double(ag.n) - 1) * ag.dx / 2 + ag.dx / 2, xc = ag.x0 + (double(ag.n) - 1) * ag.dx / 2;
            for (size_t j = 0; j < ag.n; ++j)
                space_w[j] = apodizationWeight(das.apodization, (ag.x0 + double(j) * ag.dx - xc) / half, das.tukey_alpha);
        }
        constexpr int kCum = 2048;
        cum_window.assign(kCum + 1, 0.0);
        for (int i = 1; i <= kCum; ++i) {
            const double u0 = -1 + 2.0 * (i - 1) / kCum, u1 = -1 + 2.0 * i / kCum;
            cum_window[size_t(i)] = cum_window[size_t(i) - 1] + (window(u0) + window(u1)) / 2 * (u1 - u0);
        }
        auto prefix = [&](const std::vector<size_t>& cols) {
            std::vector<double> p(ag.n + 1, 0.0), w(ag.n, 0.0);
            for (size_t cl : cols) w[cl] = space_w[cl];
            for (size_t j = 0; j < ag.n; ++j) p[j + 1] = p[j] + w[j];
            return p;
        };
        col_prefix_rx = prefix(rx_col);
        col_prefix_tx = fmc ? prefix(tx_col) : col_prefix_rx;

        // Time window: the samples any pixel of the grid can read, plus the pulse's tails.
        const double xa = ag.x0, xb = ag.x0 + double(ag.n - 1) * ag.dx;
        const double zmin = std::max(grid.z_min_m, 0.0), zmax = std::max(grid.z_max_m, 0.0);
        double rmax = 0;
        for (double xp : {grid.x_min_m, grid.x_max_m})
            for (double xe : {xa, xb}) rmax = std::max(rmax, std::hypot(xp - xe, zmax));
        double tlo, thi;
        if (fmc) {
            tlo = 2 * zmin / c;
            thi = 2 * rmax / c;
        } else {
            tlo = 1e300;
            thi = -1e300;
            for (double a : h.transmit.angle_rad)
                for (double xp : {grid.x_min_m, grid.x_max_m})
                    for (double zp : {zmin, zmax}) {
                        const double ttx = (zp * std::cos(a) + xp * std::sin(a)) / c;
                        tlo = std::min(tlo, ttx + zmin / c);
                        thi = std::max(thi, ttx + rmax / c);
                    }
        }
        const double tail = 2 / (B * std::max(f0, 1.0));
        const double t0 = h.receive.start_time_s.empty() ? 0.0 : h.receive.start_time_s.front();
        const double lo = std::floor((tlo - tail - t0) * fs), hi = std::ceil((thi + tail - t0) * fs);
        n_lo = size_t(std::clamp(lo, 0.0, double(ns)));
        const size_t n_hi = size_t(std::clamp(hi, double(n_lo), double(ns)));
        nw = std::max<size_t>(n_hi - n_lo, std::min<size_t>(ns - n_lo, 16));
        if (nw == 0) {  // the grid lies beyond the recording: nothing to image
            n_lo = 0;
            nw = std::min<size_t>(ns, 16);
        }
        mt = fastFftSize(size_t(std::ceil(wp.temporal_padding * double(nw))));
        if (mt % 2) mt = fastFftSize(mt + 1);
        t_b = t0 + double(n_lo) / fs;
        t_c = double(nw) / (2 * fs);

        // Frequency band: where the band-pass passes (all of 0 < f < fs/2 when it is off).
        const auto w = bandpassWeights(bandpassParams(recipe), mt, fs, f0, h.array.fractional_bandwidth);
        size_t m_lo = 0, m_hi = 0;
        for (size_t m = 1; m < mt / 2; ++m)
            if (w[m] > 0) {
                if (!m_lo) m_lo = m;
                m_hi = m;
            }
        if (!m_lo) throw core::SettingError("wavenumber imaging: the band-pass leaves no frequencies to image");
        mb0 = m_lo >= 3 ? m_lo - 3 : 0;
        const size_t mb1 = std::min(m_hi + 3, mt / 2);
        nb = mb1 - mb0 + 1;
        nbp = (nb + kChunk - 1) / kChunk * kChunk;
        bp.assign(nbp, 0.0f);
        centring.assign(nbp, cfloat(0));
        for (size_t i = 0; i < nb; ++i) {
            const size_t m = mb0 + i;
            bp[i] = (m >= m_lo && m <= m_hi) ? w[m] : 0.0f;
            const double om = 2 * kPi * double(m) * fs / double(mt);
            centring[i] = cfloat(float(std::cos(om * t_c)), float(std::sin(om * t_c)));
        }
        k_lo = 2 * kPi * double(m_lo) * fs / double(mt) / c;
        k_hi = 2 * kPi * double(m_hi) * fs / double(mt) / c;

        // Lateral: padded FFT, and the wavenumbers the aperture can reach (beyond the element
        // grid's Nyquist limit too: the spectrum repeats, as grating lobes do in delay-and-sum).
        sin_lim = tan_lim / std::sqrt(1 + tan_lim * tan_lim);
        const double cos_lim = 1 / std::sqrt(1 + tan_lim * tan_lim);
        if (wp.lateral_padding > 0) {
            mx = fastFftSize(size_t(std::ceil(wp.lateral_padding * double(ag.n))));
        } else {
            // Automatic: the period must hold the array and the region beside it plus the lateral
            // spread of the aperture at the deepest row (z tan(angle)) and a few wavelengths, so no
            // element's contribution wraps round into the region.
            const double lo = std::min(xa, grid.x_min_m), hi = std::max(xb, grid.x_max_m);
            const double need = hi - lo + zmax * tan_lim + 4 * c / std::max(f0, 1.0);
            mx = fastFftSize(std::max<size_t>(size_t(std::ceil(need / ag.dx)) + 1, size_t(std::ceil(1.25 * double(ag.n)))));
        }
        dk = 2 * kPi / (double(mx) * ag.dx);
        kt_max = long(std::ceil(k_hi * sin_lim / dk));
        double smax = 0, cmin = 1;
        for (double a : h.transmit.angle_rad) {
            smax = std::max(smax, std::fabs(std::sin(a)));
            cmin = std::min(cmin, std::cos(a));
        }
        kx_max = fmc ? 2 * kt_max : long(std::ceil(k_hi * (sin_lim + smax) / dk));

        // Depth: the native depth grid is the output grid refined by rz (so the band fits), its
        // period long enough for all the migrated energy of the window (no wrap into the grid).
        const double kz_lo = fmc ? 2 * k_lo * cos_lim : k_lo * (cmin + cos_lim), kz_hi = 2 * k_hi;
        rz = size_t(std::max(1.0, std::ceil(1.2 * (kz_hi - kz_lo) * grid.step_m / (2 * kPi))));
        const double dzn = grid.step_m / double(rz);
        const double t_end = t_b + double(nw) / fs;
        // Depths the window's samples can migrate to, [e0, e1]: a sample at time t lands at
        // z <= c t / 2 (full matrix) or (c t + |x| sin a) / (1 + cos a) (plane wave), and at
        // z >= c t cos(angle limit) / 2 (full matrix) or (c t - |x| sin a) / (1 + 1 / cos(limit)),
        // widened by the pulse. The aliases of [e0, e1] one period away must miss the grid.
        const double xabs = std::max({std::fabs(grid.x_min_m), std::fabs(grid.x_max_m), std::fabs(xa), std::fabs(xb)});
        const double e1 = (fmc ? c * t_end / 2 : (c * t_end + xabs * smax) / (1 + cmin)) + 2 * tail * c;
        const double e0 = (fmc ? c * t_b * cos_lim / 2 : std::max(c * t_b - xabs * smax, 0.0) / (1 + 1 / cos_lim)) - 2 * tail * c;
        const double zperiod = 1.1 * std::max({e1 - grid.z_min_m, grid.z_max_m - e0, grid.z_max_m - grid.z_min_m + grid.step_m});
        const size_t nz_out = grid.nz();
        nz_n = fastFftSize(std::max<size_t>((nz_out - 1) * rz + 1, size_t(std::ceil(zperiod / dzn))));
        dkz = 2 * kPi / (double(nz_n) * dzn);
        j_lo = long(std::floor(kz_lo / dkz));
        j_hi = long(std::ceil(kz_hi / dkz));
        j_c = (j_lo + j_hi) / 2;
        if (size_t(j_hi - j_lo + 1) > nz_n) throw core::SettingError("wavenumber imaging: depth band does not fit (internal)");

        // Native lateral grid: period Mx dx, at least 2 samples per cycle of the highest Kx (the
        // point-spread function's content sits well below it) and at least as fine as the output
        // step; linear interpolation onto the output columns.
        const double period = double(mx) * ag.dx;
        lx = fastFftSize(std::max({size_t(std::ceil(period / grid.step_m)), size_t(2 * (2 * kx_max + 1)), size_t(mx)}));

        data_size = (fmc ? mx * mx : ntx * mx) * nbp;
        const int nthr = std::clamp(nthreads > 0 ? nthreads : int(std::max(1u, std::thread::hardware_concurrency())), 1, 256);
        const double bytes = double(data_size) * sizeof(cfloat) + double(2 * kx_max + 1) * double(j_hi - j_lo + 1) * sizeof(cfloat) +
                             double(nz_out) * double(2 * kx_max + 1) * sizeof(cfloat) +
                             double(nthr) * double(nz_n + lx + mt) * sizeof(cfloat) + double(grid.nx() * nz_out) * sizeof(float);
        if (bytes > double(kMaxTransformBytes))
            throw core::SettingError("wavenumber imaging would need " + std::to_string(bytes / double(1 << 20)) +
                                     " MiB for its transforms (limit 1024 MiB): use a smaller region or padding, or das.method = delay_and_sum");
        data = allocComplex(data_size);
        kspace = allocComplex(size_t(2 * kx_max + 1) * size_t(j_hi - j_lo + 1));
        zrows.assign(nz_out * size_t(2 * kx_max + 1), cfloat(0));
        block_tx = std::clamp<size_t>(kRawBlockBytes / std::max<size_t>(nrx * ns * sizeof(float), 1), 1, ntx);
        raw.resize(block_tx * nrx * ns);
        lanczos = lanczosTable();
        angle_table.resize(kAngleTable + 1);
        for (int i = 0; i <= kAngleTable; ++i) angle_table[size_t(i)] = angle_window ? float(window(double(i) / kAngleTable)) : 1.0f;
        phase_table.resize(kPhaseTable + 1);
        for (int i = 0; i <= kPhaseTable; ++i)
            phase_table[size_t(i)] = cfloat(float(std::cos(2 * kPi * i / kPhaseTable)), float(-std::sin(2 * kPi * i / kPhaseTable)));
        if (fmc && das.reciprocity) {
            std::vector<size_t> a = tx_col, b = rx_col;
            std::sort(a.begin(), a.end());
            std::sort(b.begin(), b.end());
            symmetric = a == b;
        }
        // Output columns on the native lateral grid (period Mx dx, lx samples from x0), wrapped.
        {
            const std::vector<double> gx = grid.xAxis();
            const double dxn = double(mx) * ag.dx / double(lx);
            for (double x : gx) {
                double p = (x - ag.x0) / dxn;
                p -= std::floor(p / double(lx)) * double(lx);
                const size_t i0 = std::min(size_t(p), lx - 1);
                col_i0.push_back(i0);
                col_i1.push_back((i0 + 1) % lx);
                col_fr.push_back(float(p - double(i0)));
            }
        }
        // Per-pixel normalisation (does not depend on the data): dx / sqrt(2 pi z) per one-way
        // propagation times the aperture weight sums; pixels beyond half the lateral padding
        // either side of the array, or at z <= 0, are not imaged.
        {
            const std::vector<double> gx = grid.xAxis(), gz = grid.zAxis();
            const double pad_half = (double(mx) * ag.dx - double(ag.n - 1) * ag.dx) / 2;
            const double ntx_w = fmc ? 1.0 : std::accumulate(tx_weight.begin(), tx_weight.end(), 0.0);
            norm.assign(gx.size() * gz.size(), 0.0f);
            for (size_t l = 0; l < gz.size(); ++l) {
                const double z = gz[l];
                if (!(z > 0)) continue;
                const double one_way = ag.dx / std::sqrt(2 * kPi * z);
                for (size_t i = 0; i < gx.size(); ++i) {
                    const double x = gx[i];
                    if (x < ag.x0 - pad_half || x > ag.x0 + double(ag.n - 1) * ag.dx + pad_half) continue;
                    const double ar = apertureSum(col_prefix_rx, rx_col.size(), x, z);
                    const double v = fmc ? one_way * one_way * apertureSum(col_prefix_tx, tx_col.size(), x, z) * ar : one_way * ntx_w * ar;
                    norm[l * gx.size() + i] = v > 1e-30 ? float(1 / v) : 0.0f;
                }
            }
        }

        threads = nthr;
        workers.resize(size_t(threads));
        for (auto& W : workers) {
            W.rin = fftwf_alloc_real(mt);
            W.spec = reinterpret_cast<cfloat*>(fftwf_alloc_complex(mt / 2 + 1));
            W.zbuf = reinterpret_cast<cfloat*>(fftwf_alloc_complex(nz_n));
            W.xbuf = reinterpret_cast<cfloat*>(fftwf_alloc_complex(lx));
            if (!W.rin || !W.spec || !W.zbuf || !W.xbuf) throw std::bad_alloc();
            W.q.resize(size_t(j_hi - j_lo + 1));
            W.w.resize(size_t(j_hi - j_lo + 1));
            W.th.resize(size_t(j_hi - j_lo + 1));
        }
        {
            std::lock_guard<std::mutex> lk(detail::fftwPlannerMutex());
            auto* w0 = &workers[0];
            r2c = Plan(fftwf_plan_dft_r2c_1d(int(mt), w0->rin, reinterpret_cast<fftwf_complex*>(w0->spec), FFTW_ESTIMATE));
            zplan = Plan(fftwf_plan_dft_1d(int(nz_n), reinterpret_cast<fftwf_complex*>(w0->zbuf), reinterpret_cast<fftwf_complex*>(w0->zbuf),
                                           FFTW_BACKWARD, FFTW_ESTIMATE));
            xplan = Plan(fftwf_plan_dft_1d(int(lx), reinterpret_cast<fftwf_complex*>(w0->xbuf), reinterpret_cast<fftwf_complex*>(w0->xbuf),
                                           FFTW_BACKWARD, FFTW_ESTIMATE));
            auto* d = reinterpret_cast<fftwf_complex*>(data.get());
            const int stride = int(nbp);
            // Along the receive (plane wave: element) index for every transmit row; full matrix:
            // then along the transmit index for the receive wavenumbers the aperture reaches.
            const int n1[1] = {int(mx)};
            lateral_plan = Plan(fftwf_plan_many_dft(1, n1, int(kChunk), d, nullptr, stride, 1, d, nullptr, stride, 1, FFTW_FORWARD,
                                                    FFTW_ESTIMATE | FFTW_UNALIGNED));
            if (fmc)
                transmit_plan = Plan(fftwf_plan_many_dft(1, n1, int(kChunk), d, nullptr, int(mx * nbp), 1, d, nullptr, int(mx * nbp), 1,
                                                         FFTW_FORWARD, FFTW_ESTIMATE | FFTW_UNALIGNED));
        }
        if (!r2c.p || !zplan.p || !xplan.p || !lateral_plan.p || (fmc && !transmit_plan.p)) throw core::SettingError("wavenumber imaging: FFT planning failed");
        if (threads > 1) pool = std::make_unique<detail::ThreadPool>(threads);
    }

    double window(double u) const { return angle_window ? apodizationWeight(das.apodization, u, das.tukey_alpha) : (std::fabs(u) <= 1 ? 1.0 : 0.0); }

    // Aperture weight of a ray at tan(angle) t >= 0 from the depth axis (table, nearest step).
    float angleWeight(double t) const {
        const double u = t / tan_lim;
        return u > 1 ? 0.0f : angle_table[size_t(u * kAngleTable + 0.5)];
    }

    // exp(-i theta) by table with linear interpolation (error < 3e-7).
    cfloat expMinus(double theta) const {
        double x = std::fabs(theta) * (1 / (2 * kPi));
        x = (x - double(static_cast<long long>(x))) * kPhaseTable;  // fraction of a turn (truncation: x >= 0)
        if (theta < 0) x = kPhaseTable - x;
        const size_t i = std::min(size_t(x), size_t(kPhaseTable - 1));
        const float f = float(x - double(i));
        return phase_table[i] + (phase_table[i + 1] - phase_table[i]) * f;
    }

    void parallel(size_t count, const std::function<void(int, size_t)>& fn) {
        if (pool) {
            pool->run(count, fn);
            return;
        }
        for (size_t i = 0; i < count; ++i) fn(0, i);
    }

    // Sum of the aperture weights of one element set over the pixel (x, z): angle window
    // integrated over the array (continuum, times the set's share of the columns), or the
    // element windows inside the angle limit.
    double apertureSum(const std::vector<double>& prefix, size_t count, double x, double z) const {
        const double half = z * tan_lim;
        if (angle_window) {
            const double a = ag.x0 - ag.dx / 2, b = ag.x0 + (double(ag.n) - 0.5) * ag.dx;
            auto cum = [&](double u) {
                const double p = (std::clamp(u, -1.0, 1.0) + 1) / 2 * double(cum_window.size() - 1);
                const size_t i = std::min(size_t(p), cum_window.size() - 2);
                return cum_window[i] + (p - double(i)) * (cum_window[i + 1] - cum_window[i]);
            };
            const double integral = (cum((b - x) / half) - cum((a - x) / half)) * half / ag.dx;
            return integral * double(count) / double(ag.n);
        }
        const double ja = std::ceil((x - half - ag.x0) / ag.dx - 1e-9), jb = std::floor((x + half - ag.x0) / ag.dx + 1e-9);
        const long ia = long(std::clamp(ja, 0.0, double(ag.n))), ib = long(std::clamp(jb + 1, 0.0, double(ag.n)));
        return ib > ia ? prefix[size_t(ib)] - prefix[size_t(ia)] : 0.0;
    }

    // Interpolated stored spectrum row (nbp bins, centred phase) at fractional bin position q.
    cfloat interp(const cfloat* row, double q) const {
        if (!(q >= 2)) return cfloat(0);
        const long i0 = long(q);  // q > 0: truncation is the floor (no libm call on generic x86-64)
        if (i0 + 3 >= long(nb)) return cfloat(0);
        const double f = q - double(i0);
        const float* t = lanczos.data() + size_t(f * kFractions + 0.5) * kTaps;
        cfloat s(0);
        for (int d = 0; d < kTaps; ++d) s += t[d] * row[i0 - 2 + d];
        return s;
    }

    // Adds the mapped, interpolated and phase-corrected spectrum samples of one Stolt column
    // (W.q, W.w, W.th for n depth wavenumbers) into out.
    void accumulate(const Worker& W, const cfloat* row, size_t n, cfloat* out) const {
        for (size_t i = 0; i < n; ++i) {
            if (W.w[i] == 0) continue;
            out[i] += interp(row, W.q[i]) * expMinus(W.th[i]) * W.w[i];
        }
    }

    // Time FFT of every trace of transmits [tb0, tb1) (read into raw) into the data array.
    void timeTransform(size_t tb0, size_t tb1) {
        const double x0 = ag.x0;
        parallel((tb1 - tb0) * nrx, [&](int w, size_t job) {
            const size_t t = tb0 + job / nrx, r = job % nrx;
            Worker& W = workers[size_t(w)];
            const float* in = raw.data() + job * ns + n_lo;
            std::memcpy(W.rin, in, nw * sizeof(float));
            std::fill(W.rin + nw, W.rin + mt, 0.0f);
            fftwf_execute_dft_r2c(r2c.p, W.rin, reinterpret_cast<fftwf_complex*>(W.spec));
            cfloat* out;
            float gain;
            if (fmc) {
                out = data.get() + (tx_col[t] * mx + rx_col[r]) * nbp;
                gain = space_w[tx_col[t]] * space_w[rx_col[r]];
            } else {
                out = data.get() + (t * mx + rx_col[r]) * nbp;
                gain = space_w[rx_col[r]];
            }
            // Plane wave: advance each trace by the wave's arrival at the element (steering
            // compensation), exp(i w sin(a) (x_r - x0) / c).
            const double steer = fmc ? 0.0 : std::sin(h.transmit.angle_rad[t]) * (ag.x0 + double(rx_col[r]) * ag.dx - x0) / c;
            if (fmc) {
                for (size_t i = 0; i < nb; ++i) out[i] = W.spec[mb0 + i] * (bp[i] * gain) * centring[i];
                return;
            }
            // exp(i w_m steer) by recurrence over the bins (double precision).
            const double step = 2 * kPi * fs / double(mt) * steer;
            std::complex<double> rot(std::cos(step), std::sin(step)), ph(std::cos(double(mb0) * step), std::sin(double(mb0) * step));
            for (size_t i = 0; i < nb; ++i) {
                out[i] = W.spec[mb0 + i] * (bp[i] * gain) * centring[i] * cfloat(ph);
                ph *= rot;
            }
        });
    }

    void stoltFmc() {
        const long nK = 2 * kx_max + 1, nKz = j_hi - j_lo + 1;
        const double dw = 2 * kPi * fs / double(mt);
        const double pref = 2.0 / double(mt) / (double(mx) * double(mx)) * c * dkz / dw;
        parallel(size_t(nK), [&](int wk, size_t ki) {
            Worker& W = workers[size_t(wk)];
            const long K = long(ki) - kx_max;
            cfloat* col = kspace.get() + ki * size_t(nKz);
            std::fill(col, col + nKz, cfloat(0));
            for (long it = std::max(-kt_max, K - kt_max); it <= std::min(kt_max, K + kt_max); ++it) {
                const long ir = K - it;
                if (symmetric && it > ir) continue;  // reciprocity: D(kt, kr) = D(kr, kt) gives the same terms
                const double mult = symmetric && it < ir ? 2.0 : 1.0;
                const double kt = double(it) * dk, kr = double(ir) * dk;
                const double a = kt * kt, b = kr * kr;
                // Band and aperture: k >= |kt| / sin_lim and |kr| / sin_lim; Kz(k) = sqrt(k^2 - kt^2)
                // + sqrt(k^2 - kr^2) rises with k, so the band's ends bound j.
                const double kmin = std::max(k_lo, std::max(std::fabs(kt), std::fabs(kr)) / sin_lim);
                if (kmin > k_hi) continue;
                auto kzOf = [&](double k) { return std::sqrt(std::max(0.0, k * k - a)) + std::sqrt(std::max(0.0, k * k - b)); };
                const long ja = std::max({j_lo, 1L, long(kzOf(kmin) / dkz) - 1}), jb = std::min(j_hi, long(kzOf(k_hi) / dkz) + 2);
                if (jb < ja) continue;
                const size_t rt = size_t(((it % long(mx)) + long(mx)) % long(mx)), rr = size_t(((ir % long(mx)) + long(mx)) % long(mx));
                const cfloat* row = data.get() + (rt * mx + rr) * nbp;
                // W_t W_r = k^2 / (u v)^(3/2); Jacobian dk/dKz = u v / (k Kz).
                const FmcColumn fc{float(a),         float(b),     float(std::fabs(kt)), float(std::fabs(kr)), float(double(ja) * dkz),
                                   float(dkz),       float(k_lo),  float(k_hi),          float(1 / tan_lim),   float(c / dw),
                                   float(mb0),       float(c * (t_c + t_b)), float(mult * pref)};
                const size_t n = size_t(jb - ja + 1);
                fmcMapping(fc, angle_table.data(), kAngleTable, n, W.q.data(), W.w.data(), W.th.data());
                accumulate(W, row, n, col + (ja - j_lo));
            }
        });
    }

    void stoltPlaneWave() {
        const long nK = 2 * kx_max + 1, nKz = j_hi - j_lo + 1;
        const double dw = 2 * kPi * fs / double(mt);
        const double pref0 = 2.0 / double(mt) / double(mx) * c * dkz / dw;
        parallel(size_t(nK), [&](int wk, size_t ki) {
            Worker& W = workers[size_t(wk)];
            const long K = long(ki) - kx_max;
            const double Kx = double(K) * dk;
            cfloat* col = kspace.get() + ki * size_t(nKz);
            std::fill(col, col + nKz, cfloat(0));
            const size_t rk = size_t(((K % long(mx)) + long(mx)) % long(mx));
            for (size_t t = 0; t < ntx; ++t) {
                if (tx_weight[t] == 0) continue;
                const double sa = std::sin(h.transmit.angle_rad[t]), ca = std::cos(h.transmit.angle_rad[t]);
                const cfloat* row = data.get() + (t * mx + rk) * nbp;
                const double pref = pref0 * tx_weight[t];
                // Depth wavenumbers this column can reach: k in the band with the receive ray inside
                // the aperture, k (sin a - sin_lim) <= Kx <= k (sin a + sin_lim); Kz(k) = k cos a + kz
                // rises with k, so the band's ends bound j.
                double kmin = k_lo, kmax = k_hi;
                auto bound = [&](double d, bool upper_side) {  // Kx <= k d (upper_side) or Kx >= k d
                    if (d == 0) {
                        if (upper_side ? Kx > 0 : Kx < 0) kmin = kmax + 1;
                    } else if ((d > 0) == upper_side) {
                        kmin = std::max(kmin, Kx / d);
                    } else {
                        kmax = std::min(kmax, Kx / d);
                    }
                };
                bound(sa + sin_lim, true);
                bound(sa - sin_lim, false);
                if (kmin > kmax) continue;
                auto kzOf = [&](double k) { return k * ca + std::sqrt(std::max(0.0, k * k - (Kx - k * sa) * (Kx - k * sa))); };
                const long ja = std::max({j_lo, 1L, long(kzOf(kmin) / dkz) - 1}), jb = std::min(j_hi, long(kzOf(kmax) / dkz) + 2);
                if (jb < ja) continue;
                // W = k^-1/2 (k / kz)^3/2; Jacobian dk/dKz = 1 / (cos a + (k + kx sin a) / kz).
                const PlaneWaveColumn pc{float(Kx),
                                         float(ca),
                                         float(sa),
                                         float(double(ja) * dkz),
                                         float(dkz),
                                         float(k_lo),
                                         float(k_hi),
                                         float(1 / tan_lim),
                                         float(c / dw),
                                         float(mb0),
                                         float(c * (t_c + t_b - sa * ag.x0 / c)),
                                         float(pref)};
                const size_t n = size_t(jb - ja + 1);
                planeWaveMapping(pc, angle_table.data(), kAngleTable, n, W.q.data(), W.w.data(), W.th.data());
                accumulate(W, row, n, col + (ja - j_lo));
            }
        });
    }

    core::Frame run(size_t frame, const Progress& progress, std::vector<std::pair<std::string, double>>& seconds) {
        if (frame >= h.frames)
            throw core::SettingError("frame " + std::to_string(frame) + " does not exist: the capture has " + std::to_string(h.frames) + " frame(s)");
        auto poll = [&](double done) {
            if (progress.progress) progress.progress(done);
            if (progress.cancelled && progress.cancelled()) throw core::Cancelled();
        };
        double t_read = 0, t_time = 0, t_lat = 0;
        std::fill(data.get(), data.get() + data_size, cfloat(0));
        const size_t nchunks = nbp / kChunk;
        for (size_t tb0 = 0; tb0 < ntx; tb0 += block_tx) {
            const size_t tb1 = std::min(ntx, tb0 + block_tx);
            auto t0 = Clock::now();
            for (size_t t = tb0; t < tb1; ++t) cap.readBlock(frame, t, raw.data() + (t - tb0) * nrx * ns);
            t_read += since(t0);
            t0 = Clock::now();
            timeTransform(tb0, tb1);
            t_time += since(t0);
            // FFT along the receive index (plane wave: element) of each transmit's slab.
            t0 = Clock::now();
            parallel((tb1 - tb0) * nchunks, [&](int, size_t i) {
                const size_t t = tb0 + i / nchunks;
                auto* p = reinterpret_cast<fftwf_complex*>(data.get() + (fmc ? tx_col[t] : t) * mx * nbp + (i % nchunks) * kChunk);
                fftwf_execute_dft(lateral_plan.p, p, p);
            });
            t_lat += since(t0);
            poll(0.5 * double(tb1) / double(ntx));
        }
        seconds.emplace_back("read", t_read);
        seconds.emplace_back("time FFT", t_time);

        auto t0 = Clock::now();
        if (fmc) {
            std::vector<size_t> cols;  // receive wavenumber indices the aperture reaches
            for (long ir = -kt_max; ir <= kt_max; ++ir) cols.push_back(size_t(((ir % long(mx)) + long(mx)) % long(mx)));
            std::sort(cols.begin(), cols.end());
            cols.erase(std::unique(cols.begin(), cols.end()), cols.end());
            parallel(cols.size() * nchunks, [&](int, size_t i) {
                auto* p = reinterpret_cast<fftwf_complex*>(data.get() + cols[i / nchunks] * nbp + (i % nchunks) * kChunk);
                fftwf_execute_dft(transmit_plan.p, p, p);
            });
        }
        seconds.emplace_back("lateral FFT", t_lat + since(t0));
        poll(0.6);

        t0 = Clock::now();
        if (fmc)
            stoltFmc();
        else
            stoltPlaneWave();
        seconds.emplace_back("Stolt mapping", since(t0));
        poll(0.8);

        t0 = Clock::now();
        core::Frame f;
        f.x_m = grid.xAxis();
        f.z_m = grid.zAxis();
        const size_t nxo = f.x_m.size(), nzo = f.z_m.size(), nK = size_t(2 * kx_max + 1), nKz = size_t(j_hi - j_lo + 1);
        f.envelope.assign(nxo * nzo, 0.0f);
        // Depth: Kz bins j shifted to baseband (j - j_c; the envelope does not change), phase of the
        // grid's first row, inverse FFT; keep every rz-th native row.
        std::vector<cfloat> zphase(nKz);
        for (size_t jj = 0; jj < nKz; ++jj) {
            const double ph = double(j_lo + long(jj)) * dkz * grid.z_min_m;
            zphase[jj] = cfloat(float(std::cos(ph)), float(std::sin(ph)));
        }
        parallel(nK, [&](int w, size_t ki) {
            Worker& W = workers[size_t(w)];
            std::fill(W.zbuf, W.zbuf + nz_n, cfloat(0));
            const cfloat* col = kspace.get() + ki * nKz;
            for (size_t jj = 0; jj < nKz; ++jj) {
                const long b = ((j_lo + long(jj) - j_c) % long(nz_n) + long(nz_n)) % long(nz_n);
                W.zbuf[b] += col[jj] * zphase[jj];
            }
            fftwf_execute_dft(zplan.p, reinterpret_cast<fftwf_complex*>(W.zbuf), reinterpret_cast<fftwf_complex*>(W.zbuf));
            for (size_t l = 0; l < nzo; ++l) zrows[l * nK + ki] = W.zbuf[l * rz];
        });
        // Lateral: Kx = K dk at native positions x0 + n (Mx dx) / lx; linear interpolation onto the
        // output columns; divide by the aperture weight sum.
        parallel(nzo, [&](int w, size_t l) {
            Worker& W = workers[size_t(w)];
            const float* nr = norm.data() + l * nxo;
            std::fill(W.xbuf, W.xbuf + lx, cfloat(0));
            for (size_t ki = 0; ki < nK; ++ki) {
                const long K = long(ki) - kx_max;
                W.xbuf[size_t(((K % long(lx)) + long(lx)) % long(lx))] += zrows[l * nK + ki];
            }
            fftwf_execute_dft(xplan.p, reinterpret_cast<fftwf_complex*>(W.xbuf), reinterpret_cast<fftwf_complex*>(W.xbuf));
            for (size_t i = 0; i < nxo; ++i) {
                if (nr[i] == 0) continue;
                const float fr = col_fr[i];
                const cfloat v = W.xbuf[col_i0[i]] * (1 - fr) + W.xbuf[col_i1[i]] * fr;
                f.envelope[l * nxo + i] = std::sqrt(v.real() * v.real() + v.imag() * v.imag()) * nr[i];
            }
        });
        seconds.emplace_back("inverse FFT + interpolation", since(t0));
        poll(1.0);
        return f;
    }
};

WavenumberImager::WavenumberImager(const core::CaptureReader& capture, const core::Recipe& recipe, const Grid& grid, int threads)
    : impl_(std::make_unique<Impl>(capture, recipe, grid, threads)) {}
WavenumberImager::~WavenumberImager() = default;
core::Frame WavenumberImager::run(size_t frame, const Progress& progress, std::vector<std::pair<std::string, double>>& seconds) {
    return impl_->run(frame, progress, seconds);
}
size_t WavenumberImager::windowSamples() const { return impl_->nw; }
size_t WavenumberImager::timeFftSize() const { return impl_->mt; }
size_t WavenumberImager::lateralFftSize() const { return impl_->mx; }

}  // namespace umbra::recon
