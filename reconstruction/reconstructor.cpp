// SPDX-License-Identifier: MIT
// Reconstructor: streams a capture frame in blocks of transmit events, makes the analytic
// signal of every trace it needs, and beamforms pixel tiles in parallel. Each pixel belongs
// to exactly one tile and its sum always runs transmit by transmit, receive by receive, so
// the image does not depend on the number of threads or the tile size.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <filesystem>
#include <future>
#include <map>
#include <mutex>
#include <numeric>
#include <thread>

#include "core/error.h"
#include "reconstruction/analytic_stage.h"
#include "reconstruction/bandpass_stage.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/detail/big_buffer.h"
#include "reconstruction/detail/thread_pool.h"
#include "reconstruction/envelope_stage.h"
#include "reconstruction/grid_stage.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/wavenumber_stage.h"

namespace umbra::recon {
namespace {

#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__)
#define UMBRA_WIDE __attribute__((target_clones("avx512f", "avx2", "default")))
#else
#define UMBRA_WIDE
#endif

// cos(x) for x in [0, pi/2] by its Taylor series to x^10 (error < 5e-7); inline and
// branch-free so the weight loops vectorise.
inline float cosQuarter(float x) {
    const float x2 = x * x;
    return 1 + x2 * (-1.0f / 2 + x2 * (1.0f / 24 + x2 * (-1.0f / 720 + x2 * (1.0f / 40320 + x2 * (-1.0f / 3628800)))));
}

// Dynamic-aperture weights of the element at fxe for n pixels: Hann/Tukey taper (flat part
// `flat`, taper 1/inv_taper of the half aperture), half aperture max(z k, fp).
UMBRA_WIDE void taperedWeights(float fxe, float k, float fp, float flat, float inv_taper, const float* __restrict x,
                               const float* __restrict z, size_t n, float* __restrict w) {
    for (size_t p = 0; p < n; ++p) {
        const float zp = z[p] > 0.0f ? z[p] : 0.0f;
        float half = zp * k;
        half = half > fp ? half : fp;
        const float a = std::fabs(fxe - x[p]) / half;
        float t = (a - flat) * inv_taper;
        t = t < 0.0f ? 0.0f : t;
        t = t > 1.0f ? 1.0f : t;
        const float c = cosQuarter(1.5707963f * t);
        w[p] = a > 1.0f ? 0.0f : c * c;
    }
}

// Rectangular dynamic aperture: the edge element weighted by the part of its pitch inside.
UMBRA_WIDE void rectWeights(float fxe, float k, float fp, float ip, const float* __restrict x, const float* __restrict z, size_t n,
                            float* __restrict w) {
    for (size_t p = 0; p < n; ++p) {
        const float zp = z[p] > 0.0f ? z[p] : 0.0f;
        float half = zp * k;
        half = half > fp ? half : fp;
        float v = (half - std::fabs(fxe - x[p])) * ip + 0.5f;
        v = v < 0.0f ? 0.0f : v;
        w[p] = v > 1.0f ? 1.0f : v;
    }
}

// Scales n values by s and counts those of `w` above zero.
UMBRA_WIDE int scaleAndCount(float* __restrict t, float s, const float* __restrict w, size_t n) {
    int active = 0;
    for (size_t p = 0; p < n; ++p) {
        t[p] *= s;
        active += w[p] > 0.0f ? 1 : 0;
    }
    return active;
}

using Clock = std::chrono::steady_clock;
double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

// Working memory for one transmit block's analytic traces (complex float), bytes.
constexpr size_t kBlockBudgetBytes = size_t(256) << 20;

struct Tile {
    size_t ix0, iz0, w, h, offset;
    size_t n() const { return w * h; }
};

// The hash of a file is computed once per (path, size, modification time) in a process.
std::string cachedSha256(const std::string& path) {
    static std::mutex m;
    static std::map<std::string, std::string> cache;
    std::error_code ec;
    const auto size = std::filesystem::file_size(path, ec);
    const auto mtime = std::filesystem::last_write_time(path, ec).time_since_epoch().count();
    const std::string key = path + "|" + std::to_string(size) + "|" + std::to_string(mtime);
    std::lock_guard<std::mutex> lk(m);
    auto it = cache.find(key);
    if (it != cache.end()) return it->second;
    std::string s = core::fileSha256(path);
    cache[key] = s;
    return s;
}

}  // namespace

struct Reconstructor::Impl {
    const core::CaptureReader& cap;
    core::CaptureHeader h;
    core::Recipe recipe;
    Grid grid;
    DasParams das;
    std::unique_ptr<DelayModel> model;
    std::vector<float> bp_weights;
    Timings timings;
    double fidelity_db = 0;
    int threads = 1;
    std::unique_ptr<detail::ThreadPool> pool;

