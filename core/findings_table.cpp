// SPDX-License-Identifier: MIT
#include "core/findings_table.h"

#include <nlohmann/json.hpp>

#include <filesystem>
#include <sstream>

namespace umbra::core {

using nlohmann::json;

namespace {

std::string numberText(const std::optional<double>& v) {
    if (!v) return "";
    return json(*v).dump();  // shortest text that reads back as the same double
}

const Measurement* findMeasurement(const CaseDocument& doc, size_t capture, const std::string& id) {
    if (capture < doc.captures.size())
        for (const auto& m : doc.captures[capture].measurements)
            if (m.id == id) return &m;
    for (const auto& c : doc.captures)  // ids are unique in the case
        for (const auto& m : c.measurements)
            if (m.id == id) return &m;
    return nullptr;
}

std::string measurementText(const Measurement& m) {
    std::ostringstream o;
    o << m.id << " (" << kindName(m.kind) << ", frame " << (m.frame_index + 1);
    if (!m.label.empty()) o << ", \"" << m.label << "\"";
    o << ", points mm:";
    for (const auto& p : m.points) o << " (" << json(p.x_mm).dump() << ", " << json(p.z_mm).dump() << ")";
    o << ")";
    return o.str();
}

std::string findingName(int number) {
    std::string s = "F";
    s += std::to_string(number);  // (appending avoids GCC 12's false -Wrestrict on "F" + string)
    return s;
}

std::string captureName(const CaseDocument& doc, size_t i) {
    if (i >= doc.captures.size()) return "";
    return std::filesystem::path(doc.captures[i].path).filename().string();
}

}  // namespace

const std::vector<std::string>& findingsColumns() {
    static const std::vector<std::string> c = {
        "case",        "finding",     "capture",     "frame",          "location",
        "x_mm",        "depth_mm",    "length_mm",   "height_mm",      "peak_db",
        "amplitude_reference",        "description", "interpretation", "interpretation_reason",
        "evaluation",  "criterion",   "measurements"};
    return c;
}

std::string csvField(const std::string& t) {
    if (t.find_first_of(",\"\r\n") == std::string::npos) return t;
    std::string s = "\"";
    for (char ch : t) {
        if (ch == '"') s += '"';
        s += ch;
    }
    return s + "\"";
}

std::string findingsCsv(const CaseDocument& doc, const std::string& case_name) {
    std::string out;
    auto row = [&](const std::vector<std::string>& fields) {
        for (size_t i = 0; i < fields.size(); ++i) {
            if (i) out += ',';
            out += csvField(fields[i]);
        }
        out += "\r\n";
    };
    row(findingsColumns());
    for (const auto& f : doc.findings) {
        const Indication& in = f.indication;
        std::string ms;
        for (const auto& id : in.measurement_ids) {
            if (!ms.empty()) ms += "; ";
            const Measurement* m = findMeasurement(doc, in.capture_index, id);
            ms += m ? measurementText(*m) : id + " (not in the case)";
        }
        row({case_name,
             findingName(f.number),
             captureName(doc, in.capture_index),
             std::to_string(in.frame_index + 1),
             in.location,
             numberText(in.x_mm),
             numberText(in.depth_mm),
             numberText(in.length_mm),
             numberText(in.height_mm),
             numberText(in.peak_db),
             in.reference,
             in.description,
             interpretationLabel(f.interpretation),
             f.interpretation_reason,
             f.evaluationApplicable() ? evaluationLabel(f.evaluation) : "not applicable",
             f.criterion,
             ms});
    }
    return out;
}

std::string findingsJson(const CaseDocument& doc, const std::string& case_name) {
    auto num = [](const std::optional<double>& v) { return v ? json(*v) : json(nullptr); };
    json fs = json::array();
    for (const auto& f : doc.findings) {
        const Indication& in = f.indication;
        json ms = json::array();
        for (const auto& id : in.measurement_ids) {
            const Measurement* m = findMeasurement(doc, in.capture_index, id);
            if (!m) {
                ms.push_back(json{{"id", id}, {"missing", true}});
                continue;
            }
            json pts = json::array();
            for (const auto& p : m->points) pts.push_back(json::array({p.x_mm, p.z_mm}));
            ms.push_back(json{{"id", m->id}, {"kind", kindName(m->kind)}, {"label", m->label},
                              {"frame", m->frame_index + 1}, {"points_mm", pts}});
        }
        json ind = json::object();
        ind["capture"] = captureName(doc, in.capture_index);
        ind["frame"] = in.frame_index + 1;
        ind["location"] = in.location;
        ind["x_mm"] = num(in.x_mm);
        ind["depth_mm"] = num(in.depth_mm);
        ind["length_mm"] = num(in.length_mm);
        ind["height_mm"] = num(in.height_mm);
        ind["peak_db"] = num(in.peak_db);
        ind["amplitude_reference"] = in.reference;
        ind["description"] = in.description;
        json fj = json::object();
        fj["id"] = f.id;
        fj["finding"] = findingName(f.number);
        fj["indication"] = ind;
        fj["interpretation"] = json{{"class", interpretationLabel(f.interpretation)}, {"reason", f.interpretation_reason}};
        fj["evaluation"] = json{{"outcome", f.evaluationApplicable() ? evaluationLabel(f.evaluation) : "not applicable"},
                                {"criterion", f.criterion}};
        fj["measurements"] = ms;
        fs.push_back(fj);
    }
    json j = json::object();
    j["case"] = case_name;
    j["title"] = doc.title;
    j["frames_counted_from"] = 1;
    j["findings"] = fs;
    return j.dump(2, ' ', false, json::error_handler_t::replace) + "\n";
}

}  // namespace umbra::core
