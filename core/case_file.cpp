// SPDX-License-Identifier: MIT
#include "core/case_file.h"

#include <cerrno>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <sstream>

#include "core/atomic_file.h"
#include "core/capture_file.h"
#include "core/error.h"
#include "core/json_guard.h"

namespace umbra::core {
namespace {

namespace fs = std::filesystem;
using json = nlohmann::ordered_json;

constexpr const char* kFormatTag = "umbracase";
constexpr std::uintmax_t kMaxCaseBytes = 64u << 20;  // a case is text; refuse anything absurd
// Memory budget for loading a case: the parsed JSON tree is estimated before parsing
// (core/json_guard.h) and refused beyond 256 MiB; the document built from it is smaller.
constexpr size_t kCaseMemoryBudget = size_t(256) << 20;

// ---------- writing ----------

json optionalNumber(const std::optional<double>& v) { return v ? json(*v) : json(nullptr); }

std::string storedPath(const std::string& path, const std::string& base_dir) {
    if (base_dir.empty() || path.empty()) return path;
    std::error_code ec;
    const fs::path abs = fs::absolute(fs::path(path), ec).lexically_normal();
    if (ec) return path;
    const fs::path base = fs::absolute(fs::path(base_dir), ec).lexically_normal();
    if (ec) return path;
    const fs::path rel = abs.lexically_relative(base);
    if (rel.empty()) return fs::path(path).generic_string();  // different root: keep as given
    return rel.generic_string();
}

std::string absolutePath(const std::string& path) {
    std::error_code ec;
    const fs::path abs = fs::absolute(fs::path(path), ec).lexically_normal();
    return ec ? path : abs.generic_string();
}

json measurementJson(const Measurement& m) {
    json j = json::object();
    j["id"] = m.id;
    j["kind"] = kindName(m.kind);
    j["label"] = m.label;
    j["frame"] = m.frame_index;
    json pts = json::array();
    for (const auto& p : m.points) pts.push_back(json::array({p.x_mm, p.z_mm}));
    j["points_mm"] = pts;
    return j;
}

json findingJson(const Finding& f) {
    const Indication& in = f.indication;
    json ind = json::object();
    ind["location"] = in.location;
    ind["capture"] = in.capture_index;
    ind["frame"] = in.frame_index;
    ind["x_mm"] = optionalNumber(in.x_mm);
    ind["depth_mm"] = optionalNumber(in.depth_mm);
    ind["length_mm"] = optionalNumber(in.length_mm);
    ind["height_mm"] = optionalNumber(in.height_mm);
    ind["peak_db"] = optionalNumber(in.peak_db);
    ind["reference"] = in.reference;
    ind["measurements"] = in.measurement_ids;
    ind["description"] = in.description;
    json j = json::object();
    j["id"] = f.id;
    j["number"] = f.number;
    j["indication"] = ind;
    j["interpretation"] = json{{"class", interpretationName(f.interpretation)},
                               {"reason", f.interpretation_reason}};
    j["evaluation"] = json{{"outcome", evaluationName(f.evaluation)}, {"criterion", f.criterion}};
    return j;
}

// ---------- reading ----------

// Typed access with the JSON key path in every error.
class Reader {
public:
    explicit Reader(std::string source) : source_(std::move(source)) {}

    [[noreturn]] void fail(const std::string& where, const std::string& what) const {
        throw InputError(source_, where, what);
    }

    static std::string key(const std::string& path, const std::string& k) {
        return path.empty() ? k : path + "." + k;
    }
    static std::string index(const std::string& path, size_t i) {
        return path + "[" + std::to_string(i) + "]";
    }