    size_t ns = 0, nrx = 0, ntx = 0, stride = 0, block_tx = 1;
    size_t up = 1, ns_up = 0;  // upsampling factor of the analytic traces; samples per upsampled trace
    double fs = 0, fs_up = 0;  // recorded and upsampled sampling rates, Hz
    double fixed_delay_s = 0;  // delay_model.fixed_delay_us
    bool reciprocity = false;
    bool cubic = false;
    std::vector<int32_t> rx_el;        // receive channel -> element
    std::vector<int> slot_of_el;       // element -> slot in the tile tables (-1 unused)
    std::vector<int32_t> used_el;      // slot -> element
    std::vector<float> tx_weight;      // per transmit (plane wave / virtual source)
    std::vector<Tile> tiles;
    size_t tile_max = 0;    // padded to a multiple of detail::kLanes
    size_t acc_pixels = 0;  // pixels in all (padded) tiles

    // Per-frame state.
    detail::BigBuffer raw_buf;  // [block_tx][nrx][ns]
    detail::BigBuffer iq_buf;  // [block_tx][nrx][stride][2]; guards zeroed once, data written per block
    size_t iq_size = 0;
    float* iqData() const { return iq_buf.get(); }
    std::vector<float> acc, acc_s2, acc_w;  // tile-major; acc interleaved complex; acc_w the sum of term weights
    detail::DasKernels kernels = detail::bestKernels();
    enum class Apod { Rect, Hann, Tukey } apod = Apod::Hann;
    bool full_aperture = false;
    std::vector<uint8_t> excluded_el;  // per array element: 1 = das.excluded_elements (weight 0)
    bool split_legs = false;  // the view's transmit and receive paths differ (e.g. TT-T): separate transmit tables
    std::unique_ptr<WavenumberImager> wavenumber;  // das.method = wavenumber: replaces the delay-and-sum below


    struct Worker {
        std::unique_ptr<AnalyticSignal> analytic;
        std::vector<float> x, z, tof, tof_tx, w, txd, ones, rsum, tsum;
        std::vector<uint8_t> any;
        std::vector<const float*> tx_delay, tx_weight;  // per transmit of the block
        std::vector<float> tx_off, tx_scale;
        std::vector<int32_t> tx_el;
        double executed = 0;  // terms evaluated in this run
        struct Pair {
            size_t l;
            float mult, k;
        };
        std::vector<Pair> pairs;
    };
    std::vector<Worker> workers;
    // SHA-256 of the capture file, started when the Reconstructor is made and computed on its
    // own thread while the first frame is read and beamformed (the bytes come from the page
    // cache the reader fills); collected when the first frame is finished.
    std::shared_future<std::string> capture_hash;

