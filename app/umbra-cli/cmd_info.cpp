// SPDX-License-Identifier: MIT
#include <unistd.h>

#include <cstdio>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <sstream>

#include "args.h"
#include "commands.h"
#include "core/capture_file.h"
#include "core/dicom_image.h"
#include "core/error.h"
#include "core/isolated_check.h"
#include "reconstruction/ray_path.h"
#include "reconstruction/view_mode.h"

namespace umbra::cli {
namespace {
std::string fmt(double v, int prec = 3) {
    std::ostringstream os;
    os.setf(std::ios::fixed);
    os.precision(prec);
    os << v;
    return os.str();
}

}  // namespace

int headerSeconds() {
    if (const char* e = std::getenv("UMBRA_HEADER_TIMEOUT_S")) {
        int v = std::atoi(e);
        if (v >= 1 && v <= 3600) return v;
    }
    return 30;
}


std::vector<core::Problem> checkCaptureIsolated(const std::string& path, bool full) {
    return core::checkCaptureIsolated(path, full, headerSeconds());
}

int cmdInfo(const Argv& argv) {
    const std::vector<OptionSpec> specs = {{"--json", "", "print the summary as JSON"}};
    const char* usage = "umbra-cli info [--json] CAPTURE";
    Args a(argv, specs, 1, 1);
    if (a.help()) {
        std::fputs(helpText(usage, "Prints a readable summary of CAPTURE: title, array, transmit plan, receive\n"
                                   "channels, sampling, trace duration and depth range in the nominal medium,\n"
                                   "frames, file size, medium and wedge.", specs).c_str(), stdout);
        return 0;
    }
    const std::string path = a.positional()[0];
    // Header checked in a child first, so that a library crash on a damaged file is a
    // message, not a crash; then opened here.
    if (auto problems = checkCaptureIsolated(path, false); !problems.empty()) throw core::InputError(path, problems);
    core::CaptureReader r(path);
    const auto& h = r.header();
    const double fs = h.receive.sampling_frequency_hz;
    const double duration = double(h.samples) / fs;
    double t0min = 1e300, t0max = -1e300;
    for (double t : h.receive.start_time_s) { t0min = std::min(t0min, t); t0max = std::max(t0max, t); }
    const double c = h.medium.speed_of_sound_m_s;
    // Pulse-echo depth covered by the recorded window (two-way time, nominal medium).
    const double zmin = std::max(0.0, t0min * c / 2), zmax = (t0max + duration) * c / 2;
    std::error_code ec;
    const auto bytes = std::filesystem::file_size(path, ec);

    nlohmann::ordered_json j;
    j["file"] = path;
    j["title"] = h.title;
    j["created_utc"] = h.created_utc;
    j["synthetic"] = h.isSynthetic();
    j["array"] = {{"elements", h.array.elementCount()},
                  {"pitch_m", h.array.pitch_m()},
                  {"element_width_m", h.array.element_width_m},
                  {"centre_frequency_hz", h.array.centre_frequency_hz},
                  {"fractional_bandwidth", h.array.fractional_bandwidth}};
    if (h.array.element_height_m) j["array"]["element_height_m"] = *h.array.element_height_m;
    j["transmit"] = {{"kind", core::toString(h.transmit.kind)}, {"count", h.transmits()}};
    if (h.transmit.kind == core::TransmitKind::PlaneWave && !h.transmit.angle_rad.empty()) {
        auto [lo, hi] = std::minmax_element(h.transmit.angle_rad.begin(), h.transmit.angle_rad.end());
        j["transmit"]["angle_min_deg"] = *lo * 180 / M_PI;
        j["transmit"]["angle_max_deg"] = *hi * 180 / M_PI;
    }
    j["receive"] = {{"channels", h.receives()}, {"sampling_frequency_hz", fs}};
    j["traces"] = {{"samples", h.samples}, {"duration_s", duration}, {"sample_type", h.sample_type == core::SampleType::Int16 ? "int16" : "float32"},
                   {"scale", h.rf_scale}, {"units", h.rf_units}, {"depth_min_m", zmin}, {"depth_max_m", zmax}};
    j["frames"] = h.frames;
    if (h.scan && !h.scan->position_m.empty())
        j["scan"] = {{"position_first_m", h.scan->position_m.front()}, {"position_last_m", h.scan->position_m.back()}};
    j["file_size_bytes"] = bytes;
    j["medium"] = {{"speed_of_sound_m_s", c}};
    if (h.medium.shear_speed_m_s) j["medium"]["shear_speed_m_s"] = *h.medium.shear_speed_m_s;
    if (h.medium.attenuation_db_per_cm_mhz) j["medium"]["attenuation_db_per_cm_mhz"] = *h.medium.attenuation_db_per_cm_mhz;
    if (h.medium.thickness_m) j["medium"]["thickness_m"] = *h.medium.thickness_m;
    if (h.medium.wedge)
        j["wedge"] = {{"speed_of_sound_m_s", h.medium.wedge->speed_of_sound_m_s},
                      {"surface_origin_m", h.medium.wedge->surface_origin_m},
                      {"surface_tilt_rad", h.medium.wedge->surface_tilt_rad}};
    else
        j["wedge"] = nullptr;
    // Views the capture supports; with a wedge, its geometry checked and the refracted angles
    // of the central ray (Snell's law from the incidence = tilt).
    j["valid_modes"] = recon::validViewModes(h);
    std::string geometry_problem;
    if (h.medium.wedge) {
        try {
            recon::ViewGeometry::fromHeader(h);
            const double inc = std::fabs(h.medium.wedge->surface_tilt_rad), cw = h.medium.wedge->speed_of_sound_m_s;
            j["wedge"]["incidence_deg"] = inc * 180 / M_PI;
            const double sl = c / cw * std::sin(inc);
            j["wedge"]["refracted_l_deg"] = sl < 1 ? nlohmann::ordered_json(std::asin(sl) * 180 / M_PI) : nlohmann::ordered_json(nullptr);
            if (h.medium.shear_speed_m_s) {
                const double st = *h.medium.shear_speed_m_s / cw * std::sin(inc);
                j["wedge"]["refracted_t_deg"] = st < 1 ? nlohmann::ordered_json(std::asin(st) * 180 / M_PI) : nlohmann::ordered_json(nullptr);
            }
        } catch (const core::SettingError& e) {
            geometry_problem = e.what();
            j["valid_modes"] = nlohmann::ordered_json::array();
            j["wedge"]["problem"] = geometry_problem;
        }
    }
    if (!h.provenance.empty()) j["provenance"] = h.provenance;
    const auto warnings = core::headerWarnings(h);
    j["warnings"] = nlohmann::ordered_json::array();
    for (auto& w : warnings) j["warnings"].push_back(w.where + ": " + w.what);

    if (a.has("--json")) {
        std::printf("%s\n", j.dump(2, ' ', false, nlohmann::ordered_json::error_handler_t::replace).c_str());
        return 0;
    }
    std::ostringstream o;
    o << "Capture      " << path << (h.isSynthetic() ? "  (synthetic data)" : "") << "\n";
    o << "Title        " << h.title << "\n";
    o << "Created      " << h.created_utc << "\n";
    o << "Array        " << h.array.elementCount() << " elements, pitch " << fmt(h.array.pitch_m() * 1e3) << " mm, width "
      << fmt(h.array.element_width_m * 1e3) << " mm, " << fmt(h.array.centre_frequency_hz / 1e6, 2) << " MHz, bandwidth "
      << fmt(h.array.fractional_bandwidth * 100, 0) << " % (-6 dB)\n";
    o << "Transmit     " << core::toString(h.transmit.kind) << ", " << h.transmits() << " events";
    if (j["transmit"].contains("angle_min_deg"))
        o << " (" << fmt(j["transmit"]["angle_min_deg"].get<double>(), 1) << " to " << fmt(j["transmit"]["angle_max_deg"].get<double>(), 1) << " deg)";
    o << "\nReceive      " << h.receives() << " channels\n";
    o << "Sampling     " << fmt(fs / 1e6, 2) << " MHz, " << h.samples << " samples (" << fmt(duration * 1e6, 2) << " us), "
      << (h.sample_type == core::SampleType::Int16 ? "int16" : "float32") << ", scale " << h.rf_scale
      << (h.rf_units.empty() ? "" : " " + h.rf_units) << "\n";
    o << "Depth range  " << fmt(zmin * 1e3, 1) << " to " << fmt(zmax * 1e3, 1) << " mm (pulse-echo at " << fmt(c, 0) << " m/s)\n";
    o << "Frames       " << h.frames;
    if (j.contains("scan"))
        o << " (scan " << fmt(h.scan->position_m.front() * 1e3, 1) << " to " << fmt(h.scan->position_m.back() * 1e3, 1) << " mm)";
    o << "\nFile size    " << fmt(double(bytes) / (1024.0 * 1024.0), 2) << " MiB\n";
    o << "Medium       " << fmt(c, 0) << " m/s";
    if (h.medium.shear_speed_m_s) o << ", shear " << fmt(*h.medium.shear_speed_m_s, 0) << " m/s";
    if (h.medium.attenuation_db_per_cm_mhz) o << ", " << fmt(*h.medium.attenuation_db_per_cm_mhz, 2) << " dB/cm/MHz";
    if (h.medium.thickness_m) o << ", thickness " << fmt(*h.medium.thickness_m * 1e3, 1) << " mm";
    o << "\nWedge        ";
    if (h.medium.wedge) {
        const auto& w = *h.medium.wedge;
        o << fmt(w.speed_of_sound_m_s, 0) << " m/s, tilt " << fmt(w.surface_tilt_rad * 180 / M_PI, 1) << " deg, surface origin ("
          << fmt(w.surface_origin_m[0] * 1e3, 2) << ", " << fmt(w.surface_origin_m[2] * 1e3, 2) << ") mm";
        if (!geometry_problem.empty()) o << "\n             problem: " << geometry_problem;
        else {
            const auto& jw = j["wedge"];
            o << "\n             central ray: " << (jw["refracted_l_deg"].is_null() ? std::string("L beyond critical angle")
                                                                                 : "L " + fmt(jw["refracted_l_deg"].get<double>(), 1) + " deg");
            if (jw.contains("refracted_t_deg"))
                o << (jw["refracted_t_deg"].is_null() ? std::string(", T beyond critical angle")
                                                     : ", T " + fmt(jw["refracted_t_deg"].get<double>(), 1) + " deg");
            o << " in the part; images in the specimen frame";
        }
        o << "\n";
    } else {
        o << "none (array on the surface)\n";
    }
    o << "Views        ";
    for (size_t i = 0; i < j["valid_modes"].size(); ++i) o << (i ? " " : "") << j["valid_modes"][i].get<std::string>();
    o << (j["valid_modes"].empty() ? "none\n" : "  (delay_model.mode)\n");
    for (auto& [k, v] : h.provenance) o << "Provenance   " << k << ": " << v << "\n";
    for (auto& w : warnings) o << "Warning      " << w.where << ": " << w.what << "\n";
    std::fputs(o.str().c_str(), stdout);
    return 0;
}

}  // namespace umbra::cli