    const json& object(const json& j, const std::string& path) const {
        if (!j.is_object()) fail(path.empty() ? "(top level)" : path, "must be a JSON object");
        return j;
    }
    const json& required(const json& obj, const std::string& path, const std::string& k) const {
        auto it = obj.find(k);
        if (it == obj.end()) fail(key(path, k), "missing");
        return *it;
    }
    std::string text(const json& obj, const std::string& path, const std::string& k, bool need = false) const {
        auto it = obj.find(k);
        if (it == obj.end()) {
            if (need) fail(key(path, k), "missing");
            return {};
        }
        if (!it->is_string()) fail(key(path, k), "must be text (a JSON string)");
        return it->get<std::string>();
    }
    double number(const json& obj, const std::string& path, const std::string& k, double def) const {
        auto it = obj.find(k);
        if (it == obj.end()) return def;
        return numberValue(*it, key(path, k));
    }
    double numberValue(const json& v, const std::string& where) const {
        if (!v.is_number()) fail(where, "must be a number");
        const double d = v.get<double>();
        if (!std::isfinite(d)) fail(where, "must be a finite number");
        return d;
    }
    std::optional<double> optionalNumber(const json& obj, const std::string& path, const std::string& k) const {
        auto it = obj.find(k);
        if (it == obj.end() || it->is_null()) return std::nullopt;
        return numberValue(*it, key(path, k));
    }
    size_t count(const json& obj, const std::string& path, const std::string& k, bool need = false) const {
        auto it = obj.find(k);
        if (it == obj.end()) {
            if (need) fail(key(path, k), "missing");
            return 0;
        }
        if (!it->is_number_integer() && !it->is_number_unsigned()) fail(key(path, k), "must be a whole number");
        if (it->is_number_integer() && it->get<long long>() < 0) fail(key(path, k), "must not be negative");
        return it->get<size_t>();
    }
    const json* array(const json& obj, const std::string& path, const std::string& k, bool need = false) const {
        auto it = obj.find(k);
        if (it == obj.end()) {
            if (need) fail(key(path, k), "missing");
            return nullptr;
        }
        if (!it->is_array()) fail(key(path, k), "must be a JSON array");
        return &*it;
    }
    std::vector<std::string> texts(const json& obj, const std::string& path, const std::string& k) const {
        std::vector<std::string> out;
        if (const json* a = array(obj, path, k)) {
            for (size_t i = 0; i < a->size(); ++i) {
                if (!(*a)[i].is_string()) fail(index(key(path, k), i), "must be text (a JSON string)");
                out.push_back((*a)[i].get<std::string>());
            }
        }
        return out;
    }

private:
    std::string source_;
};

Measurement readMeasurement(const Reader& r, const json& j, const std::string& path) {
    r.object(j, path);
    Measurement m;
    m.id = r.text(j, path, "id", true);
    if (m.id.empty()) r.fail(Reader::key(path, "id"), "must not be empty");
    const std::string kind = r.text(j, path, "kind", true);
    auto k = kindFromName(kind);
    if (!k) r.fail(Reader::key(path, "kind"),
                   "unknown measurement kind \"" + kind + "\" (caliper, depth marker, extent box, ellipse)");
    m.kind = *k;
    m.label = r.text(j, path, "label");
    m.frame_index = r.count(j, path, "frame");
    const std::string pk = Reader::key(path, "points_mm");
    const json* pts = r.array(j, path, "points_mm", true);
    if (pts->size() != pointCount(m.kind))
        r.fail(pk, "a " + kind + " has " + std::to_string(pointCount(m.kind)) + " points, found " +
                       std::to_string(pts->size()));
    for (size_t i = 0; i < pts->size(); ++i) {
        const json& p = (*pts)[i];
        const std::string pi = Reader::index(pk, i);
        if (!p.is_array() || p.size() != 2) r.fail(pi, "must be [x_mm, z_mm]");
        m.points.push_back({r.numberValue(p[0], pi + "[0]"), r.numberValue(p[1], pi + "[1]")});
    }
    return m;
}

Finding readFinding(const Reader& r, const json& j, const std::string& path) {
    r.object(j, path);
    Finding f;
    f.id = r.text(j, path, "id", true);
    if (f.id.empty()) r.fail(Reader::key(path, "id"), "must not be empty");
    const json& num = r.required(j, path, "number");
    if (!num.is_number_integer()) r.fail(Reader::key(path, "number"), "must be a whole number");
    f.number = num.get<int>();

    const std::string ip = Reader::key(path, "indication");
    const json& ind = r.object(r.required(j, path, "indication"), ip);
    Indication& in = f.indication;
    in.location = r.text(ind, ip, "location");
    in.capture_index = r.count(ind, ip, "capture");
    in.frame_index = r.count(ind, ip, "frame");
    in.x_mm = r.optionalNumber(ind, ip, "x_mm");
    in.depth_mm = r.optionalNumber(ind, ip, "depth_mm");
    in.length_mm = r.optionalNumber(ind, ip, "length_mm");
    in.height_mm = r.optionalNumber(ind, ip, "height_mm");
    in.peak_db = r.optionalNumber(ind, ip, "peak_db");
    in.reference = r.text(ind, ip, "reference");
    in.measurement_ids = r.texts(ind, ip, "measurements");
    in.description = r.text(ind, ip, "description");

    if (j.contains("interpretation")) {
        const std::string p = Reader::key(path, "interpretation");
        const json& o = r.object(j["interpretation"], p);
        const std::string name = r.text(o, p, "class");
        if (!name.empty()) {
            auto v = interpretationFromName(name);
            if (!v) r.fail(Reader::key(p, "class"), "unknown interpretation \"" + name +
                                                         "\" (unset, false, non-relevant, relevant)");
            f.interpretation = *v;
        }
        f.interpretation_reason = r.text(o, p, "reason");
    }
    if (j.contains("evaluation")) {
        const std::string p = Reader::key(path, "evaluation");
        const json& o = r.object(j["evaluation"], p);
        const std::string name = r.text(o, p, "outcome");
        if (!name.empty()) {
            auto v = evaluationFromName(name);
            if (!v) r.fail(Reader::key(p, "outcome"), "unknown evaluation \"" + name +
                                                           "\" (unset, acceptable, rejectable, refer-for-review)");
            f.evaluation = *v;
        }
        f.criterion = r.text(o, p, "criterion");
    }
    return f;
}

std::string readRecipe(const Reader& r, const json& obj, const std::string& path) {
    if (!obj.contains("recipe") || obj["recipe"].is_null()) return {};
    if (!obj["recipe"].is_object()) r.fail(Reader::key(path, "recipe"), "must be a JSON object or null");
    return obj["recipe"].dump(2);
}

std::string readSha(const Reader& r, const json& obj, const std::string& path, const std::string& k) {
    const std::string h = r.text(obj, path, k);
    if (!h.empty() && (h.size() != 64 || h.find_first_not_of("0123456789abcdef") != std::string::npos))
        r.fail(Reader::key(path, k), "must be 64 lowercase hexadecimal digits (or empty)");
    return h;
}

double readAmplitude(const Reader& r, const json& obj, const std::string& path) {
    const double a = r.numberValue(r.required(obj, path, "amplitude"), Reader::key(path, "amplitude"));
    if (!(a > 0)) r.fail(Reader::key(path, "amplitude"), "must be positive");
    return a;
}

DistanceAmplitudeCurve readCurve(const Reader& r, const json& j, const std::string& path) {
    r.object(j, path);
    DistanceAmplitudeCurve c;
    c.label = r.text(j, path, "label");
    const std::string basis = r.text(j, path, "amplitude_basis");
    if (!basis.empty()) {
        auto b = basisFromName(basis);
        if (!b) r.fail(Reader::key(path, "amplitude_basis"), "unknown amplitude basis \"" + basis + "\" (before TCG, after TCG)");
        c.basis = *b;
    }
    c.recipe_json = readRecipe(r, j, path);
    c.recipe_fingerprint = r.text(j, path, "recipe_fingerprint");
    const std::string pp = Reader::key(path, "points");
    const json* pts = r.array(j, path, "points", true);
    for (size_t i = 0; i < pts->size(); ++i) {
        const std::string p = Reader::index(pp, i);
        const json& pj = r.object((*pts)[i], p);
        DacPoint d;
        d.depth_m = r.numberValue(r.required(pj, p, "depth_m"), Reader::key(p, "depth_m"));
        d.x_m = r.number(pj, p, "x_m", 0.0);
        d.amplitude = readAmplitude(r, pj, p);
        d.label = r.text(pj, p, "label");
        d.capture_sha256 = readSha(r, pj, p, "capture_sha256");
        d.frame = r.count(pj, p, "frame");
        c = withPoint(std::move(c), d);  // kept in depth order whatever the file's order
    }
    return c;
}

// The single amplitude reference of earlier files: a one-point curve whose amplitude was read
// after the TCG of its recipe.
DistanceAmplitudeCurve readLegacyReference(const Reader& r, const json& j, const std::string& path) {
    r.object(j, path);
    DistanceAmplitudeCurve c;
    c.label = r.text(j, path, "label");
    c.basis = AmplitudeBasis::AfterTcg;
    c.recipe_json = readRecipe(r, j, path);
    DacPoint d;
    d.amplitude = readAmplitude(r, j, path);
    d.label = c.label;
    d.capture_sha256 = readSha(r, j, path, "capture_sha256");
    d.frame = r.count(j, path, "frame");
    d.x_m = r.number(j, path, "x_mm", 0.0) * 1e-3;
    d.depth_m = r.number(j, path, "z_mm", 0.0) * 1e-3;
    c.points.push_back(d);
    return c;
}

WeldGeometry readWeld(const Reader& r, const json& j, const std::string& path) {
    r.object(j, path);
    WeldGeometry w;
    const std::string shape = r.text(j, path, "shape", true);
    const auto s = weldShapeFromName(shape);
    if (!s) r.fail(Reader::key(path, "shape"), "unknown weld shape \"" + shape + "\" (V, X, U, J)");
    w.shape = *s;
    w.thickness_mm = r.numberValue(r.required(j, path, "thickness_mm"), Reader::key(path, "thickness_mm"));
    w.centre_x_mm = r.number(j, path, "centre_x_mm", w.centre_x_mm);
    w.bevel_angle_deg = r.number(j, path, "bevel_angle_deg", w.bevel_angle_deg);
    w.root_gap_mm = r.number(j, path, "root_gap_mm", w.root_gap_mm);
    w.root_face_mm = r.number(j, path, "root_face_mm", w.root_face_mm);
    w.groove_radius_mm = r.number(j, path, "groove_radius_mm", w.groove_radius_mm);
    w.cap_width_mm = r.number(j, path, "cap_width_mm", w.cap_width_mm);
    w.cap_height_mm = r.number(j, path, "cap_height_mm", w.cap_height_mm);
    w.root_width_mm = r.number(j, path, "root_width_mm", w.root_width_mm);
    w.root_height_mm = r.number(j, path, "root_height_mm", w.root_height_mm);
    try {
        checkWeld(w);
    } catch (const SettingError& e) {
        // "weld.bevel_angle_deg: must be ..." -> key and problem apart
        const std::string what = e.what();
        const auto colon = what.find(": ");
        r.fail(colon == std::string::npos ? path : what.substr(0, colon),
               colon == std::string::npos ? what : what.substr(colon + 2));
    }
    return w;
}

// A capture's path as held in memory: made absolute against the case's folder and written in
// one normal form ("a/./b/" and "a/b" are the same file), so that a case saved and loaded again
// holds the same paths.
std::string resolvedPath(const std::string& stored, const std::string& base_dir) {
    if (stored.empty()) return stored;
    fs::path p(stored);
    if (!p.is_absolute() && !base_dir.empty()) p = fs::path(base_dir) / p;
    p = p.lexically_normal();
    if (!p.has_filename() && p.has_relative_path()) p = p.parent_path();  // "/a/b/" -> "/a/b"
    return p.string();
}

std::string folderOf(const std::string& path) {
    std::error_code ec;
    fs::path abs = fs::absolute(fs::path(path), ec);
    if (ec) abs = fs::path(path);
    return abs.parent_path().string();
}


}  // namespace

std::string caseToJson(const CaseDocument& doc, const std::string& base_dir, bool absolute_fallback) {
    json j = json::object();
    j["format"] = kFormatTag;
    j["version"] = kCaseVersion;
    j["title"] = doc.title;
    if (!doc.header.empty())
        j["report_header"] = json{{"part", doc.header.part},         {"site", doc.header.site},
                                  {"date", doc.header.date},         {"examiner", doc.header.examiner},
                                  {"reviewer", doc.header.reviewer}, {"procedure", doc.header.procedure},
                                  {"criteria", doc.header.criteria}};
    j["background"] = doc.background;
    j["technique"] = doc.technique;
    j["pertinent_negatives"] = doc.pertinent_negatives;
    j["prior_comparison"] = doc.prior_comparison;
    j["active_capture"] = doc.active_capture;
    json caps = json::array();
    for (size_t i = 0; i < doc.captures.size(); ++i) {
        const CaseCapture& c = doc.captures[i];
        json cj = json::object();
        cj["path"] = storedPath(c.path, base_dir);
        if (!base_dir.empty() && absolute_fallback) cj["path_absolute"] = absolutePath(c.path);
        cj["sha256"] = c.sha256;
        if (c.recipe_json.empty()) {
            cj["recipe"] = nullptr;
        } else {
            try {
                cj["recipe"] = json::parse(c.recipe_json);
            } catch (const json::exception& e) {
                throw SettingError("capture " + std::to_string(i) + " (" + c.path +
                                   "): its recipe is not valid JSON: " + e.what());
            }
        }
        cj["view"] = json{{"frame", c.view.frame},
                          {"zoom", c.view.zoom},
                          {"centre_x_mm", c.view.centre_x_mm},
                          {"centre_z_mm", c.view.centre_z_mm},
                          {"tool", c.view.tool}};
        if (!c.view.views.empty()) cj["view"]["views"] = c.view.views;
        json ms = json::array();
        for (const auto& m : c.measurements) ms.push_back(measurementJson(m));
        cj["measurements"] = ms;
        if (!c.speed_calibration.empty() || !c.element_health.empty())
            cj["calibration"] = json{{"speed", c.speed_calibration}, {"elements", c.element_health}};
        caps.push_back(cj);
    }
    j["captures"] = caps;
    json fs_ = json::array();
    for (const auto& f : doc.findings) fs_.push_back(findingJson(f));
    j["findings"] = fs_;
    if (const auto& c = doc.curve) {
        json cj = json::object();
        cj["label"] = c->label;
        cj["amplitude_basis"] = basisName(c->basis);
        try {
            cj["recipe"] = c->recipe_json.empty() ? json(nullptr) : json::parse(c->recipe_json);
        } catch (const json::exception& e) {
            throw SettingError(std::string("distance–amplitude curve: its recipe is not valid JSON: ") + e.what());
        }
        cj["recipe_fingerprint"] = c->recipe_fingerprint;
        json pts = json::array();
        for (const auto& p : c->points)
            pts.push_back(json{{"depth_m", p.depth_m},
                               {"x_m", p.x_m},
                               {"amplitude", p.amplitude},
                               {"label", p.label},
                               {"capture_sha256", p.capture_sha256},
                               {"frame", p.frame}});
        cj["points"] = pts;
        j["distance_amplitude_curve"] = cj;
    }
    if (!doc.sizing_medium.empty() || doc.speed_uncertainty_rel) {
        json sj = json::object();
        if (!doc.sizing_medium.empty()) sj["medium"] = doc.sizing_medium;
        if (doc.speed_uncertainty_rel) sj["speed_uncertainty_rel"] = *doc.speed_uncertainty_rel;
        j["sizing"] = sj;
    }
    if (const auto& w = doc.weld) {
        j["weld"] = json{{"shape", weldShapeName(w->shape)},
                         {"thickness_mm", w->thickness_mm},
                         {"centre_x_mm", w->centre_x_mm},
                         {"bevel_angle_deg", w->bevel_angle_deg},
                         {"root_gap_mm", w->root_gap_mm},
                         {"root_face_mm", w->root_face_mm},
                         {"groove_radius_mm", w->groove_radius_mm},
                         {"cap_width_mm", w->cap_width_mm},
                         {"cap_height_mm", w->cap_height_mm},
                         {"root_width_mm", w->root_width_mm},
                         {"root_height_mm", w->root_height_mm}};
    }
    // Invalid UTF-8 in a user text is replaced (U+FFFD) rather than failing the save.
    return j.dump(2, ' ', false, json::error_handler_t::replace) + "\n";
}

CaseDocument caseFromJson(const std::string& text, const std::string& source, const std::string& base_dir) {
    Reader r(source);
    JsonLimits limits;
    limits.max_memory_bytes = kCaseMemoryBudget;
    checkJsonText(text, source, limits);  // plain-words syntax errors, bounded depth, size and memory, out-of-range numbers named
    json j;
    try {
        j = json::parse(text);
    } catch (const json::parse_error& e) {
        r.fail("", "not valid JSON at " + plainParseMessage(e.what()));
    }
    r.object(j, "");
    const std::string format = r.text(j, "", "format", true);
    if (format != kFormatTag) r.fail("format", "is \"" + format + "\", expected \"" + kFormatTag + "\"");
    const json& v = r.required(j, "", "version");
    if (!v.is_number_integer()) r.fail("version", "must be a whole number");
    const long long version = v.get<long long>();
    if (version != kCaseVersion)
        r.fail("version", "unknown case version " + std::to_string(version) + " (this program reads version " +
                              std::to_string(kCaseVersion) + ")");

    CaseDocument doc;
    doc.version = kCaseVersion;
    doc.title = r.text(j, "", "title");
    if (j.contains("report_header") && !j["report_header"].is_null()) {
        const json& hj = r.object(j["report_header"], "report_header");
        doc.header.part = r.text(hj, "report_header", "part");
        doc.header.site = r.text(hj, "report_header", "site");
        doc.header.date = r.text(hj, "report_header", "date");
        doc.header.examiner = r.text(hj, "report_header", "examiner");
        doc.header.reviewer = r.text(hj, "report_header", "reviewer");
        doc.header.procedure = r.text(hj, "report_header", "procedure");
        doc.header.criteria = r.text(hj, "report_header", "criteria");
    }
    doc.background = r.text(j, "", "background");
    doc.technique = r.text(j, "", "technique");
    doc.pertinent_negatives = r.texts(j, "", "pertinent_negatives");
    doc.prior_comparison = r.text(j, "", "prior_comparison");
    doc.active_capture = r.count(j, "", "active_capture");

    if (const json* caps = r.array(j, "", "captures")) {
        for (size_t i = 0; i < caps->size(); ++i) {
            const std::string p = Reader::index("captures", i);
            const json& cj = r.object((*caps)[i], p);
            CaseCapture c;
            c.path = resolvedPath(r.text(cj, p, "path", true), base_dir);
            if (c.path.empty()) r.fail(Reader::key(p, "path"), "must not be empty");
            // The case file moved without its captures: fall back to where they were at save time.
            const std::string was = r.text(cj, p, "path_absolute");
            std::error_code ec;
            if (!was.empty() && !fs::exists(c.path, ec) && fs::exists(was, ec)) c.path = was;
            c.sha256 = r.text(cj, p, "sha256", true);
            if (c.sha256.size() != 64 || c.sha256.find_first_not_of("0123456789abcdef") != std::string::npos)
                r.fail(Reader::key(p, "sha256"), "must be 64 lowercase hexadecimal digits");
            if (cj.contains("recipe") && !cj["recipe"].is_null()) {
                if (!cj["recipe"].is_object()) r.fail(Reader::key(p, "recipe"), "must be a JSON object or null");
                c.recipe_json = cj["recipe"].dump(2);
            }
            if (cj.contains("view")) {
                const std::string vp = Reader::key(p, "view");
                const json& vj = r.object(cj["view"], vp);
                c.view.frame = r.count(vj, vp, "frame");
                c.view.zoom = r.number(vj, vp, "zoom", 1.0);
                if (!(c.view.zoom > 0)) r.fail(Reader::key(vp, "zoom"), "must be positive");
                c.view.centre_x_mm = r.number(vj, vp, "centre_x_mm", 0.0);
                c.view.centre_z_mm = r.number(vj, vp, "centre_z_mm", 0.0);
                c.view.tool = r.text(vj, vp, "tool");
                c.view.views = r.texts(vj, vp, "views");
                if (c.view.views.size() > 64) r.fail(Reader::key(vp, "views"), "holds more than 64 views");
                for (size_t k = 0; k < c.view.views.size(); ++k) {
                    const std::string& v = c.view.views[k];
                    if (v.empty() || v.size() > 16 || v.find_first_not_of("LT-") != std::string::npos)
                        r.fail(Reader::index(Reader::key(vp, "views"), k), "must be a view name such as \"TT-T\" (letters L and T, one dash)");
                }
            }
            if (const json* ms = r.array(cj, p, "measurements"))
                for (size_t k = 0; k < ms->size(); ++k)
                    c.measurements.push_back(readMeasurement(r, (*ms)[k], Reader::index(Reader::key(p, "measurements"), k)));
            if (cj.contains("calibration") && !cj["calibration"].is_null()) {
                const std::string kp = Reader::key(p, "calibration");
                const json& kj = r.object(cj["calibration"], kp);
                c.speed_calibration = r.texts(kj, kp, "speed");
                c.element_health = r.texts(kj, kp, "elements");
            }
            doc.captures.push_back(std::move(c));
        }
    }
    if (!doc.captures.empty() && doc.active_capture >= doc.captures.size())
        r.fail("active_capture", "is " + std::to_string(doc.active_capture) + " but there are only " +
                                     std::to_string(doc.captures.size()) + " captures");
    if (doc.captures.empty() && doc.active_capture != 0) r.fail("active_capture", "must be 0 when there are no captures");

    if (const json* fj = r.array(j, "", "findings"))
        for (size_t i = 0; i < fj->size(); ++i)
            doc.findings.push_back(readFinding(r, (*fj)[i], Reader::index("findings", i)));
    if (j.contains("distance_amplitude_curve") && !j["distance_amplitude_curve"].is_null()) {
        doc.curve = readCurve(r, j["distance_amplitude_curve"], "distance_amplitude_curve");
        if (doc.curve->points.empty()) doc.curve.reset();  // no points: no reference, as if absent
    } else if (j.contains("amplitude_reference") && !j["amplitude_reference"].is_null()) {
        doc.curve = readLegacyReference(r, j["amplitude_reference"], "amplitude_reference");
    }
    if (j.contains("sizing") && !j["sizing"].is_null()) {
        const std::string p = "sizing";
        const json& sj = r.object(j[p], p);
        if (sj.contains("medium")) {
            doc.sizing_medium = r.text(sj, p, "medium");
            if (doc.sizing_medium != "steel" && doc.sizing_medium != "water" && doc.sizing_medium != "soft tissue" &&
                doc.sizing_medium != "other")
                r.fail(Reader::key(p, "medium"), "must be steel, water, soft tissue or other");
        }
        if (sj.contains("speed_uncertainty_rel")) {
            const double v = r.numberValue(sj["speed_uncertainty_rel"], Reader::key(p, "speed_uncertainty_rel"));
            if (!(v >= 0 && v <= 0.5)) r.fail(Reader::key(p, "speed_uncertainty_rel"), "must be in [0, 0.5]");
            doc.speed_uncertainty_rel = v;
        }
    }
    if (j.contains("weld") && !j["weld"].is_null()) doc.weld = readWeld(r, j["weld"], "weld");
    return doc;
}

void saveCase(const std::string& path, const CaseDocument& doc, bool absolute_fallback) {
    const std::string folder = folderOf(path);
    const std::string text = caseToJson(doc, folder, absolute_fallback);
    writeFileAtomic(path, text, ".saving");
}

CaseDocument loadCase(const std::string& path) {
    std::error_code ec;
    if (!fs::exists(path, ec)) throw InputError(path, "", "does not exist");
    if (fs::is_directory(path, ec)) throw InputError(path, "", "is a folder, not a case file");
    const auto size = fs::file_size(path, ec);
    if (ec) throw InputError(path, "", "cannot be read: " + ec.message());
    if (size > kMaxCaseBytes)
        throw InputError(path, "", "is " + std::to_string(size) + " bytes; a case file is at most " +
                                       std::to_string(kMaxCaseBytes) + " bytes");
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path, "", "cannot be read");
    std::ostringstream ss;
    ss << in.rdbuf();
    return caseFromJson(ss.str(), path, folderOf(path));
}

