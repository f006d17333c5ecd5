// SPDX-License-Identifier: MIT
#include "reconstruction/simulate/scatterers.h"

#include <cmath>
#include <nlohmann/json.hpp>

#include "reconstruction/simulate/random.h"

namespace umbra::recon::sim {

namespace {
double sigmaFromFwhm(double fw) { return fw / std::sqrt(8.0 * std::log(2.0)); }
double wavelengthOf(const Scene& s) { return s.medium.speed_m_s / s.array.centre_frequency_hz; }
double midY(const YRange& r) {
    if (std::isfinite(r.min_m) && std::isfinite(r.max_m)) return 0.5 * (r.min_m + r.max_m);
    return 0.0;
}
}  // namespace

double elevationWeightPoint(double y, double y_scan, double fw) {
    const double d = (y - y_scan) / fw;
    return std::exp(-4.0 * std::log(2.0) * d * d);
}

double elevationWeightRange(const YRange& r, double y_scan, double fw) {
    const double s = sigmaFromFwhm(fw) * std::sqrt(2.0);
    auto cdf = [&](double y) { return std::isinf(y) ? (y > 0 ? 1.0 : 0.0) : 0.5 * (1 + std::erf((y - y_scan) / s)); };
    return cdf(r.max_m) - cdf(r.min_m);
}

std::vector<PointSource> makeSpeckle(const SpeckleSpec& s, uint64_t seed) {
    std::vector<PointSource> out;
    if (!s.enabled) return out;
    const double area = (s.x_max_m - s.x_min_m) * (s.z_max_m - s.z_min_m);
    const auto n = size_t(std::llround(s.density_per_m2 * area));
    out.reserve(n);
    detail::Rng rng(seed, 0x5eed5eedULL);
    for (size_t i = 0; i < n; ++i) {
        const double x = s.x_min_m + rng.uniform() * (s.x_max_m - s.x_min_m);
        const double z = s.z_min_m + rng.uniform() * (s.z_max_m - s.z_min_m);
        double a = rng.normal() * s.amplitude_rms;
        for (auto it = s.regions.rbegin(); it != s.regions.rend(); ++it) {
            if (it->contains(x, z)) {
                a = it->anechoic ? 0.0 : a * std::pow(10.0, it->contrast_db / 20.0);
                break;
            }
        }
        if (a != 0.0) out.push_back({x, z, a});
    }
    return out;
}

double flawWavelength(const Scene& s) {
    if (s.elastic.enabled && s.medium.shear_speed_m_s) return *s.medium.shear_speed_m_s / s.array.centre_frequency_hz;
    return wavelengthOf(s);
}

std::vector<PointSource> expandFlaw(const PlanarFlaw& f, double lambda, bool opposite_tips) {
    const double L = std::hypot(f.x1_m - f.x0_m, f.z1_m - f.z0_m);
    const int n = std::max(2, int(std::ceil(L / (lambda / 4))));
    const double step = L / n;
    std::vector<PointSource> out;
    out.push_back({f.x0_m, f.z0_m, f.tip_amplitude});
    for (int i = 1; i < n; ++i) {
        const double t = double(i) / n;
        out.push_back({f.x0_m + t * (f.x1_m - f.x0_m), f.z0_m + t * (f.z1_m - f.z0_m), f.amplitude * step / lambda});
    }
    out.push_back({f.x1_m, f.z1_m, f.tip_amplitude});
    if (opposite_tips) (f.z1_m >= f.z0_m ? out.back() : out.front()).amplitude = -f.tip_amplitude;
    return out;
}

FrameContent frameContent(const Scene& s, size_t f, const std::vector<PointSource>& speckle) {
    FrameContent c;
    const double ys = s.frames.scanPosition(f);
    const auto [dx, dz] = s.frames.displacement(f);
    const double fw = s.array.elevation_beam_width_m;
    const double lambda = flawWavelength(s);
    for (auto& p : s.points) {
        const double w = elevationWeightPoint(p.position_m[1], ys, fw);
        if (w > 1e-6) c.points.push_back({p.position_m[0] + dx, p.position_m[2] + dz, p.amplitude * w});
    }
    for (auto& fl : s.flaws) {
        const double w = elevationWeightRange(fl.y, ys, fw);
        if (w <= 1e-6) continue;
        for (auto& p : expandFlaw(fl, lambda, s.elastic.enabled)) c.points.push_back({p.x_m + dx, p.z_m + dz, p.amplitude * w});
    }
    for (auto& p : speckle) c.points.push_back({p.x_m + dx, p.z_m + dz, p.amplitude});
    for (auto& h : s.holes) {
        const double w = elevationWeightRange(h.y, ys, fw);
        if (w > 1e-6) c.holes.push_back({h.x_m + dx, h.z_m + dz, h.diameter_m / 2, h.amplitude * w});
    }
    return c;
}

std::string regionsJson(const Scene& s) {
    if (!s.speckle.enabled || s.speckle.regions.empty()) return {};
    nlohmann::json list = nlohmann::json::array();
    for (auto& r : s.speckle.regions) {
        nlohmann::json j;
        if (!r.label.empty()) j["label"] = r.label;
        switch (r.shape) {
            case RegionShape::Circle:
                j["kind"] = "circle";
                j["centre_m"] = {r.cx_m, r.cz_m};
                j["diameter_m"] = 2 * r.a_m;
                break;
            case RegionShape::Ellipse:
                j["kind"] = "ellipse";
                j["centre_m"] = {r.cx_m, r.cz_m};
                j["axes_m"] = {2 * r.a_m, 2 * r.b_m};
                j["angle_deg"] = r.angle_rad * 180 / M_PI;
                break;
            case RegionShape::Tube:
                j["kind"] = "tube";
                j["centre_m"] = {(r.x0_m + r.x1_m) / 2, (r.z0_m + r.z1_m) / 2};
                j["start_m"] = {r.x0_m, r.z0_m};
                j["end_m"] = {r.x1_m, r.z1_m};
                j["diameter_m"] = 2 * r.radius_m;
                j["angle_deg"] = std::atan2(r.z1_m - r.z0_m, r.x1_m - r.x0_m) * 180 / M_PI;
                break;
        }
        j["anechoic"] = r.anechoic;
        if (r.anechoic) j["echogenicity_db"] = nullptr;
        else j["echogenicity_db"] = r.contrast_db;
        list.push_back(std::move(j));
    }
    return list.dump();
}

core::TruthInfo makeTruth(const Scene& s) {
    core::TruthInfo t;
    const double lambda = flawWavelength(s);
    for (auto& p : s.points) {
        t.scatterer_position_m.push_back(p.position_m);
        t.scatterer_amplitude.push_back(p.amplitude);
    }
    for (auto& f : s.flaws) {
        for (auto& p : expandFlaw(f, lambda, s.elastic.enabled)) {
            t.scatterer_position_m.push_back({p.x_m, midY(f.y), p.z_m});
            t.scatterer_amplitude.push_back(p.amplitude);
        }
    }
    for (auto& h : s.holes) {
        t.scatterer_position_m.push_back({h.x_m, midY(h.y), h.z_m});
        t.scatterer_amplitude.push_back(h.amplitude);
    }
    switch (s.frames.kind) {
        case FrameKind::Encoded: t.frame = "array frame at scan position 0 (y along the scan axis)"; break;
        case FrameKind::Cine: t.frame = "array frame, positions at cine frame 0"; break;
        default: t.frame = "array frame"; break;
    }
    if (s.wedge) t.frame = "specimen";
    t.regions_json = regionsJson(s);
    return t;
}

}  // namespace umbra::recon::sim