    Impl(const core::CaptureReader& c, const core::Recipe& r, int nthreads) : cap(c), h(c.header()), recipe(r) {
        capture_hash = std::async(std::launch::async, [path = c.path()] {
                           try {
                               return cachedSha256(path);
                           } catch (const core::InputError&) {
                               return std::string();
                           }
                       }).share();
        das = dasParams(recipe);
        fixed_delay_s = delayModelParams(recipe).fixed_delay_us * 1e-6;
        if (das.method == "wavenumber" && fixed_delay_s != 0)
            throw core::SettingError("delay_model.fixed_delay_us: the wavenumber method does not take a fixed delay; use das.method = delay_and_sum");
        if (das.method == "wavenumber") checkWavenumberCapture(h);
        grid = resolveGrid(h, recipe);
        if (das.method == "wavenumber" && !usesHomogeneousModel(h, recipe))
            throw core::SettingError("wavenumber imaging supports the direct L-L view on contact only (delay_model.mode = " +
                                     recipe.text("delay_model.mode") + "); use das.method = delay_and_sum");
        model = makeDelayModel(h, recipe, &grid, nthreads);
        fidelity_db = recon::amplitudeFidelityDb(h, recipe, grid);
        if (das.method == "wavenumber") {
            wavenumber = std::make_unique<WavenumberImager>(c, recipe, grid, nthreads);
            ntx = h.transmits();
            nrx = h.receives();
            return;
        }
        excluded_el.assign(h.array.elementCount(), 0);
        for (int e : das.excluded_elements) {
            if (size_t(e) >= excluded_el.size())
                throw core::SettingError("das.excluded_elements: element " + std::to_string(e + 1) + " does not exist (the array has " +
                                         std::to_string(excluded_el.size()) + " elements)");
            excluded_el[size_t(e)] = 1;
        }
        ns = h.samples;
        nrx = h.receives();
        ntx = h.transmits();
        fs = h.receive.sampling_frequency_hz;
        if (ns == 0 || nrx == 0 || ntx == 0 || !(fs > 0)) throw core::InputError(c.path(), "/data/rf", "the capture holds no traces to reconstruct");
        up = size_t(upsamplingFactor(das, fs, h.array.centre_frequency_hz));
        ns_up = ns * up;
        fs_up = fs * double(up);
        stride = detail::traceStride(ns_up);
        cubic = das.interpolation == "cubic";
        bp_weights = bandpassWeights(bandpassParams(recipe), ns, fs, h.array.centre_frequency_hz, h.array.fractional_bandwidth);
        rx_el = h.receive.element_index;

        // Elements that take part, and their slots in the per-tile tables.
        const size_t nel = h.array.elementCount();
        slot_of_el.assign(nel, -1);
        auto use = [&](int32_t e) {
            if (e < 0 || size_t(e) >= nel) throw core::InputError(c.path(), "/receive/element_index", "element index out of range");
            if (slot_of_el[size_t(e)] < 0) {
                slot_of_el[size_t(e)] = int(used_el.size());
                used_el.push_back(e);
            }
        };
        for (auto e : rx_el) use(e);
        if (h.transmit.kind == core::TransmitKind::SingleElement)
            for (auto e : h.transmit.source_element) use(e);

        // Reciprocity: full matrix, one set of elements for transmit and receive, each once.
        if (h.transmit.kind == core::TransmitKind::SingleElement && das.reciprocity && model->reciprocal()) {
            std::vector<int32_t> a = h.transmit.source_element, b = rx_el;
            std::sort(a.begin(), a.end());
            std::sort(b.begin(), b.end());
            reciprocity = a == b && std::adjacent_find(a.begin(), a.end()) == a.end();
        }

        // Transmit weighting over angles / virtual sources, by rank of the angle (or source x).
        tx_weight = transmitWeights(h, das);

        // Tiles: 2-D blocks (32 pixels wide) of about das.tile_pixels pixels.
        const size_t nx = grid.nx(), nz = grid.nz();
        const size_t tw = std::min<size_t>(nx, 32);
        const size_t th = std::max<size_t>(1, size_t(das.tile_pixels) / tw);
        size_t off = 0;
        auto padded = [](size_t n) { return (n + detail::kLanes - 1) / detail::kLanes * detail::kLanes; };
        for (size_t iz = 0; iz < nz; iz += th)
            for (size_t ix = 0; ix < nx; ix += tw) {
                Tile t{ix, iz, std::min(tw, nx - ix), std::min(th, nz - iz), off};
                off += padded(t.n());
                tile_max = std::max(tile_max, padded(t.n()));
                tiles.push_back(t);
            }
        acc_pixels = off;
        apod = das.apodization == "rectangular" ? Apod::Rect : das.apodization == "tukey" ? Apod::Tukey : Apod::Hann;
        // Through a wedge the pixel's x is along the part surface, not the array: the dynamic
        // aperture has no meaning there, so the whole array takes part (with the window).
        full_aperture = das.aperture == "full" || model->specimenFrame();
        split_legs = !model->symmetricLegs();


        const size_t per_tx = nrx * stride * 2 * sizeof(float) + nrx * ns * sizeof(float);
        block_tx = std::clamp<size_t>(kBlockBudgetBytes / std::max<size_t>(per_tx, 1), 1, ntx);

        threads = nthreads > 0 ? nthreads : int(std::max(1u, std::thread::hardware_concurrency()));
        threads = std::clamp(threads, 1, 256);
        workers.resize(size_t(threads));
        for (auto& w : workers) {
            w.analytic = std::make_unique<AnalyticSignal>(ns, up);
            const size_t ne = used_el.size();
            w.x.resize(tile_max);
            w.z.resize(tile_max);
            w.tof.resize(ne * tile_max);
            if (split_legs) w.tof_tx.resize(ne * tile_max);
            w.w.resize(ne * tile_max);
            w.ones.assign(tile_max, 1.0f);
            w.rsum.resize(tile_max);
            w.tsum.resize(tile_max);
            w.any.resize(ne);
        }
        if (threads > 1) pool = std::make_unique<detail::ThreadPool>(threads);
    }

