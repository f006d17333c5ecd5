// SPDX-License-Identifier: MIT
#include "reconstruction/view_delay_model.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <list>
#include <mutex>
#include <string>
#include <thread>

#include "core/error.h"

namespace umbra::recon {

namespace {

// Exact text of a double (hex float) for cache keys.
void put(std::string& k, double v) {
    char b[40];
    std::snprintf(b, sizeof b, "%a,", v);
    k += b;
}

std::string tableKey(const ViewGeometry& g, const std::vector<core::Vec3>& el, const std::vector<Wave>& legs, const Grid& grid) {
    std::string k;
    k.reserve(64 + el.size() * 60);
    for (auto w : legs) k += w == Wave::L ? 'L' : 'T';
    k += '|';
    put(k, g.c_l_m_s);
    put(k, g.c_t_m_s);
    put(k, g.thickness_m);
    if (g.wedge) {
        put(k, g.wedge->speed_of_sound_m_s);
        put(k, g.wedge->surface_tilt_rad);
        for (double v : g.wedge->surface_origin_m) put(k, v);
    }
    k += '|';
    put(k, grid.x_min_m);
    put(k, grid.z_min_m);
    put(k, grid.step_m);
    k += std::to_string(grid.nx()) + "x" + std::to_string(grid.nz()) + "|";
    for (const auto& e : el)
        for (double v : e) put(k, v);
    return k;
}

struct Cache {
    std::mutex m;
    std::list<std::pair<std::string, std::shared_ptr<const TravelTimeTable>>> lru;  // most recent first
    size_t bytes = 0;
};
Cache& cache() {
    static Cache c;
    return c;
}

// Times of one element over the grid, column by column (Newton warm-started down each column).
void fillElement(const ViewGeometry& g, const core::Vec3& e, const std::vector<Wave>& legs, const Grid& grid, float* out) {
    const size_t nx = grid.nx(), nz = grid.nz();
    for (size_t ix = 0; ix < nx; ++ix) {
        const double x = grid.x_min_m + double(ix) * grid.step_m;
        double guess = -1;
        for (size_t iz = 0; iz < nz; ++iz) {
            const double z = grid.z_min_m + double(iz) * grid.step_m;
            const RayPath r = g.path(e, legs, x, z, guess);
            out[iz * nx + ix] = r.valid ? float(r.time_s) : kNoPathTime;
            if (r.valid) guess = r.p_s_per_m;
        }
    }
}

}  // namespace

std::shared_ptr<const TravelTimeTable> travelTimeTable(const ViewGeometry& g, const std::vector<core::Vec3>& elements,
                                                       const std::vector<Wave>& legs, const Grid& grid, int threads,
                                                       bool* from_cache) {
    const std::string key = tableKey(g, elements, legs, grid);
    auto& C = cache();
    {
        std::lock_guard<std::mutex> lk(C.m);
        for (auto it = C.lru.begin(); it != C.lru.end(); ++it)
            if (it->first == key) {
                C.lru.splice(C.lru.begin(), C.lru, it);
                if (from_cache) *from_cache = true;
                return C.lru.front().second;
            }
    }
    if (from_cache) *from_cache = false;
    const auto t0 = std::chrono::steady_clock::now();
    auto tab = std::make_shared<TravelTimeTable>();
    tab->elements = elements.size();
    tab->nx = grid.nx();
    tab->nz = grid.nz();
    const size_t npix = tab->nx * tab->nz;
    tab->t_s.resize(elements.size() * npix);
    int nt = threads > 0 ? threads : int(std::max(1u, std::thread::hardware_concurrency()));
    nt = std::clamp(nt, 1, int(std::max<size_t>(1, elements.size())));
    std::vector<std::thread> pool;
    std::atomic<size_t> next{0};
    auto work = [&] {
        for (size_t e; (e = next.fetch_add(1)) < elements.size();) fillElement(g, elements[e], legs, grid, tab->t_s.data() + e * npix);
    };
    for (int i = 1; i < nt; ++i) pool.emplace_back(work);
    work();
    for (auto& t : pool) t.join();
    tab->build_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    std::lock_guard<std::mutex> lk(C.m);
    C.lru.emplace_front(key, tab);
    C.bytes += tab->bytes();
    while (C.bytes > kTravelTimeCacheBytes && C.lru.size() > 1) {
        C.bytes -= C.lru.back().second->bytes();
        C.lru.pop_back();
    }
    return tab;
}

void clearTravelTimeCache() {
    auto& C = cache();
    std::lock_guard<std::mutex> lk(C.m);
    C.lru.clear();
    C.bytes = 0;
}

size_t travelTimeCacheBytes() {
    auto& C = cache();
    std::lock_guard<std::mutex> lk(C.m);
    return C.bytes;
}

ViewDelayModel::ViewDelayModel(const core::CaptureHeader& h, ViewGeometry g, ViewMode mode, const Grid& grid, int threads)
    : geo_(std::move(g)), mode_(std::move(mode)), grid_(grid) {
    const size_t per = h.array.elementCount() * grid.nx() * grid.nz() * sizeof(float);
    const size_t sets = mode_.symmetric() ? 1 : 2;
    if (per * sets > kMaxTravelTimeTableBytes) return;  // computed per tile instead
    bool cached = false;
    tx_ = travelTimeTable(geo_, h.array.element_position_m, mode_.tx, grid, threads, &cached);
    if (!cached) build_s_ += tx_->build_seconds;
    if (mode_.symmetric()) {
        rx_ = tx_;
    } else {
        rx_ = travelTimeTable(geo_, h.array.element_position_m, mode_.rx, grid, threads, &cached);
        if (!cached) build_s_ += rx_->build_seconds;
    }
}

size_t ViewDelayModel::tableBytes() const {
    if (!tx_) return 0;
    return tx_->bytes() + (rx_ != tx_ ? rx_->bytes() : 0);
}

double ViewDelayModel::nominalSpeed() const {
    const bool t = mode_.usesShear();
    return t ? geo_.c_t_m_s : geo_.c_l_m_s;
}

void ViewDelayModel::pointTime(const core::Vec3& from, const float* x, const float* z, size_t n, float* t) const {
    double guess = -1;
    for (size_t i = 0; i < n; ++i) {
        const RayPath r = geo_.path(from, mode_.tx, x[i], z[i], guess);
        t[i] = r.valid ? float(r.time_s) : kNoPathTime;
        if (r.valid) guess = r.p_s_per_m;
    }
}

void ViewDelayModel::lookup(const TravelTimeTable* tab, const std::vector<Wave>& legs, const core::Vec3& pos, size_t element,
                            const float* x, const float* z, size_t n, float* t) const {
    const size_t nx = grid_.nx(), nz = grid_.nz();
    const float* base = tab && element < tab->elements ? tab->t_s.data() + element * nx * nz : nullptr;
    // Fast path: pixels on grid nodes (every pixel of the reconstructor's tiles) read the table.
    const float inv = float(1 / grid_.step_m), x0 = float(grid_.x_min_m), z0f = float(grid_.z_min_m);
    const int inx = int(nx), inz = int(nz);
    size_t slow = 0;
    for (size_t i = 0; i < n; ++i) {
        const float fx = (x[i] - x0) * inv, fz = (z[i] - z0f) * inv;
        const int ix = int(fx + 0.5f), iz = int(fz + 0.5f);
        const bool node = base && fx > -0.5f && fz > -0.5f && ix < inx && iz < inz && std::fabs(fx - float(ix)) < 1e-2f &&
                          std::fabs(fz - float(iz)) < 1e-2f;
        if (node) t[i] = base[size_t(iz) * nx + size_t(ix)];
        else t[i] = -1, ++slow;
    }
    if (slow == 0) return;
    const double inv_d = 1 / grid_.step_m;
    for (size_t i = 0; i < n; ++i) {
        if (t[i] >= 0) continue;
        const double fx = (double(x[i]) - grid_.x_min_m) * inv_d, fz = (double(z[i]) - grid_.z_min_m) * inv_d;
        if (base && fx >= 0 && fz >= 0 && fx <= double(nx - 1) && fz <= double(nz - 1) && nx > 1 && nz > 1) {
            // Between nodes: bilinear (cells with a no-path corner fall through to the direct solve).
            const size_t x0i = std::min(size_t(fx), nx - 2), z0i = std::min(size_t(fz), nz - 2);
            const float a = base[z0i * nx + x0i], b = base[z0i * nx + x0i + 1], c = base[(z0i + 1) * nx + x0i],
                        d = base[(z0i + 1) * nx + x0i + 1];
            if (a < kNoPathTime && b < kNoPathTime && c < kNoPathTime && d < kNoPathTime) {
                const float u = float(fx - double(x0i)), v = float(fz - double(z0i));
                t[i] = (a + (b - a) * u) * (1 - v) + (c + (d - c) * u) * v;
                continue;
            }
        }
        const RayPath r = geo_.path(pos, legs, x[i], z[i]);
        t[i] = r.valid ? float(r.time_s) : kNoPathTime;
    }
}

void ViewDelayModel::elementTime(const core::Vec3& pos, size_t element, DelayLeg leg, const float* x, const float* z, size_t n,
                                 float* t) const {
    if (leg == DelayLeg::Transmit) lookup(tx_.get(), mode_.tx, pos, element, x, z, n, t);
    else lookup(rx_.get(), mode_.rx, pos, element, x, z, n, t);
}

void ViewDelayModel::planeWaveTime(double, const float*, const float*, size_t, float*) const {
    throw core::SettingError("delay_model.mode = " + mode_.name + ": plane-wave captures are imaged in L-L on contact only");
}

void ViewDelayModel::virtualSourceTime(const core::Vec3&, const float*, const float*, size_t, float*) const {
    throw core::SettingError("delay_model.mode = " + mode_.name + ": virtual-source captures are imaged in L-L on contact only");
}

}  // namespace umbra::recon
