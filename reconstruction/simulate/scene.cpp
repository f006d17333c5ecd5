// SPDX-License-Identifier: MIT
// Scene file parsing and validation. Every problem is reported as core::InputError naming
// the file and the key path (e.g. "medium.speed_m_s").
#include "reconstruction/simulate/scene.h"

#include <cmath>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>

#include "core/error.h"
#include "reconstruction/view_mode.h"
#include "core/json_guard.h"

namespace umbra::recon::sim {

using nlohmann::json;

namespace {

constexpr double kMm = 1e-3;
constexpr double kDeg = M_PI / 180.0;

/// A JSON object being read: remembers its key path, which keys were used, and reports
/// unknown ones.
class Obj {
public:
    Obj(const json& j, std::string path, const std::string& file) : j_(j), path_(std::move(path)), file_(file) {
        if (!j_.is_object()) fail(path_.empty() ? "(top level)" : path_, "must be a JSON object");
    }
    [[noreturn]] void fail(const std::string& where, const std::string& what) const { throw core::InputError(file_, where, what); }
    std::string key(const std::string& k) const { return path_.empty() ? k : path_ + "." + k; }
    bool has(const std::string& k) {
        used_.insert(k);
        return j_.contains(k) && !j_.at(k).is_null();
    }
    const json& raw(const std::string& k) {
        if (!has(k)) fail(key(k), "missing (required)");
        return j_.at(k);
    }
    double num(const std::string& k) {
        const json& v = raw(k);
        if (!v.is_number()) fail(key(k), "must be a number");
        double d = v.get<double>();
        if (!std::isfinite(d)) fail(key(k), "must be finite");
        return d;
    }
    double num(const std::string& k, double def) { return has(k) ? num(k) : def; }
    double positive(const std::string& k) {
        double d = num(k);
        if (!(d > 0)) fail(key(k), "must be positive (got " + fmt(d) + ")");
        return d;
    }
    double nonneg(const std::string& k, double def) {
        if (!has(k)) return def;
        double d = num(k);
        if (d < 0) fail(key(k), "must not be negative (got " + fmt(d) + ")");
        return d;
    }
    long integer(const std::string& k, long lo, long hi) {
        const json& v = raw(k);
        if (!v.is_number_integer() && !(v.is_number() && std::floor(v.get<double>()) == v.get<double>()))
            fail(key(k), "must be a whole number");
        double d = v.get<double>();
        if (d < lo || d > hi) fail(key(k), "must be between " + std::to_string(lo) + " and " + std::to_string(hi) + " (got " + fmt(d) + ")");
        return long(d);
    }
    std::string str(const std::string& k) {
        const json& v = raw(k);
        if (!v.is_string()) fail(key(k), "must be a string");
        return v.get<std::string>();
    }
    std::string str(const std::string& k, const std::string& def) { return has(k) ? str(k) : def; }
    bool boolean(const std::string& k, bool def) {
        if (!has(k)) return def;
        const json& v = raw(k);
        if (!v.is_boolean()) fail(key(k), "must be true or false");
        return v.get<bool>();
    }
    std::vector<double> nums(const std::string& k, size_t n_min, size_t n_max) {
        const json& v = raw(k);
        if (!v.is_array()) fail(key(k), "must be an array of numbers");
        if (v.size() < n_min || v.size() > n_max)
            fail(key(k), n_min == n_max ? "must have " + std::to_string(n_min) + " entries"
                                        : "must have " + std::to_string(n_min) + " to " + std::to_string(n_max) + " entries");
        std::vector<double> out;
        for (size_t i = 0; i < v.size(); ++i) {
            if (!v[i].is_number() || !std::isfinite(v[i].get<double>())) fail(key(k) + "[" + std::to_string(i) + "]", "must be a finite number");
            out.push_back(v[i].get<double>());
        }
        return out;
    }
    Obj obj(const std::string& k) {
        has(k);
        return Obj(raw(k), key(k), file_);
    }
    std::vector<Obj> list(const std::string& k) {
        std::vector<Obj> out;
        if (!has(k)) return out;
        const json& v = j_.at(k);
        if (!v.is_array()) fail(key(k), "must be an array of objects");
        for (size_t i = 0; i < v.size(); ++i) out.emplace_back(v[i], key(k) + "[" + std::to_string(i) + "]", file_);
        return out;
    }
    /// Call after reading: any key not read is an error (catches typos).
    void done() const {
        for (auto it = j_.begin(); it != j_.end(); ++it)
            if (!used_.count(it.key()) && it.key().rfind("comment", 0) != 0)
                fail(key(it.key()), "unknown key (see docs/scene-format.md)");
    }
    const std::string& path() const { return path_; }
    const json& json_() const { return j_; }

