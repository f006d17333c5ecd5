// SPDX-License-Identifier: MIT
#include "reconstruction/coverage.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <thread>

#include "core/error.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/interface_coefficients.h"
#include "reconstruction/ray_path.h"
#include "reconstruction/view_mode.h"

namespace umbra::recon {

namespace {

// Amplitude of one element's path to a pixel: directivity x spreading (0 when no path).
double pathAmplitude(const RayPath& r, const std::vector<Wave>& waves, bool receive, const ViewGeometry& g, double width, double f0,
                     const CoverageOptions& o) {
    if (!r.valid || r.legs == 0) return 0;
    double a = 1;
    if (o.transmission) {
        const size_t k = g.wedge ? 1 : 0;  // first specimen leg
        if (g.wedge) {
            const double cw = g.wedge->speed_of_sound_m_s;
            a *= receive ? solidFluidTransmission(waves[0], r.angle_rad[1], cw, kWedgeDensityKgM3, g.c_l_m_s, g.c_t_m_s, kPartDensityKgM3)
                         : fluidSolidTransmission(waves[0], r.angle_rad[0], cw, kWedgeDensityKgM3, g.c_l_m_s, g.c_t_m_s, kPartDensityKgM3);
        }
        if (waves.size() == 2) a *= freeSurfaceReflection(waves[0], waves[1], r.angle_rad[k], g.c_l_m_s, g.c_t_m_s > 0 ? g.c_t_m_s : g.c_l_m_s / 2);
    }
    if (o.directivity && width > 0 && f0 > 0) {
        const double th = r.element_angle_rad;
        if (std::fabs(th) >= M_PI / 2) return 0;
        const double lambda = r.speed_m_s[0] / f0;
        const double u = M_PI * width * std::sin(th) / lambda;
        a *= (std::fabs(u) < 1e-12 ? 1.0 : std::sin(u) / u) * std::cos(th);
    }
    if (o.spreading) {
        // Ray tube through flat interfaces: dX/dp = sum L_i c_i / cos^2 a_i; with displacement
        // coefficients the in-plane amplitude is 1 / sqrt(cos^2 a_0 / c_0 dX/dp) (1 / sqrt(L) in
        // one medium); out of plane (3-D) a further 1 / sqrt(sum L_i c_i / c_0).
        double dxdp = 0, lc = 0;
        for (size_t i = 0; i < r.legs; ++i) {
            const double c = std::cos(r.angle_rad[i]);
            dxdp += r.length_m[i] * r.speed_m_s[i] / (c * c);
            lc += r.length_m[i] * r.speed_m_s[i];
        }
        const double c0 = std::cos(r.angle_rad[0]);
        const double tube = c0 * c0 / r.speed_m_s[0] * dxdp;
        if (!(tube > 0)) return 0;
        a /= std::sqrt(tube);
        if (o.spreading_3d) a /= std::sqrt(lc / r.speed_m_s[0]);
    }
    return std::fabs(a);
}

}  // namespace

CoverageMap coverageMap(const core::CaptureHeader& h, const std::string& mode_name, const Grid& grid, const CoverageOptions& o,
                        const core::Recipe* r) {
    const ViewMode mode = parseViewMode(mode_name);
    const double cl = r ? r->number("delay_model.speed_of_sound_m_s") : 0, ct = r ? r->number("delay_model.shear_speed_m_s") : 0;
    checkViewMode(h, mode, ct);
    const ViewGeometry g = ViewGeometry::fromHeader(h, cl, ct);
    CoverageMap m;
    m.mode = mode.name;
    m.x_m = grid.xAxis();
    m.z_m = grid.zAxis();
    const size_t nx = m.x_m.size(), nz = m.z_m.size(), npix = nx * nz;
    if (npix == 0) return m;
    const double width = o.element_width_m > 0 ? o.element_width_m : h.array.element_width_m;
    const double f0 = h.array.centre_frequency_hz;
    // Elements that transmit and that receive.
    std::vector<int32_t> tx_el = h.transmit.kind == core::TransmitKind::SingleElement ? h.transmit.source_element : std::vector<int32_t>{};
    std::vector<int32_t> rx_el = h.receive.element_index;
    std::sort(tx_el.begin(), tx_el.end());
    tx_el.erase(std::unique(tx_el.begin(), tx_el.end()), tx_el.end());
    std::sort(rx_el.begin(), rx_el.end());
    rx_el.erase(std::unique(rx_el.begin(), rx_el.end()), rx_el.end());
    std::vector<double> stx(npix, 0.0), srx(npix, 0.0);
    // Parallel over pixel rows; each row sums over elements in a fixed order.
    std::atomic<size_t> next{0};
    auto work = [&] {
        for (size_t iz; (iz = next.fetch_add(1)) < nz;) {
            for (size_t ix = 0; ix < nx; ++ix) {
                double a = 0, b = 0;
                for (auto e : tx_el)
                    if (e >= 0 && size_t(e) < h.array.elementCount())
                        a += pathAmplitude(g.path(h.array.element_position_m[size_t(e)], mode.tx, m.x_m[ix], m.z_m[iz]), mode.tx, false, g,
                                           width, f0, o);
                for (auto e : rx_el)
                    if (e >= 0 && size_t(e) < h.array.elementCount())
                        b += pathAmplitude(g.path(h.array.element_position_m[size_t(e)], mode.rx, m.x_m[ix], m.z_m[iz]), mode.rx, true, g,
                                           width, f0, o);
                stx[iz * nx + ix] = a;
                srx[iz * nx + ix] = b;
            }
        }
    };
    int nt = o.threads > 0 ? o.threads : int(std::max(1u, std::thread::hardware_concurrency()));
    nt = std::clamp(nt, 1, 64);
    std::vector<std::thread> pool;
    for (int i = 1; i < nt; ++i) pool.emplace_back(work);
    work();
    for (auto& t : pool) t.join();
    double best = 0;
    std::vector<double> s(npix);
    for (size_t i = 0; i < npix; ++i) best = std::max(best, s[i] = stx[i] * srx[i]);
    m.db.resize(npix);
    for (size_t i = 0; i < npix; ++i)
        m.db[i] = best > 0 && s[i] > 0 ? std::max(kCoverageFloorDb, float(20 * std::log10(s[i] / best))) : kCoverageFloorDb;
    return m;
}

}  // namespace umbra::recon
