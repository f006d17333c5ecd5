// SPDX-License-Identifier: MIT
#include "reconstruction/tgc_stage.h"

#include <cmath>
#include <cstdlib>
#include <sstream>

#include "core/error.h"
#include "reconstruction/detail/spec_helpers.h"

namespace umbra::recon {

core::StageSpec tgcSpec() {
    using namespace detail;
    return {"tgc",
            "Time-gain compensation",
            "Gain increasing with depth: round-trip attenuation 2 alpha f z, or a user curve of dB versus depth.",
            {choiceParam("mode", "TCG mode", "off, attenuation (round trip 2 alpha f z dB) or curve (dB versus depth points).",
                         {"off", "attenuation", "curve"}, "attenuation", true),
             modalRealParam("attenuation_db_per_cm_mhz", "Attenuation",
                            "One-way attenuation alpha in dB/cm/MHz; 0 = the capture's medium value (none recorded: no gain).",
                            "dB/cm/MHz", 0, 100, "from capture", 0.05, true),
             modalRealParam("frequency_mhz", "Frequency", "Frequency f for the attenuation gain, MHz; 0 = the array's centre frequency.",
                            "MHz", 0, 1000, "from capture", 0.1, true),
             textParam("curve", "Gain curve", "Depth mm : gain dB points, e.g. 0:0,10:6,20:12; linear between, held beyond.",
                       "mm:dB", "0:0", true)}};
}

std::vector<std::pair<double, double>> parseTgcCurve(const std::string& text) {
    std::vector<std::pair<double, double>> pts;
    std::stringstream ss(text);
    std::string item;
    auto bad = [&](const std::string& why) {
        throw core::SettingError("tgc.curve = '" + text + "': " + why + " (expected depth_mm:gain_dB pairs, e.g. 0:0,10:6,20:12)");
    };
    while (std::getline(ss, item, ',')) {
        auto c = item.find(':');
        if (c == std::string::npos) bad("item '" + item + "' has no ':'");
        auto num = [&](const std::string& s) {
            const char* b = s.c_str();
            char* e = nullptr;
            double v = std::strtod(b, &e);
            while (e && *e == ' ') ++e;
            if (s.empty() || e == b || *e != '\0' || !std::isfinite(v)) bad("'" + s + "' in item '" + item + "' is not a number");
            return v;
        };
        double d = num(item.substr(0, c)), g = num(item.substr(c + 1));
        if (std::fabs(g) > 200) bad("gain " + item.substr(c + 1) + " dB is outside [-200, 200] dB");
        if (!pts.empty() && d * 1e-3 <= pts.back().first) bad("depths must increase (item '" + item + "')");
        pts.emplace_back(d * 1e-3, g);
    }
    if (pts.empty()) bad("no points");
    return pts;
}

TgcParams tgcParams(const core::Recipe& r) {
    TgcParams p;
    p.mode = r.text("tgc.mode");
    p.attenuation_db_per_cm_mhz = r.number("tgc.attenuation_db_per_cm_mhz");
    p.frequency_mhz = r.number("tgc.frequency_mhz");
    p.curve = r.text("tgc.curve");
    parseTgcCurve(p.curve);  // validates
    return p;
}

std::vector<double> tgcGainDb(const TgcParams& p, double alpha, double f_mhz, const std::vector<double>& z_m) {
    std::vector<double> g(z_m.size(), 0.0);
    if (p.mode == "attenuation") {
        for (size_t i = 0; i < z_m.size(); ++i) g[i] = 2.0 * alpha * f_mhz * std::max(0.0, z_m[i]) * 100.0;  // z in cm
    } else if (p.mode == "curve") {
        auto pts = parseTgcCurve(p.curve);
        for (size_t i = 0; i < z_m.size(); ++i) {
            const double z = std::max(0.0, z_m[i]);
            if (z <= pts.front().first) g[i] = pts.front().second;
            else if (z >= pts.back().first) g[i] = pts.back().second;
            else {
                size_t k = 1;
                while (pts[k].first < z) ++k;
                const double t = (z - pts[k - 1].first) / (pts[k].first - pts[k - 1].first);
                g[i] = pts[k - 1].second + t * (pts[k].second - pts[k - 1].second);
            }
        }
    }
    return g;
}

}  // namespace umbra::recon