    static std::string fmt(double d) {
        std::ostringstream os;
        os << d;
        return os.str();
    }

private:
    const json& j_;
    std::string path_;
    const std::string& file_;
    std::set<std::string> used_;
};

YRange readY(Obj& o) {
    YRange r;
    if (o.has("y_range_mm")) {
        auto v = o.nums("y_range_mm", 2, 2);
        if (!(v[0] < v[1])) o.fail(o.key("y_range_mm"), "must be [min, max] with min < max");
        r.min_m = v[0] * kMm;
        r.max_m = v[1] * kMm;
    }
    return r;
}

}  // namespace

std::vector<double> ArraySpec::elementX() const {
    std::vector<double> x(size_t(std::max(0, elements)));
    for (int i = 0; i < elements; ++i) x[size_t(i)] = (i - (elements - 1) / 2.0) * pitch_m;
    return x;
}

size_t TransmitSpec::count(int elements) const {
    switch (kind) {
        case core::TransmitKind::SingleElement: return source_elements.empty() ? size_t(elements) : source_elements.size();
        case core::TransmitKind::PlaneWave: return angles_rad.size();
        case core::TransmitKind::VirtualSource: return virtual_sources_m.size();
    }
    return 0;
}

bool SpeckleRegion::contains(double x, double z) const {
    switch (shape) {
        case RegionShape::Circle:
        case RegionShape::Ellipse: {
            const double c = std::cos(angle_rad), s = std::sin(angle_rad);
            const double dx = x - cx_m, dz = z - cz_m;
            const double u = c * dx + s * dz, v = -s * dx + c * dz;
            return (u * u) / (a_m * a_m) + (v * v) / (b_m * b_m) <= 1.0;
        }
        case RegionShape::Tube: {
            const double ax = x1_m - x0_m, az = z1_m - z0_m;
            const double L2 = ax * ax + az * az;
            double t = L2 > 0 ? ((x - x0_m) * ax + (z - z0_m) * az) / L2 : 0;
            t = std::clamp(t, 0.0, 1.0);
            const double px = x0_m + t * ax - x, pz = z0_m + t * az - z;
            return px * px + pz * pz <= radius_m * radius_m;
        }
    }
    return false;
}

double FrameSpec::scanPosition(size_t f) const { return kind == FrameKind::Encoded ? start_m + double(f) * step_m : 0.0; }
double FrameSpec::time(size_t f) const { return kind == FrameKind::Cine ? double(f) * interval_s : 0.0; }
std::pair<double, double> FrameSpec::displacement(size_t f) const {
    if (kind != FrameKind::Cine) return {0.0, 0.0};
    const double t = time(f);
    const double osc = period_s > 0 ? std::sin(2 * M_PI * t / period_s) : 0.0;
    return {velocity_x_m_s * t + oscillation_x_m * osc, velocity_z_m_s * t + oscillation_z_m * osc};
}

// Bounds on what the simulator will allocate and compute, checked before it starts: reflector
// counts, the extent of the scene (a 10 km flaw would ask for gigabytes of points), the pulse
// length (a 0.001 MHz pulse would need a huge table), and the cine motion (a huge interval or
// velocity would move reflectors to infinity).
void checkSceneBounds(const Scene& s, const std::string& source) {
    auto fail = [&](const std::string& where, const std::string& what) { throw core::InputError(source, where, what); };
    if (s.points.size() > kMaxScenePoints)
        fail("reflectors.points", std::to_string(s.points.size()) + " points (limit " + std::to_string(kMaxScenePoints) + ")");
    if (s.holes.size() > kMaxSceneHoles)
        fail("reflectors.side_drilled_holes", std::to_string(s.holes.size()) + " holes (limit " + std::to_string(kMaxSceneHoles) + ")");
    if (s.flaws.size() > kMaxSceneFlaws)
        fail("reflectors.planar_flaws", std::to_string(s.flaws.size()) + " flaws (limit " + std::to_string(kMaxSceneFlaws) + ")");
    auto inside = [&](double v) { return std::isfinite(v) && std::fabs(v) <= kMaxSceneExtentM; };
    const std::string lim = " (limit " + Obj::fmt(kMaxSceneExtentM) + " m from the array)";
    for (size_t i = 0; i < s.points.size(); ++i)
        for (double v : s.points[i].position_m)
            if (!inside(v)) fail("reflectors.points[" + std::to_string(i) + "].position_mm", "lies too far away" + lim);
    for (size_t i = 0; i < s.holes.size(); ++i)
        if (!inside(s.holes[i].x_m) || !inside(s.holes[i].z_m) || !inside(s.holes[i].diameter_m))
            fail("reflectors.side_drilled_holes[" + std::to_string(i) + "]", "lies too far away or is too large" + lim);
    const double lambda = s.medium.speed_m_s / s.array.centre_frequency_hz;
    double flaw_points = 0;
    for (size_t i = 0; i < s.flaws.size(); ++i) {
        const auto& f = s.flaws[i];
        if (!inside(f.x0_m) || !inside(f.z0_m) || !inside(f.x1_m) || !inside(f.z1_m))
            fail("reflectors.planar_flaws[" + std::to_string(i) + "]", "lies too far away" + lim);
        flaw_points += std::hypot(f.x1_m - f.x0_m, f.z1_m - f.z0_m) / (lambda / 4) + 2;
    }
    if (flaw_points > double(kMaxSceneFlawPoints))
        fail("reflectors.planar_flaws", "the flaws would be modelled by " + Obj::fmt(flaw_points) + " points (limit " +
                                            std::to_string(kMaxSceneFlawPoints) + "); make them shorter");
    // The Gaussian pulse lasts 10 sigma (GaussianPulse::halfSupport).
    const double sigma = std::sqrt(2 * std::log(2.0)) / (M_PI * s.array.fractional_bandwidth * s.array.centre_frequency_hz);
    const double pulse_samples = 10 * sigma * s.sampling.frequency_hz;
    if (!(pulse_samples <= kMaxPulseSamples))
        fail("array.centre_frequency_mhz", "with this bandwidth and sampling the pulse would last " + Obj::fmt(pulse_samples) +
                                               " samples (limit " + Obj::fmt(kMaxPulseSamples) + "): raise the frequency or bandwidth");
    if (s.frames.kind == FrameKind::Cine)
        for (size_t f : {size_t(0), s.frames.count > 0 ? s.frames.count - 1 : 0}) {
            const auto [dx, dz] = s.frames.displacement(f);
            if (!inside(dx) || !inside(dz) || !std::isfinite(s.frames.time(f)))
                fail("frames", "the cine motion moves the scene too far by frame " + std::to_string(f) + lim);
        }
}

Scene parseScene(const std::string& text, const std::string& source) {
    core::checkJsonText(text, source);  // plain-words syntax errors, bounded depth and size, out-of-range numbers named
    json j;
    try {
        j = json::parse(text);
    } catch (const json::exception& e) {
        throw core::InputError(source, "", std::string("not valid JSON: ") + e.what());
    }
    Scene s;
    s.source = source;
    Obj top(j, "", source);
    if (top.has("format") && top.str("format") != "umbra-scene") top.fail("format", "must be \"umbra-scene\"");
    if (top.has("version") && top.integer("version", 1, 1) != 1) top.fail("version", "must be 1");
    s.title = top.str("title");
    s.scenario = top.str("scenario");
    if (top.has("seed")) s.seed = uint64_t(top.integer("seed", 0, (1L << 53)));
    if (top.has("provenance")) {
        Obj p = top.obj("provenance");
        for (auto it = p.json_().begin(); it != p.json_().end(); ++it) {
            if (!it.value().is_string()) p.fail(p.key(it.key()), "must be a string");
            p.has(it.key());
            s.provenance.emplace_back(it.key(), it.value().get<std::string>());
        }
    }

    // --- array
    {
        Obj a = top.obj("array");
        s.array.elements = int(a.integer("elements", 1, long(core::CaptureLimits::max_elements)));
        s.array.pitch_m = a.positive("pitch_mm") * kMm;
        s.array.element_width_m = a.positive("element_width_mm") * kMm;
        if (s.array.element_width_m > s.array.pitch_m * (1 + 1e-9) && s.array.elements > 1)
            a.fail(a.key("element_width_mm"), "is wider than the pitch");
        if (a.has("element_height_mm")) s.array.element_height_m = a.positive("element_height_mm") * kMm;
        s.array.elevation_beam_width_m = a.has("elevation_beam_width_mm") ? a.positive("elevation_beam_width_mm") * kMm
                                                                           : s.array.element_height_m.value_or(2e-3);
        s.array.centre_frequency_hz = a.positive("centre_frequency_mhz") * 1e6;
        s.array.fractional_bandwidth = a.positive("fractional_bandwidth");
        if (s.array.fractional_bandwidth > 1.5) a.fail(a.key("fractional_bandwidth"), "must be at most 1.5 (a Gaussian pulse wider than that has a large DC part)");
        a.done();
    }
    // --- medium
    {
        Obj m = top.obj("medium");
        s.medium.speed_m_s = m.positive("speed_m_s");
        if (s.medium.speed_m_s < 100 || s.medium.speed_m_s > 20000) m.fail(m.key("speed_m_s"), "must be between 100 and 20000 m/s");
        if (m.has("shear_speed_m_s")) s.medium.shear_speed_m_s = m.positive("shear_speed_m_s");
        s.medium.attenuation_db_per_cm_mhz = m.nonneg("attenuation_db_per_cm_mhz", 0.0);
        if (s.medium.attenuation_db_per_cm_mhz > 20) m.fail(m.key("attenuation_db_per_cm_mhz"), "is implausibly large (> 20 dB/cm/MHz)");
        if (m.has("thickness_mm")) s.medium.thickness_m = m.positive("thickness_mm") * kMm;
        m.done();
    }
    // --- wedge and elastic paths
    if (top.has("wedge")) {
        Obj w = top.obj("wedge");
        WedgeSpec ws;
        ws.speed_m_s = w.positive("speed_m_s");
        if (ws.speed_m_s < 100 || ws.speed_m_s > 20000) w.fail(w.key("speed_m_s"), "must be between 100 and 20000 m/s");
        const double a = w.num("angle_deg");
        if (!(std::fabs(a) < 90)) w.fail(w.key("angle_deg"), "must be within (-90, 90) degrees");
        ws.angle_rad = a * M_PI / 180;
        ws.height_m = w.positive("height_mm") * kMm;
        w.done();
        s.wedge = ws;
        s.elastic.enabled = true;
    }
    if (top.has("paths")) {
        Obj p = top.obj("paths");
        s.elastic.enabled = true;
        if (p.has("modes")) {
            const auto& arr = p.raw("modes");
            if (!arr.is_array() || arr.empty() || arr.size() > kMaxSceneModes)
                p.fail(p.key("modes"), "must be a list of 1 to " + std::to_string(kMaxSceneModes) + " views such as \"TT-T\"");
            for (size_t i = 0; i < arr.size(); ++i) {
                if (!arr[i].is_string()) p.fail(p.key("modes") + "[" + std::to_string(i) + "]", "must be a string such as \"TT-T\"");
                try {
                    s.elastic.modes.push_back(parseViewMode(arr[i].get<std::string>()).name);
                } catch (const core::SettingError&) {
                    p.fail(p.key("modes") + "[" + std::to_string(i) + "]",
                           "\"" + arr[i].get<std::string>() + "\" is not a view (one or two letters L/T, a dash, one or two letters)");
                }
            }
        }
        const std::string sp = p.str("spreading", "2d");
        if (sp != "2d" && sp != "3d") p.fail(p.key("spreading"), "must be \"2d\" or \"3d\"");
        s.elastic.spreading_3d = sp == "3d";
        p.done();
    }
    // --- transmit
    {
        Obj t = top.obj("transmit");
        const std::string kind = t.str("kind");
        auto k = core::transmitKindFromString(kind);
        if (!k) t.fail(t.key("kind"), "must be single_element, plane_wave or virtual_source (got \"" + kind + "\")");
        s.transmit.kind = *k;
        if (*k == core::TransmitKind::SingleElement) {
            if (t.has("elements")) {
                auto v = t.nums("elements", 1, core::CaptureLimits::max_transmits);
                for (size_t i = 0; i < v.size(); ++i) {
                    if (v[i] < 0 || v[i] >= s.array.elements || std::floor(v[i]) != v[i])
                        t.fail(t.key("elements") + "[" + std::to_string(i) + "]", "must be an element index 0.." + std::to_string(s.array.elements - 1));
                    s.transmit.source_elements.push_back(int(v[i]));
                }
            }
        } else if (*k == core::TransmitKind::PlaneWave) {
            if (t.has("angles_deg")) {
                for (double d : t.nums("angles_deg", 1, core::CaptureLimits::max_transmits)) s.transmit.angles_rad.push_back(d * kDeg);
            } else {
                Obj r = t.obj("angle_range_deg");
                const double a0 = r.num("from"), a1 = r.num("to");
                const long n = r.integer("count", 1, long(core::CaptureLimits::max_transmits));
                r.done();
                for (long i = 0; i < n; ++i) s.transmit.angles_rad.push_back((n == 1 ? a0 : a0 + (a1 - a0) * double(i) / double(n - 1)) * kDeg);
            }
            for (size_t i = 0; i < s.transmit.angles_rad.size(); ++i)
                if (std::abs(s.transmit.angles_rad[i]) >= 80 * kDeg) t.fail(t.key("angles_deg"), "steering angles must be within +-80 degrees");
        } else {
            const json& v = t.raw("sources_mm");
            if (!v.is_array() || v.empty()) t.fail(t.key("sources_mm"), "must be a non-empty array of [x, y, z] points");
            for (size_t i = 0; i < v.size(); ++i) {
                const std::string where = t.key("sources_mm") + "[" + std::to_string(i) + "]";
                if (!v[i].is_array() || v[i].size() != 3) t.fail(where, "must be [x, y, z] in mm");
                core::Vec3 p;
                for (int c = 0; c < 3; ++c) {
                    if (!v[i][c].is_number()) t.fail(where, "must be [x, y, z] in mm");
                    p[c] = v[i][c].get<double>() * kMm;
                }
                if (std::abs(p[2]) < 1e-6) t.fail(where, "z must not be 0 (use plane_wave or single_element)");
                s.transmit.virtual_sources_m.push_back(p);
            }
        }
        t.done();
    }
    // --- sampling
    {
        Obj m = top.obj("sampling");
        s.sampling.frequency_hz = m.positive("frequency_mhz") * 1e6;
        if (s.sampling.frequency_hz < 2 * s.array.centre_frequency_hz * (1 + s.array.fractional_bandwidth / 2))
            m.fail(m.key("frequency_mhz"), "is below the Nyquist rate of the pulse band");
        s.sampling.start_time_s = m.num("start_time_us", 0.0) * 1e-6;
        if (m.has("samples") == m.has("max_depth_mm")) m.fail(m.key("samples"), "give exactly one of samples or max_depth_mm");
        double n = 0;
        if (m.has("samples")) n = double(m.integer("samples", 1, long(core::CaptureLimits::max_samples)));
        else {
            const double zmax = m.positive("max_depth_mm") * kMm;
            n = std::ceil((2 * zmax / s.medium.speed_m_s - s.sampling.start_time_s) * s.sampling.frequency_hz - 1e-6);
            if (n < 1 || n > double(core::CaptureLimits::max_samples)) m.fail(m.key("max_depth_mm"), "gives " + Obj::fmt(n) + " samples (limit 1.." + std::to_string(core::CaptureLimits::max_samples) + ")");
        }
        s.sampling.samples = size_t(n);
        m.done();
    }
    // --- reflectors
    if (top.has("reflectors")) {
        Obj r = top.obj("reflectors");
        for (Obj& p : r.list("points")) {
            auto v = p.nums("position_mm", 3, 3);
            if (v[2] <= 0) p.fail(p.key("position_mm"), "z must be positive (in front of the array)");
            s.points.push_back({{v[0] * kMm, v[1] * kMm, v[2] * kMm}, p.num("amplitude", 1.0)});
            p.done();
        }
        for (Obj& p : r.list("side_drilled_holes")) {
            SideDrilledHole h;
            auto c = p.nums("centre_mm", 2, 2);
            h.x_m = c[0] * kMm;
            h.z_m = c[1] * kMm;
            h.diameter_m = p.positive("diameter_mm") * kMm;
            if (h.z_m - h.diameter_m / 2 <= 0) p.fail(p.key("centre_mm"), "hole must lie wholly below the surface");
            h.amplitude = p.num("amplitude", 1.0);
            h.y = readY(p);
            s.holes.push_back(h);
            p.done();
        }
        for (Obj& p : r.list("planar_flaws")) {
            PlanarFlaw f;
            auto a = p.nums("start_mm", 2, 2), b = p.nums("end_mm", 2, 2);
            f.x0_m = a[0] * kMm; f.z0_m = a[1] * kMm; f.x1_m = b[0] * kMm; f.z1_m = b[1] * kMm;
            if (f.z0_m <= 0 || f.z1_m <= 0) p.fail(p.key("start_mm"), "flaw must lie below the surface (z > 0)");
            if (std::hypot(f.x1_m - f.x0_m, f.z1_m - f.z0_m) < 1e-6) p.fail(p.key("end_mm"), "flaw has zero length");
            f.amplitude = p.num("amplitude", 1.0);
            f.tip_amplitude = p.num("tip_amplitude", 0.5);
            f.y = readY(p);
            s.flaws.push_back(f);
            p.done();
        }
        if (r.has("back_wall")) {
            Obj b = r.obj("back_wall");
            BackWall w;
            if (b.has("depth_mm")) w.depth_m = b.positive("depth_mm") * kMm;
            else if (s.medium.thickness_m) w.depth_m = *s.medium.thickness_m;
            else b.fail(b.key("depth_mm"), "missing (and medium.thickness_mm is not given)");
            w.amplitude = b.num("amplitude", 1.0);
            w.repeats = int(b.has("repeats") ? b.integer("repeats", 0, 1) : 1);
            s.back_wall = w;
            b.done();
        }
        r.done();
    }
    // --- speckle
    if (top.has("speckle")) {
        Obj sp = top.obj("speckle");
        s.speckle.enabled = true;
        auto x = sp.nums("x_range_mm", 2, 2), z = sp.nums("z_range_mm", 2, 2);
        if (!(x[0] < x[1])) sp.fail(sp.key("x_range_mm"), "must be [min, max] with min < max");
        if (!(z[0] < z[1]) || z[0] <= 0) sp.fail(sp.key("z_range_mm"), "must be [min, max] with 0 < min < max");
        s.speckle.x_min_m = x[0] * kMm; s.speckle.x_max_m = x[1] * kMm;
        s.speckle.z_min_m = z[0] * kMm; s.speckle.z_max_m = z[1] * kMm;
        const double d = sp.positive("density_per_mm2");
        const double count = d * (x[1] - x[0]) * (z[1] - z[0]);
        if (count > 2e6) sp.fail(sp.key("density_per_mm2"), "gives " + Obj::fmt(count) + " scatterers (limit 2 000 000)");
        s.speckle.density_per_m2 = d * 1e6;
        s.speckle.amplitude_rms = sp.has("amplitude_rms") ? sp.positive("amplitude_rms") : 0.05;
        for (Obj& g : sp.list("regions")) {
            SpeckleRegion reg;
            const std::string shape = g.str("shape");
            if (shape == "circle") {
                reg.shape = RegionShape::Circle;
                auto c = g.nums("centre_mm", 2, 2);
                reg.cx_m = c[0] * kMm; reg.cz_m = c[1] * kMm;
                reg.a_m = reg.b_m = g.positive("diameter_mm") * kMm / 2;
            } else if (shape == "ellipse") {
                reg.shape = RegionShape::Ellipse;
                auto c = g.nums("centre_mm", 2, 2);
                reg.cx_m = c[0] * kMm; reg.cz_m = c[1] * kMm;
                auto ax = g.nums("axes_mm", 2, 2);
                if (ax[0] <= 0 || ax[1] <= 0) g.fail(g.key("axes_mm"), "must be two positive full lengths");
                reg.a_m = ax[0] * kMm / 2; reg.b_m = ax[1] * kMm / 2;
                reg.angle_rad = g.num("angle_deg", 0.0) * kDeg;
            } else if (shape == "tube") {
                reg.shape = RegionShape::Tube;
                auto a = g.nums("start_mm", 2, 2), b = g.nums("end_mm", 2, 2);
                reg.x0_m = a[0] * kMm; reg.z0_m = a[1] * kMm; reg.x1_m = b[0] * kMm; reg.z1_m = b[1] * kMm;
                reg.radius_m = g.positive("diameter_mm") * kMm / 2;
            } else {
                g.fail(g.key("shape"), "must be circle, ellipse or tube (got \"" + shape + "\")");
            }
            if (g.has("contrast_db")) {
                const json& v = g.raw("contrast_db");
                if (v.is_string() && v.get<std::string>() == "anechoic") reg.anechoic = true;
                else if (v.is_number() && std::isfinite(v.get<double>()) && std::abs(v.get<double>()) <= 60) reg.contrast_db = v.get<double>();
                else g.fail(g.key("contrast_db"), "must be a number of dB within +-60 or \"anechoic\"");
            } else {
                g.fail(g.key("contrast_db"), "missing (required: dB relative to the background, or \"anechoic\")");
            }
            reg.label = g.str("label", "");
            s.speckle.regions.push_back(reg);
            g.done();
        }
        sp.done();
    }
    // --- noise
    if (top.has("noise")) {
        Obj n = top.obj("noise");
        s.noise.snr_db = n.num("snr_db");
        if (s.noise.snr_db < -20 || s.noise.snr_db > 200) n.fail(n.key("snr_db"), "must be between -20 and 200 dB");
        const std::string ref = n.str("reference");
        if (ref == "back_wall") {
            if (!s.back_wall) n.fail(n.key("reference"), "is back_wall but the scene has no reflectors.back_wall");
            s.noise.reference = NoiseReference::BackWall;
        } else if (ref == "peak") {
            s.noise.reference = NoiseReference::Peak;
        } else if (ref == "amplitude") {
            s.noise.reference = NoiseReference::Amplitude;
            s.noise.reference_amplitude = n.positive("reference_amplitude");
        } else {
            n.fail(n.key("reference"), "must be back_wall, peak or amplitude (got \"" + ref + "\")");
        }
        n.done();
    }
    // --- frames
    if (top.has("frames")) {
        Obj f = top.obj("frames");
        const std::string kind = f.str("kind");
        if (kind == "single") {
            s.frames.kind = FrameKind::Single;
        } else if (kind == "encoded") {
            s.frames.kind = FrameKind::Encoded;
            s.frames.count = size_t(f.integer("count", 1, 100000));
            s.frames.start_m = f.num("start_mm") * kMm;
            s.frames.step_m = f.positive("step_mm") * kMm;
        } else if (kind == "cine") {
            s.frames.kind = FrameKind::Cine;
            s.frames.count = size_t(f.integer("count", 1, 100000));
            s.frames.interval_s = f.positive("interval_ms") * 1e-3;
            if (f.has("velocity_mm_s")) {
                auto v = f.nums("velocity_mm_s", 2, 2);
                s.frames.velocity_x_m_s = v[0] * kMm; s.frames.velocity_z_m_s = v[1] * kMm;
            }
            if (f.has("oscillation_mm")) {
                auto v = f.nums("oscillation_mm", 2, 2);
                s.frames.oscillation_x_m = v[0] * kMm; s.frames.oscillation_z_m = v[1] * kMm;
                s.frames.period_s = f.positive("period_ms") * 1e-3;
            }
        } else {
            f.fail(f.key("kind"), "must be single, encoded or cine (got \"" + kind + "\")");
        }
        f.done();
    }
    // --- output
    if (top.has("output")) {
        Obj o = top.obj("output");
        const std::string t = o.str("sample_type", "float32");
        if (t == "float32") s.output.sample_type = core::SampleType::Float32;
        else if (t == "int16") s.output.sample_type = core::SampleType::Int16;
        else o.fail(o.key("sample_type"), "must be float32 or int16 (got \"" + t + "\")");
        if (o.has("scale")) s.output.scale = o.positive("scale");
        s.output.units = o.str("units", "a.u.");
        o.done();
    }
    top.done();

    // Cross-checks and size limits.
    const size_t ntx = s.transmit.count(s.array.elements);
    if (ntx == 0) throw core::InputError(source, "transmit", "no transmit events");
    if (ntx > core::CaptureLimits::max_transmits) throw core::InputError(source, "transmit", "too many transmit events");
    const double block_bytes = double(s.array.elements) * double(s.sampling.samples) * 4.0;
    if (block_bytes > double(core::CaptureLimits::max_block_bytes))
        throw core::InputError(source, "sampling.samples", "one transmit block would be " + Obj::fmt(block_bytes / 1e6) + " MB (too large)");
    const double total = double(s.frames.count) * double(ntx) * double(s.array.elements) * double(s.sampling.samples) *
                         (s.output.sample_type == core::SampleType::Int16 ? 2.0 : 4.0);
    if (total > 64e9) throw core::InputError(source, "frames.count", "capture would be " + Obj::fmt(total / 1e9) + " GB (limit 64 GB)");
    // The simulator holds one frame (all transmits) as float32 and per-transmit tables of every scatterer.
    const double frame_bytes = double(ntx) * block_bytes;
    if (frame_bytes > 4e9)
        throw core::InputError(source, "sampling.samples", "one frame would need " + Obj::fmt(frame_bytes / 1e9) + " GB of memory (limit 4 GB)");
    if (s.speckle.enabled) {
        const double k = s.speckle.density_per_m2 * (s.speckle.x_max_m - s.speckle.x_min_m) * (s.speckle.z_max_m - s.speckle.z_min_m);
        if (k * double(ntx) * 12.0 > 4e9)
            throw core::InputError(source, "speckle.density_per_mm2", "scatterer tables for " + std::to_string(ntx) + " transmits would exceed 4 GB");
    }
    checkSceneBounds(s, source);
    if (s.elastic.enabled) {
        // Default views: direct L and T, and the shear skips when the plate's thickness is known.
        const bool shear = s.medium.shear_speed_m_s.has_value(), thick = s.medium.thickness_m.has_value();
        if (s.elastic.modes.empty()) {
            s.elastic.modes.push_back("L-L");
            if (shear) s.elastic.modes.push_back("T-T");
            if (shear && thick) s.elastic.modes.insert(s.elastic.modes.end(), {"TT-T", "T-TT", "TT-TT"});
        }
        for (const auto& m : s.elastic.modes) {
            const ViewMode v = parseViewMode(m);
            if (v.usesShear() && !shear) throw core::InputError(source, "paths.modes", m + " needs medium.shear_speed_m_s");
            if (v.usesBackWall() && !thick) throw core::InputError(source, "paths.modes", m + " needs medium.thickness_mm");
        }
        if (shear && !(*s.medium.shear_speed_m_s < s.medium.speed_m_s))
            throw core::InputError(source, "medium.shear_speed_m_s", "must be below medium.speed_m_s");
        if (s.transmit.kind != core::TransmitKind::SingleElement)
            throw core::InputError(source, "transmit.kind", "elastic paths and wedges are simulated for single_element (full-matrix) captures only");
        double pts = double(s.points.size() + s.holes.size());
        for (auto& f : s.flaws) pts += std::hypot(f.x1_m - f.x0_m, f.z1_m - f.z0_m) / (s.medium.speed_m_s / s.array.centre_frequency_hz / 4) + 2;
        if (s.speckle.enabled) throw core::InputError(source, "speckle", "speckle is not simulated with elastic paths or a wedge");
        if (pts * double(s.array.elements) * 4.0 > kMaxSceneElasticPaths)
            throw core::InputError(source, "paths", "too many reflector paths to evaluate (reflector points x elements x leg kinds > 2e8)");
        if (s.wedge) {
            // The array must sit above the part: every element's height above the surface > 0.
            const double c = std::cos(s.wedge->angle_rad), sn = std::sin(s.wedge->angle_rad);
            for (double x : s.array.elementX())
                if (!(x * sn + s.wedge->height_m * c > 0))
                    throw core::InputError(source, "wedge.height_mm", "puts array elements at or below the part surface (raise the array)");
        }
    }
    return s;
}

Scene loadScene(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw core::InputError(path, "", "cannot open scene file");
    in.seekg(0, std::ios::end);
    const auto size = in.tellg();
    if (size > std::streamoff(16 << 20)) throw core::InputError(path, "", "scene file larger than 16 MB");
    in.seekg(0);
    std::ostringstream ss;
    ss << in.rdbuf();
    return parseScene(ss.str(), path);
}

}  // namespace umbra::recon::sim