    void parallel(size_t count, const std::function<void(int, size_t)>& fn, const std::function<bool(size_t)>& on_caller) {
        if (pool) {
            pool->run(count, fn, on_caller);
            return;
        }
        for (size_t i = 0; i < count; ++i) {
            fn(0, i);
            if (on_caller && on_caller(i + 1)) break;
        }
    }

    // Window at |u| = a >= 0 (0 outside [0, 1]): Hann cos^2(pi a / 2); Tukey flat to 1 - alpha then
    // a Hann taper; rectangular 1.
    static inline float windowAt(float a, int kind, float alpha) {
        float t = kind == 1 ? a : (alpha > 0 ? (a - (1 - alpha)) / alpha : 0.0f);  // taper coordinate in [0, 1]
        t = std::clamp(t, 0.0f, 1.0f);
        const float c = cosQuarter(1.5707963f * t);
        const float w = kind == 0 ? 1.0f : c * c;
        return a > 1.0f ? 0.0f : w;
    }

    // Aperture weights of the element at xe for n pixels (x[p], z[p]).
    void apertureWeights(double xe, const float* x, const float* z, size_t n, double pitch, double xc, double half_len, float* w) const {
        const int kind = apod == Apod::Rect ? 0 : apod == Apod::Hann ? 1 : 2;
        const float alpha = float(das.tukey_alpha);
        if (full_aperture) {
            const float v = windowAt(float(std::fabs(xe - xc) / std::max(half_len, 1e-9)), kind, alpha);
            std::fill(w, w + n, v);
            return;
        }
        const float k = float(1 / (2 * das.f_number)), fp = float(pitch), fxe = float(xe), ip = float(1 / pitch);
        if (kind == 0) {
            rectWeights(fxe, k, fp, ip, x, z, n, w);
            return;
        }
        const float flat = kind == 1 ? 0.0f : 1 - alpha, inv_taper = kind == 1 ? 1.0f : (alpha > 0 ? 1 / alpha : 0.0f);
        taperedWeights(fxe, k, fp, flat, inv_taper, x, z, n, w);
    }

