// SPDX-License-Identifier: MIT
#include "core/practice.h"

#include <algorithm>
#include <cmath>
#include <ctime>
#include <filesystem>
#include <fstream>
#include <map>
#include <numbers>
#include <sstream>

#include <nlohmann/json.hpp>

#include "core/atomic_file.h"
#include "core/error.h"
#include "core/json_guard.h"

namespace umbra::core {
namespace fs = std::filesystem;
using nlohmann::json;

struct PracticeAccess {
    static const std::vector<PracticeStructure>& structures(const PracticeSet& s) { return s.structures_; }
    static std::vector<PracticeStructure>& structures(PracticeSet& s) { return s.structures_; }
    static void set(PracticeSet& s, std::string scenario, std::string note) {
        s.scenario_ = std::move(scenario);
        s.note_ = std::move(note);
    }
};

namespace {

constexpr uintmax_t kMaxAnswerBytes = 1u << 20;
constexpr uintmax_t kMaxLogBytes = 64u << 20;
constexpr const char* kLogFormat = "umbra-practice-log";

double wrap180(double deg) {
    double d = std::fmod(deg, 180.0);
    if (d < 0) d += 180.0;
    return d;
}

/// Smallest angle between two undirected lines, degrees (0..90).
double lineAngle(double a, double b) {
    const double d = std::abs(wrap180(a) - wrap180(b));
    return std::min(d, 180.0 - d);
}

std::string readSmallFile(const std::string& path, uintmax_t limit, const std::string& what) {
    std::error_code ec;
    if (!fs::is_regular_file(path, ec)) throw InputError(path, "", "does not exist or is not a file");
    const auto size = fs::file_size(path, ec);
    if (ec) throw InputError(path, "", "cannot be read: " + ec.message());
    if (size > limit)
        throw InputError(path, "", "is " + std::to_string(size) + " bytes; " + what + " is at most " + std::to_string(limit) + " bytes");
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path, "", "cannot be read");
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

json parseChecked(const std::string& text, const std::string& source) {
    checkJsonText(text, source);
    try {
        return json::parse(text);
    } catch (const json::exception& e) {
        throw InputError(source, "", "not valid JSON: " + plainParseMessage(e.what()));
    }
}

double positiveMm(const json& o, const std::string& key, const std::string& where, const std::string& source) {
    const json& v = o.at(key);
    if (!v.is_number() || !std::isfinite(v.get<double>()) || v.get<double>() <= 0)
        throw InputError(source, where + "." + key, "must be a number > 0 (mm)");
    return v.get<double>();
}

double numberOr(const json& o, const std::string& key, double fallback, const std::string& where, const std::string& source) {
    if (!o.contains(key)) return fallback;
    const json& v = o.at(key);
    if (!v.is_number() || !std::isfinite(v.get<double>())) throw InputError(source, where + "." + key, "must be a number");
    return v.get<double>();
}

std::string textOr(const json& o, const std::string& key, const std::string& where, const std::string& source, bool required = false) {
    if (!o.contains(key)) {
        if (required) throw InputError(source, where + "." + key, "is missing");
        return "";
    }
    if (!o.at(key).is_string()) throw InputError(source, where + "." + key, "must be a string");
    return o.at(key).get<std::string>();
}

}  // namespace

PracticeSet PracticeSet::fromJson(const std::string& text, const std::string& source) {
    const json j = parseChecked(text, source);
    if (!j.is_object()) throw InputError(source, "", "an answer file is a JSON object");
    PracticeSet set;
    PracticeAccess::set(set, textOr(j, "scenario", "", source), textOr(j, "note", "", source));
    if (!j.contains("structures") || !j.at("structures").is_array() || j.at("structures").empty())
        throw InputError(source, "structures", "must be a non-empty array");
    auto& out = PracticeAccess::structures(set);
    const json& arr = j.at("structures");
    for (size_t i = 0; i < arr.size(); ++i) {
        const std::string where = "structures[" + std::to_string(i) + "]";
        const json& s = arr[i];
        if (!s.is_object()) throw InputError(source, where, "must be an object");
        PracticeStructure st;
        st.label = textOr(s, "label", where, source, true);
        if (st.label.empty()) throw InputError(source, where + ".label", "must not be empty");
        for (const auto& o : out)
            if (o.label == st.label) throw InputError(source, where + ".label", "\"" + st.label + "\" is used twice");
        st.kind = textOr(s, "kind", where, source);
        const double angle = numberOr(s, "angle_deg", 0.0, where, source);
        if (s.contains("diameter_mm")) {
            PracticeTarget t{"diameter", positiveMm(s, "diameter_mm", where, source), std::nullopt, false};
            if (s.contains("axis_angle_from_x_deg"))
                t.direction_deg = wrap180(numberOr(s, "axis_angle_from_x_deg", 0, where, source) + 90.0);
            st.targets.push_back(t);
        }
        if (s.contains("axial_extent_across_mm"))
            st.targets.push_back({"axial extent", positiveMm(s, "axial_extent_across_mm", where, source), 90.0, false});
        if (s.contains("lateral_extent_across_mm"))
            st.targets.push_back({"lateral extent", positiveMm(s, "lateral_extent_across_mm", where, source), 0.0, false});
        if (s.contains("width_mm")) st.targets.push_back({"width", positiveMm(s, "width_mm", where, source), wrap180(angle), false});
        if (s.contains("height_mm"))
            st.targets.push_back({"height", positiveMm(s, "height_mm", where, source), wrap180(angle + 90.0), false});
        if (s.contains("length_mm")) st.targets.push_back({"length", positiveMm(s, "length_mm", where, source), wrap180(angle), false});
        if (s.contains("depth_mm")) st.targets.push_back({"depth", positiveMm(s, "depth_mm", where, source), std::nullopt, true});
        if (st.targets.empty())
            throw InputError(source, where, "has nothing to measure (diameter_mm, width_mm, height_mm, length_mm or depth_mm)");
        out.push_back(std::move(st));
    }
    return set;
}

PracticeSet PracticeSet::load(const std::string& path) {
    return fromJson(readSmallFile(path, kMaxAnswerBytes, "an answer file"), path);
}

std::string PracticeSet::answersPathFor(const std::string& capture_path) {
    fs::path p(capture_path);
    fs::path a = p.parent_path() / (p.stem().string() + ".answers.json");
    std::error_code ec;
    return fs::is_regular_file(a, ec) ? a.string() : std::string();
}

std::vector<std::string> PracticeSet::structureLabels() const {
    std::vector<std::string> v;
    for (const auto& s : structures_) v.push_back(s.label);
    return v;
}

std::vector<std::string> PracticeSet::tasks() const {
    std::vector<std::string> v;
    for (const auto& s : structures_) {
        std::string t = s.label + ": ";
        for (size_t i = 0; i < s.targets.size(); ++i) t += (i ? ", " : "") + s.targets[i].name;
        v.push_back(t);
    }
    return v;
}

std::vector<PracticeReading> practiceReadings(const Measurement& m, const UncertaintyModel& u) {
    return practiceReadings(m, evaluate(m, u));
}

std::vector<PracticeReading> practiceReadings(const Measurement& m, const std::vector<Quantity>& q) {
    std::vector<PracticeReading> out;
    if (m.points.size() != pointCount(m.kind)) return out;
    auto find = [&](const std::string& name) -> const Quantity* {
        for (const auto& x : q)
            if (x.name == name) return &x;
        return nullptr;
    };
    auto add = [&](const Quantity* x, const std::string& name, double dir, bool depth) {
        if (!x) return;
        out.push_back({m.label, m.id, name, x->value, kCoverageFactor * x->uncertainty, wrap180(dir), depth});
    };
    auto dirOf = [](PointMm a, PointMm b) { return std::atan2(b.z_mm - a.z_mm, b.x_mm - a.x_mm) * 180.0 / std::numbers::pi; };
    switch (m.kind) {
        case MeasurementKind::Caliper: add(find("distance"), "distance", dirOf(m.points[0], m.points[1]), false); break;
        case MeasurementKind::DepthMarker: add(find("depth"), "depth", 0, true); break;
        case MeasurementKind::Ellipse:
            add(find("axis 1"), "axis 1", dirOf(m.points[0], m.points[1]), false);
            add(find("axis 2"), "axis 2", dirOf(m.points[0], m.points[2]), false);
            break;
        default:  // extent box and the image-sizing boxes
            add(find("length"), "length", 0, false);
            add(find("height"), "height", 90, false);
            break;
    }
    return out;
}

PracticeAttempt scoreAttempt(const PracticeSet& set, const std::vector<PracticeReading>& readings,
                             const std::string& capture_sha256, const std::string& submitted_utc) {
    PracticeAttempt a;
    a.scenario = set.scenario();
    a.capture_sha256 = capture_sha256;
    a.submitted_utc = submitted_utc;
    const auto& structures = PracticeAccess::structures(set);
    std::map<std::string, bool> measured;
    for (const PracticeReading& r : readings) {
        auto it = std::find_if(structures.begin(), structures.end(), [&](const PracticeStructure& s) { return s.label == r.structure; });
        if (it == structures.end()) {
            if (std::find(a.unknown_labels.begin(), a.unknown_labels.end(), r.structure) == a.unknown_labels.end())
                a.unknown_labels.push_back(r.structure);
            continue;
        }
        const PracticeTarget* best = nullptr;
        double best_angle = 1e9;
        for (const auto& t : it->targets) {
            if (t.depth != r.depth) continue;
            const double ang = (t.depth || !t.direction_deg) ? 0.0 : lineAngle(*t.direction_deg, r.direction_deg);
            if (ang < best_angle) {
                best_angle = ang;
                best = &t;
            }
        }
        if (!best) continue;  // e.g. a depth marker on a structure with no depth target
        measured[it->label] = true;
        PracticeResult res;
        res.structure = it->label;
        res.target = best->name;
        res.measurement_id = r.measurement_id;
        res.quantity = r.quantity;
        res.measured_mm = r.value_mm;
        res.expanded_mm = r.expanded_mm;
        res.true_mm = best->value_mm;
        res.error_mm = r.value_mm - best->value_mm;
        if (r.expanded_mm > 0) res.error_in_u = res.error_mm / r.expanded_mm;
        a.results.push_back(res);
    }
    for (const auto& s : structures)
        if (!measured.count(s.label)) a.unmeasured.push_back(s.label);
    return a;
}

std::string practiceLogFileName(const std::string& trainee) {
    const bool blank = std::all_of(trainee.begin(), trainee.end(), [](unsigned char c) { return std::isspace(c); });
    if (trainee.empty() || blank) throw SettingError("practice log: the trainee's name is empty");
    if (trainee.size() > 100) throw SettingError("practice log: the trainee's name is longer than 100 bytes");
    static const char* hex = "0123456789ABCDEF";
    std::string out;
    for (unsigned char c : trainee) {
        if (std::isalnum(c) || c == '-') {
            out += static_cast<char>(c);
        } else {
            out += '_';
            out += hex[c >> 4];
            out += hex[c & 15];
        }
    }
    return out + ".practice.json";
}

namespace {

json resultJson(const PracticeResult& r) {
    return {{"structure", r.structure},
            {"target", r.target},
            {"measurement", r.measurement_id},
            {"quantity", r.quantity},
            {"measured_mm", r.measured_mm},
            {"expanded_uncertainty_mm", r.expanded_mm},
            {"true_mm", r.true_mm},
            {"error_mm", r.error_mm},
            {"error_in_u", r.error_in_u ? json(*r.error_in_u) : json(nullptr)}};
}

double need(const json& o, const std::string& k, const std::string& where, const std::string& source) {
    if (!o.contains(k) || !o.at(k).is_number() || !std::isfinite(o.at(k).get<double>()))
        throw InputError(source, where + "." + k, "must be a number");
    return o.at(k).get<double>();
}

std::vector<std::string> stringList(const json& o, const std::string& k, const std::string& where, const std::string& source) {
    std::vector<std::string> v;
    if (!o.contains(k)) return v;
    if (!o.at(k).is_array()) throw InputError(source, where + "." + k, "must be an array of strings");
    for (const auto& s : o.at(k)) {
        if (!s.is_string()) throw InputError(source, where + "." + k, "must be an array of strings");
        v.push_back(s.get<std::string>());
    }
    return v;
}

}  // namespace

std::string practiceLogToJson(const PracticeLog& log) {
    json j = {{"format", kLogFormat}, {"version", 1}, {"trainee", log.trainee}};
    json attempts = json::array();
    for (const auto& a : log.attempts) {
        json results = json::array();
        for (const auto& r : a.results) results.push_back(resultJson(r));
        attempts.push_back({{"practice_set", a.scenario},
                            {"capture_sha256", a.capture_sha256},
                            {"submitted_utc", a.submitted_utc},
                            {"results", results},
                            {"unmeasured", a.unmeasured},
                            {"unknown_labels", a.unknown_labels}});
    }
    j["attempts"] = attempts;
    return j.dump(2, ' ', false, json::error_handler_t::replace) + "\n";
}

PracticeLog practiceLogFromJson(const std::string& text, const std::string& source) {
    const json j = parseChecked(text, source);
    if (!j.is_object()) throw InputError(source, "", "a practice log is a JSON object");
    if (textOr(j, "format", "", source, true) != kLogFormat) throw InputError(source, "format", std::string("must be \"") + kLogFormat + "\"");
    if (!j.contains("version") || j.at("version") != 1) throw InputError(source, "version", "unknown practice log version (this program reads version 1)");
    PracticeLog log;
    log.trainee = textOr(j, "trainee", "", source, true);
    if (!j.contains("attempts") || !j.at("attempts").is_array()) throw InputError(source, "attempts", "must be an array");
    const json& arr = j.at("attempts");
    for (size_t i = 0; i < arr.size(); ++i) {
        const std::string where = "attempts[" + std::to_string(i) + "]";
        const json& o = arr[i];
        if (!o.is_object()) throw InputError(source, where, "must be an object");
        PracticeAttempt a;
        a.scenario = textOr(o, "practice_set", where, source);
        a.capture_sha256 = textOr(o, "capture_sha256", where, source);
        a.submitted_utc = textOr(o, "submitted_utc", where, source);
        a.unmeasured = stringList(o, "unmeasured", where, source);
        a.unknown_labels = stringList(o, "unknown_labels", where, source);
        if (!o.contains("results") || !o.at("results").is_array()) throw InputError(source, where + ".results", "must be an array");
        const json& rs = o.at("results");
        for (size_t k = 0; k < rs.size(); ++k) {
            const std::string w = where + ".results[" + std::to_string(k) + "]";
            const json& r = rs[k];
            if (!r.is_object()) throw InputError(source, w, "must be an object");
            PracticeResult res;
            res.structure = textOr(r, "structure", w, source, true);
            res.target = textOr(r, "target", w, source, true);
            res.measurement_id = textOr(r, "measurement", w, source);
            res.quantity = textOr(r, "quantity", w, source);
            res.measured_mm = need(r, "measured_mm", w, source);
            res.expanded_mm = need(r, "expanded_uncertainty_mm", w, source);
            res.true_mm = need(r, "true_mm", w, source);
            res.error_mm = need(r, "error_mm", w, source);
            if (r.contains("error_in_u") && !r.at("error_in_u").is_null()) res.error_in_u = need(r, "error_in_u", w, source);
            a.results.push_back(res);
        }
        log.attempts.push_back(std::move(a));
    }
    return log;
}

PracticeLog loadPracticeLog(const std::string& folder, const std::string& trainee) {
    const std::string path = (fs::path(folder) / practiceLogFileName(trainee)).string();
    std::error_code ec;
    if (!fs::exists(path, ec)) return PracticeLog{trainee, {}};
    PracticeLog log = practiceLogFromJson(readSmallFile(path, kMaxLogBytes, "a practice log"), path);
    if (log.trainee != trainee) throw InputError(path, "trainee", "belongs to \"" + log.trainee + "\", not to the name given");
    return log;
}

PracticeLog appendAttempt(const std::string& folder, const std::string& trainee, const PracticeAttempt& attempt) {
    PracticeLog log = loadPracticeLog(folder, trainee);
    log.attempts.push_back(attempt);
    std::error_code ec;
    fs::create_directories(folder, ec);
    if (ec) throw InputError(folder, "", "practice folder cannot be made: " + ec.message());
    writeFileAtomic((fs::path(folder) / practiceLogFileName(trainee)).string(), practiceLogToJson(log));
    return log;
}

PracticeProgress practiceProgress(const PracticeLog& log) {
    PracticeProgress p;
    p.attempts = log.attempts.size();
    std::vector<double> measured, truth;
    std::map<std::string, size_t> index;
    for (size_t i = 0; i < log.attempts.size(); ++i)
        for (const auto& r : log.attempts[i].results) {
            measured.push_back(r.measured_mm);
            truth.push_back(r.true_mm);
            const std::string key = r.structure + " · " + r.target;
            if (!index.count(key)) {
                index[key] = p.series.size();
                p.series.push_back({key, {}, {}});
            }
            auto& s = p.series[index[key]];
            s.attempt.push_back(i + 1);
            s.error_mm.push_back(r.error_mm);
        }
    p.ba = blandAltman(measured, truth);
    return p;
}

std::string utcNow() {
    const std::time_t t = std::time(nullptr);
    std::tm tm{};
    gmtime_r(&t, &tm);
    char buf[32];
    std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
    return buf;
}

}  // namespace umbra::core
