// SPDX-License-Identifier: MIT
// umbra-cli calibrate: speed of sound from a back wall of known thickness or from two holes at
// known depths, the fixed (wedge / delay-line) delay, and weak or dead elements of the array
// (reconstruction/calibration.h). Readable lines or JSON.
#include <cstdio>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/capture_file.h"
#include "core/error.h"
#include "reconstruction/calibration.h"
#include "reconstruction/das_stage.h"

namespace umbra::cli {
namespace {

nlohmann::ordered_json measuredJson(const core::MeasuredValue& m, double scale, const std::string& unit) {
    const auto r = core::roundToUncertainty(m.value * scale, m.budget.expanded() * scale);
    nlohmann::ordered_json j;
    j["value"] = r.value;
    j["expanded_uncertainty"] = r.uncertainty;
    j["coverage_factor"] = m.budget.coverage_factor;
    j["unit"] = unit;
    nlohmann::ordered_json comps = nlohmann::ordered_json::array();
    for (const auto& c : m.budget.components)
        comps.push_back({{"name", c.name}, {"basis", c.basis}, {"standard_uncertainty", c.standard * scale}});
    j["budget"] = comps;
    return j;
}

}  // namespace

int cmdCalibrate(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"--thickness-mm", "D", "plate thickness at the array: speed of sound from the back-wall echo"},
        {"--thickness-tol-mm", "A", "tolerance ±A of the thickness, mm (rectangular; default 0.05)"},
        {"--holes-mm", "Z1,Z2", "depths of two side-drilled holes of equal diameter: speed from their echoes"},
        {"--depth-tol-mm", "A", "tolerance ±A of each hole depth, mm (rectangular; default 0.05)"},
        {"--speed", "M/S", "known speed of sound: with --thickness-mm, gives the fixed (wedge / delay-line) delay instead"},
        {"--reflector-mm", "X,Z", "a reflector at a known place (specimen frame, through the wedge): the fixed delay from its echoes"},
        {"--hole-diameter-mm", "D", "with --reflector-mm: the reflector is a side-drilled hole of diameter D (default 0: a point or tip)"},
        {"--wave", "L|T", "with --reflector-mm: wave type of the path in the part (default: T through a wedge, L on contact)"},
        {"--position-tol-mm", "A", "with --reflector-mm: tolerance ±A of its x and depth, mm (rectangular; default 0.05)"},
        {"--search-us", "W", "with --reflector-mm: search the delay within ±W µs (default 2)"},
        {"--elements", "", "report weak and dead elements from the full matrix's energies"},
        {"--frame", "N", "frame to use, 0-based (default 0)"},
        {"--json", "", "print one JSON object"},
    };
    const char* usage =
        "umbra-cli calibrate CAPTURE.h5 (--thickness-mm D [--speed M/S] | --holes-mm Z1,Z2 | --reflector-mm X,Z [--hole-diameter-mm D]) "
        "[--elements] [--json]";
    Args a(argv, specs, 0, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Calibrates from a full-matrix capture's pulse-echo traces. --thickness-mm: c = 2 d / t from the\n"
                            "back-wall echo; when the record holds the back wall's repeat, c = 2 d / (t2 - t1) (free of any fixed\n"
                            "delay) and the fixed delay t0 = 2 t1 - t2. --holes-mm: c = 2 (z2 - z1) / (t2 - t1) from two equal\n"
                            "side-drilled holes. --speed with --thickness-mm: the fixed delay t0 = t - 2 d / c of the back wall\n"
                            "(a wedge or delay line at normal incidence). --reflector-mm: the fixed delay from a hole or point at a\n"
                            "known place seen at an angle (through the wedge): echo times minus the least-time round trip, median\n"
                            "over the elements; use it as --set delay_model.fixed_delay_us=VALUE. --elements: weak and dead elements (transmit and\n"
                            "receive energies against the median element; exclude them with --set das.excluded_elements=LIST in\n"
                            "reconstruct). Values carry expanded uncertainties (k = 2, JCGM 100:2008), rounded to them.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    if (a.positional().size() != 1) throw UsageError("missing argument CAPTURE.h5 (see --help)");
    const bool want_elements = a.has("--elements");
    if (!a.has("--thickness-mm") && !a.has("--holes-mm") && !a.has("--reflector-mm") && !want_elements)
        throw UsageError("say what to calibrate: --thickness-mm D, --holes-mm Z1,Z2, --reflector-mm X,Z or --elements (see --help)");
    if (int(a.has("--thickness-mm")) + int(a.has("--holes-mm")) + int(a.has("--reflector-mm")) > 1)
        throw UsageError("give one of --thickness-mm, --holes-mm and --reflector-mm");
    for (const char* opt : {"--hole-diameter-mm", "--wave", "--position-tol-mm", "--search-us"})
        if (a.has(opt) && !a.has("--reflector-mm")) throw UsageError(std::string(opt) + " goes with --reflector-mm");
    if (a.has("--speed") && !a.has("--thickness-mm")) throw UsageError("--speed needs --thickness-mm (the reflector of known depth)");
    const std::string path = a.positional()[0];
    size_t frame = 0;
    if (auto f = a.value("--frame")) frame = size_t(parseWholeNumber("--frame", *f, 0, 1u << 30));
    auto tol = [&](const char* opt) {
        double t = 0.05;
        if (auto v = a.value(opt)) t = parseFiniteNumber(opt, *v);
        if (t < 0) throw UsageError(std::string(opt) + " must not be negative");
        return t * 1e-3;
    };

    if (auto problems = checkCaptureIsolated(path, false); !problems.empty()) throw core::InputError(path, problems);
    core::CaptureReader cap(path);
    nlohmann::ordered_json j;
    j["capture"] = path;
    j["frame"] = frame;
    std::vector<std::string> lines;
    if (cap.header().isSynthetic()) lines.push_back("Data: synthetic (simulated capture)");
    j["synthetic"] = cap.header().isSynthetic();

    auto report = [&](const recon::SpeedCalibration& c) {
        j["method"] = c.method;
        j["speed_m_s"] = measuredJson(c.speed, 1, "m/s");
        nlohmann::ordered_json ev = nlohmann::ordered_json::array();
        for (const auto& e : c.echoes) ev.push_back({{"time_us", e.time_s * 1e6}, {"standard_uncertainty_us", e.u_time_s * 1e6}, {"traces", e.elements}});
        j["echoes"] = ev;
        if (c.single_echo_speed) j["first_echo_speed_m_s"] = measuredJson(*c.single_echo_speed, 1, "m/s");
        if (c.fixed_delay) j["fixed_delay_us"] = measuredJson(*c.fixed_delay, 1e6, "us");
        j["notes"] = c.notes;
        for (const auto& l : recon::calibrationLines(c)) lines.push_back(l);
    };
    if (auto d = a.value("--thickness-mm")) {
        const double d_m = parseFiniteNumber("--thickness-mm", *d) * 1e-3;
        if (!(d_m > 0)) throw UsageError("--thickness-mm must be positive");
        const double t = tol("--thickness-tol-mm");
        const auto c = recon::speedFromBackWall(cap, d_m, t, frame);
        if (auto s = a.value("--speed")) {
            const double c_known = parseFiniteNumber("--speed", *s);
            if (!(c_known > 0)) throw UsageError("--speed must be positive (m/s)");
            const auto t0 = recon::fixedDelay(c.echoes.front(), d_m, t, c_known, 0);
            j["method"] = "fixed delay from the back wall at a known speed";
            j["speed_m_s_given"] = c_known;
            j["fixed_delay_us"] = measuredJson(t0, 1e6, "us");
            lines.push_back("Fixed delay (wedge, delay line, system) from the back wall at " +
                            core::formatWithUncertainty(d_m * 1e3, t * 1e3, "mm") + " and c = " + *s + " m/s: " +
                            core::formatWithUncertainty(t0.value * 1e6, t0.budget.expanded() * 1e6, "µs") + " (k = 2)");
        } else {
            report(c);
        }
    } else if (auto h = a.value("--holes-mm")) {
        const auto comma = h->find(',');
        if (comma == std::string::npos) throw UsageError("--holes-mm needs two depths Z1,Z2 in mm, got '" + *h + "'");
        const double z1 = parseFiniteNumber("--holes-mm", h->substr(0, comma)) * 1e-3;
        const double z2 = parseFiniteNumber("--holes-mm", h->substr(comma + 1)) * 1e-3;
        report(recon::speedFromHoles(cap, z1, z2, tol("--depth-tol-mm"), frame));
    }
    if (auto rm = a.value("--reflector-mm")) {
        const auto comma = rm->find(',');
        if (comma == std::string::npos) throw UsageError("--reflector-mm needs X,Z in mm (specimen frame), got '" + *rm + "'");
        const double x = parseFiniteNumber("--reflector-mm", rm->substr(0, comma)) * 1e-3;
        const double z = parseFiniteNumber("--reflector-mm", rm->substr(comma + 1)) * 1e-3;
        if (!(z > 0)) throw UsageError("--reflector-mm: the depth Z must be positive");
        double dia = 0;
        if (auto d = a.value("--hole-diameter-mm")) dia = parseFiniteNumber("--hole-diameter-mm", *d) * 1e-3;
        if (dia < 0) throw UsageError("--hole-diameter-mm must not be negative");
        recon::Wave wave = recon::defaultDelayWave(cap.header());
        if (auto w = a.value("--wave")) {
            if (*w == "L") wave = recon::Wave::L;
            else if (*w == "T") wave = recon::Wave::T;
            else throw UsageError("--wave must be L or T, got '" + *w + "'");
        }
        double search_us = 2;
        if (auto w = a.value("--search-us")) search_us = parseFiniteNumber("--search-us", *w);
        if (!(search_us > 0) || search_us > 100) throw UsageError("--search-us must be above 0 and at most 100 µs");
        const auto c = recon::fixedDelayFromReflector(cap, x, z, dia / 2, tol("--position-tol-mm"), wave, frame, search_us * 1e-6);
        j["method"] = "fixed delay from a reflector at a known place";
        j["reflector_mm"] = {x * 1e3, z * 1e3};
        j["hole_diameter_mm"] = dia * 1e3;
        j["wave"] = wave == recon::Wave::L ? "L" : "T";
        j["fixed_delay_us"] = measuredJson(c.delay, 1e6, "us");
        j["elements_used"] = c.elements;
        j["notes"] = c.notes;
        for (const auto& l : recon::delayLines(c)) lines.push_back(l);
        const auto r = core::roundToUncertainty(c.delay.value * 1e6, c.delay.budget.expanded() * 1e6);
        lines.push_back("  to remove it: --set delay_model.fixed_delay_us=" + r.value_text);
    }
    if (want_elements) {
        const auto health = recon::elementHealth(cap, frame);
        nlohmann::ordered_json el = nlohmann::ordered_json::array();
        for (const auto& e : health.elements) {
            nlohmann::ordered_json ej;
            ej["element"] = e.element + 1;
            ej["status"] = recon::elementStatusName(e.status);
            if (health.transmit_known) ej["transmit_db"] = e.transmit_db;
            ej["receive_db"] = e.receive_db;
            el.push_back(ej);
        }
        j["elements"] = el;
        j["element_rule"] = health.rule;
        j["exclude"] = recon::elementListText(health.flagged());
        for (const auto& l : recon::healthLines(health)) lines.push_back(l);
        if (!health.flagged().empty())
            lines.push_back("  to exclude them: --set das.excluded_elements=\"" + recon::elementListText(health.flagged()) + "\"");
    }
    if (a.has("--json")) {
        std::fputs((j.dump(2) + "\n").c_str(), stdout);
    } else {
        for (const auto& l : lines) std::printf("%s\n", l.c_str());
    }
    return 0;
}

}  // namespace umbra::cli