    void beamformTile(Worker& W, const Tile& T, size_t b0, size_t b1) {
        const size_t n0 = T.n();
        const size_t n = (n0 + detail::kLanes - 1) / detail::kLanes * detail::kLanes;  // padded lanes repeat the last pixel
        for (size_t j = 0; j < T.h; ++j)
            for (size_t i = 0; i < T.w; ++i) {
                W.x[j * T.w + i] = float(grid.x_min_m + double(T.ix0 + i) * grid.step_m);
                W.z[j * T.w + i] = float(grid.z_min_m + double(T.iz0 + j) * grid.step_m);
            }
        for (size_t p = n0; p < n; ++p) {
            W.x[p] = W.x[n0 - 1];
            W.z[p] = W.z[n0 - 1];
        }
        const double pitch = std::max(h.array.pitch_m(), 1e-6);
        double xlo = 1e300, xhi = -1e300;
        for (auto e : used_el) {
            xlo = std::min(xlo, h.array.element_position_m[size_t(e)][0]);
            xhi = std::max(xhi, h.array.element_position_m[size_t(e)][0]);
        }
        const double xc = (xlo + xhi) / 2, half_len = (xhi - xlo) / 2 + pitch / 2;
        const float ffs = float(fs_up);
        for (size_t s = 0; s < used_el.size(); ++s) {
            const auto& pos = h.array.element_position_m[size_t(used_el[s])];
            float* tof = W.tof.data() + s * tile_max;
            float* w = W.w.data() + s * tile_max;
            model->elementTime(pos, size_t(used_el[s]), DelayLeg::Receive, W.x.data(), W.z.data(), n, tof);
            apertureWeights(pos[0], W.x.data(), W.z.data(), n, pitch, xc, half_len, w);
            if (excluded_el[size_t(used_el[s])]) std::fill(w, w + n, 0.0f);
            W.any[s] = scaleAndCount(tof, ffs, w, n) > 0;
            if (split_legs) {
                float* tt = W.tof_tx.data() + s * tile_max;
                model->elementTime(pos, size_t(used_el[s]), DelayLeg::Transmit, W.x.data(), W.z.data(), n, tt);
                for (size_t p = 0; p < n; ++p) tt[p] *= ffs;
            }
        }
        float* ac = acc.data() + 2 * T.offset;
        float* s2 = das.coherence_factor ? acc_s2.data() + T.offset : nullptr;
        const float hi = float(ns_up + detail::kTracePad);
        // Transmit side of every event in the block: delay row (samples), weight row, offset.
        const size_t nb = b1 - b0;
        W.tx_delay.resize(nb);
        W.tx_weight.resize(nb);
        W.tx_off.resize(nb);
        W.tx_scale.resize(nb);
        W.tx_el.resize(nb);
        if (h.transmit.kind != core::TransmitKind::SingleElement && W.txd.size() < nb * tile_max) W.txd.resize(nb * tile_max);
        for (size_t t = b0; t < b1; ++t) {
            const size_t l = t - b0;
            // A fixed delay d in every trace: model time τ is found at sample (τ + d - start) fs.
            W.tx_off[l] = float(double(detail::kTracePad) - (h.receive.start_time_s[t] - fixed_delay_s) * fs_up);
            W.tx_scale[l] = tx_weight[t];
            W.tx_el[l] = -1;
            switch (h.transmit.kind) {
                case core::TransmitKind::SingleElement: {
                    const int32_t te = h.transmit.source_element[t];
                    const size_t s = size_t(slot_of_el[size_t(te)]);
                    W.tx_el[l] = te;
                    W.tx_delay[l] = (split_legs ? W.tof_tx.data() : W.tof.data()) + s * tile_max;
                    W.tx_weight[l] = W.w.data() + s * tile_max;
                    if (!W.any[s]) W.tx_scale[l] = 0;
                    break;
                }
                case core::TransmitKind::PlaneWave:
                case core::TransmitKind::VirtualSource: {
                    float* d = W.txd.data() + l * tile_max;
                    if (h.transmit.kind == core::TransmitKind::PlaneWave)
                        model->planeWaveTime(h.transmit.angle_rad[t], W.x.data(), W.z.data(), n, d);
                    else
                        model->virtualSourceTime(h.transmit.virtual_source_m[t], W.x.data(), W.z.data(), n, d);
                    for (size_t p = 0; p < n; ++p) d[p] *= ffs;
                    W.tx_delay[l] = d;
                    W.tx_weight[l] = W.ones.data();
                    break;
                }
            }
        }
        // Sum of the weights of every term (transmit weight x receive weight) this block adds to
        // each pixel: (sum over transmits of kt wt) x (sum over receives of wr). With reciprocity
        // the doubled pairs give the same total.
        std::fill(W.rsum.begin(), W.rsum.begin() + long(n), 0.0f);
        std::fill(W.tsum.begin(), W.tsum.begin() + long(n), 0.0f);
        for (size_t r = 0; r < nrx; ++r) {
            const size_t s = size_t(slot_of_el[size_t(rx_el[r])]);
            if (!W.any[s]) continue;
            const float* wr = W.w.data() + s * tile_max;
            for (size_t p = 0; p < n; ++p) W.rsum[p] += wr[p];
        }
        for (size_t l = 0; l < nb; ++l) {
            const float kt = W.tx_scale[l];
            if (kt == 0) continue;
            const float* wt = W.tx_weight[l];
            for (size_t p = 0; p < n; ++p) W.tsum[p] += kt * wt[p];
        }
        float* aw = acc_w.data() + T.offset;
        for (size_t p = 0; p < n; ++p) aw[p] += W.tsum[p] * W.rsum[p];
        // Receive channel outer, transmit inner: the receive rows stay in L1 across transmits.
        // Every pixel's sum runs in this fixed order whatever the tile or thread.
        for (size_t r = 0; r < nrx; ++r) {
            const int32_t re = rx_el[r];
            const size_t s = size_t(slot_of_el[size_t(re)]);
            if (!W.any[s]) continue;
            const float* tof = W.tof.data() + s * tile_max;
            const float* wr = W.w.data() + s * tile_max;
            // Transmits that contribute to this receive row, with their weight factors.
            W.pairs.clear();
            for (size_t l = 0; l < nb; ++l) {
                const float kt = W.tx_scale[l];
                if (kt == 0) continue;
                float mult = 1;
                if (reciprocity) {
                    if (re < W.tx_el[l]) continue;
                    if (re > W.tx_el[l]) mult = 2;
                }
                W.pairs.push_back({l, mult, kt * mult});
            }
            W.executed += double(n) * double(W.pairs.size());
            auto trace = [&](size_t l) { return iqData() + (l * nrx + r) * stride * 2; };
            size_t j = 0;
            if (!s2 && !cubic)  // fused pairs: same operations, in the same order, as one call each
                for (; j + 1 < W.pairs.size(); j += 2) {
                    const auto& a = W.pairs[j];
                    const auto& b = W.pairs[j + 1];
                    kernels.linear2(W.tx_delay[a.l], W.tx_off[a.l], W.tx_weight[a.l], a.k, trace(a.l), W.tx_delay[b.l], W.tx_off[b.l],
                                    W.tx_weight[b.l], b.k, trace(b.l), tof, wr, hi, n, ac);
                }
            for (; j < W.pairs.size(); ++j) {
                const auto& a = W.pairs[j];
                if (s2)
                    detail::dasCoherence(cubic, W.tx_delay[a.l], tof, W.tx_off[a.l], W.tx_weight[a.l], wr, a.k, trace(a.l), hi, n, ac, s2);
                else
                    (cubic ? kernels.cubic : kernels.linear)(W.tx_delay[a.l], tof, W.tx_off[a.l], W.tx_weight[a.l], wr, a.k, trace(a.l), hi, n,
                                                             ac);
            }
        }
    }