std::string autosavePath(const std::string& case_path) {
    const std::string ext = ".umbracase";
    const bool has_ext = case_path.size() >= ext.size() &&
                         case_path.compare(case_path.size() - ext.size(), ext.size(), ext) == 0;
    return case_path + (has_ext ? "" : ext) + ".autosave";
}

CaptureStatus checkCapture(const CaseCapture& capture) {
    std::error_code ec;
    if (capture.path.empty() || !fs::is_regular_file(capture.path, ec)) return CaptureStatus::Missing;
    std::string hash;
    try {
        hash = fileSha256(capture.path);
    } catch (const InputError&) {
        return CaptureStatus::Missing;
    }
    return hash == capture.sha256 ? CaptureStatus::Ok : CaptureStatus::Changed;
}

bool relocateCapture(CaseCapture& capture, const std::string& new_path, bool accept_changed) {
    std::error_code ec;
    if (!fs::is_regular_file(new_path, ec)) throw InputError(new_path, "", "is not a readable file");
    const std::string hash = fileSha256(new_path);
    const bool match = hash == capture.sha256;
    if (match) {
        capture.path = new_path;
    } else if (accept_changed) {
        capture.path = new_path;
        capture.sha256 = hash;
    }
    return match;
}

}  // namespace umbra::core