    bool needed(size_t t, size_t r) const {
        if (!reciprocity) return true;
        return rx_el[r] >= h.transmit.source_element[t];
    }

    core::Frame run(size_t frame, const Progress& progress) {
        if (frame >= h.frames)
            throw core::SettingError("frame " + std::to_string(frame) + " does not exist: the capture has " + std::to_string(h.frames) +
                                     " frame(s)");
        timings = Timings{};
        const auto t_start = Clock::now();
        const size_t npix = grid.nx() * grid.nz();
        if (wavenumber) {
            core::Frame f = wavenumber->run(frame, progress, timings.stage_seconds);
            finish(f, frame, t_start);
            return f;
        }
        double t_read = 0, t_analytic = 0, t_das = 0;
        acc.assign(2 * acc_pixels, 0.0f);
        acc_w.assign(acc_pixels, 0.0f);
        if (das.coherence_factor) acc_s2.assign(acc_pixels, 0.0f);
        const size_t bsz = std::min(block_tx, ntx);
        if (raw_buf.size() != bsz * nrx * ns) raw_buf.reset(bsz * nrx * ns);
        float* raw = raw_buf.get();
        if (iq_size != bsz * nrx * stride * 2) {
            iq_size = bsz * nrx * stride * 2;
            iq_buf.reset(iq_size);  // not value-initialised: only the guards need zeros
            for (size_t tr = 0; tr < bsz * nrx; ++tr) {
                float* p = iq_buf.get() + tr * stride * 2;
                std::fill(p, p + 2 * detail::kTracePad, 0.0f);
                std::fill(p + 2 * (detail::kTracePad + ns_up), p + 2 * stride, 0.0f);
            }
        }

        const size_t nblocks = (ntx + bsz - 1) / bsz;
        const double units = double(nblocks * tiles.size());
        size_t blocks_done = 0;
        bool cancel = false;
        auto poll = [&](size_t done_in_phase, double phase_units) {
            if (progress.progress) progress.progress(std::min(1.0, (double(blocks_done * tiles.size()) + double(done_in_phase) * phase_units) / units));
            if (progress.cancelled && progress.cancelled()) cancel = true;
            return cancel;
        };
        for (auto& w : workers) w.executed = 0;
        std::vector<std::pair<size_t, size_t>> jobs;
        for (size_t b0 = 0; b0 < ntx; b0 += bsz) {
            const size_t b1 = std::min(ntx, b0 + bsz);
            auto t0 = Clock::now();
            for (size_t t = b0; t < b1; ++t) cap.readBlock(frame, t, raw + (t - b0) * nrx * ns);
            t_read += since(t0);
            if (poll(0, 0)) break;

            t0 = Clock::now();
            jobs.clear();
            for (size_t t = b0; t < b1; ++t)
                for (size_t r = 0; r < nrx; ++r)
                    if (needed(t, r)) jobs.emplace_back(t - b0, r);
            const float* bw = bandpassParams(recipe).enabled ? bp_weights.data() : nullptr;
            parallel(
                jobs.size(),
                [&](int w, size_t j) {
                    const auto [tl, r] = jobs[j];
                    workers[size_t(w)].analytic->run(raw + (tl * nrx + r) * ns,
                                                     iqData() + ((tl * nrx + r) * stride + detail::kTracePad) * 2, bw);
                },
                [&](size_t) { return poll(0, 0); });
            t_analytic += since(t0);
            if (cancel) break;

            t0 = Clock::now();
            parallel(
                tiles.size(), [&](int w, size_t i) { beamformTile(workers[size_t(w)], tiles[i], b0, b1); },
                [&](size_t done) { return poll(done, 1.0); });
            t_das += since(t0);
            if (cancel) break;
            ++blocks_done;
        }
        if (cancel) throw core::Cancelled();

        auto t0 = Clock::now();
        core::Frame f;
        f.x_m = grid.xAxis();
        f.z_m = grid.zAxis();
        f.envelope.assign(npix, 0.0f);
        const size_t nx = grid.nx();
        for (const Tile& T : tiles)
            for (size_t j = 0; j < T.h; ++j)
                for (size_t i = 0; i < T.w; ++i) {
                    const size_t q = T.offset + j * T.w + i;
                    const float re = acc[2 * q], im = acc[2 * q + 1], wsum = acc_w[q];
                    // Weighted mean of the aligned echoes; no term reached this pixel: 0.
                    float e = wsum > 1e-20f ? std::sqrt(re * re + im * im) / wsum : 0.0f;
                    if (das.coherence_factor) e *= coherenceFactor(re, im, acc_s2[q], wsum);
                    f.envelope[(T.iz0 + j) * nx + T.ix0 + i] = e;
                }
        const double t_env = since(t0);
        if (progress.progress) progress.progress(1.0);
        timings.stage_seconds = {{"read", t_read}, {"band-pass + analytic signal", t_analytic}, {"delay-and-sum", t_das}, {"envelope", t_env}};
        for (auto& w : workers) timings.executed_terms += w.executed;
        finish(f, frame, t_start);
        return f;
    }

    // Recipe, frame index and capture hash into the frame; total time and terms.
    void finish(core::Frame& f, size_t frame, Clock::time_point t_start) {
        f.recipe_json = recipe.toJson();
        f.frame_index = frame;
        const auto t0 = Clock::now();
        f.capture_sha256 = capture_hash.get();  // waits only if hashing is slower than the frame
        timings.stage_seconds.emplace_back("capture hash (wait)", since(t0));
        timings.total_seconds = since(t_start);
        timings.effective_terms = double(grid.nx() * grid.nz()) * double(ntx) * double(nrx);
    }
};

Reconstructor::Reconstructor(const core::CaptureReader& capture, const core::Recipe& recipe, int threads)
    : impl_(new Impl(capture, recipe, threads)) {}
Reconstructor::~Reconstructor() { delete impl_; }
const Grid& Reconstructor::grid() const { return impl_->grid; }
core::Frame Reconstructor::run(size_t frame, const Progress& progress) { return impl_->run(frame, progress); }
const Timings& Reconstructor::lastTimings() const { return impl_->timings; }
double Reconstructor::amplitudeFidelityDb() const { return impl_->fidelity_db; }

}  // namespace umbra::recon
