// SPDX-License-Identifier: MIT
#include "reconstruction/colour_map_stage.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <map>
#include <mutex>

#include "core/error.h"
#include "reconstruction/detail/spec_helpers.h"
#include "reconstruction/pipeline.h"

namespace umbra::recon {
namespace {

using Lut = std::array<std::array<uint8_t, 3>, 256>;

// A linear-lightness ramp: L* from l0 to l1, hue angle from h0 to h1 (degrees), chroma up to
// cmax following sin(pi t) (zero at the ends), reduced where needed to stay inside sRGB.
Lut labRamp(double l0, double l1, double h0, double h1, double cmax) {
    Lut lut{};
    for (int i = 0; i < 256; ++i) {
        const double t = i / 255.0;
        const double L = l0 + (l1 - l0) * t;
        const double h = (h0 + (h1 - h0) * t) * M_PI / 180;
        double c = cmax * std::sin(M_PI * t);
        double rgb[3];
        for (int it = 0; it < 40; ++it) {  // shrink chroma until in gamut
            bool clipped = false;
            labToSrgb(L, c * std::cos(h), c * std::sin(h), rgb, &clipped);
            if (!clipped || c <= 0) break;
            c *= 0.95;
        }
        labToSrgb(L, c * std::cos(h), c * std::sin(h), rgb);
        for (int k = 0; k < 3; ++k) lut[i][k] = uint8_t(std::lround(std::clamp(rgb[k], 0.0, 1.0) * 255));
    }
    return lut;
}

const Lut& lutFor(const std::string& name) {
    static std::mutex m;
    static std::map<std::string, Lut> cache;
    std::lock_guard<std::mutex> lk(m);
    auto it = cache.find(name);
    if (it != cache.end()) return it->second;
    Lut lut{};
    if (name == "grayscale") {
        for (int i = 0; i < 256; ++i) lut[i] = {uint8_t(i), uint8_t(i), uint8_t(i)};
    } else if (name == "lab_gray") {
        lut = labRamp(0, 100, 0, 0, 0);
    } else if (name == "lab_heat") {
        lut = labRamp(8, 97, 300, 460, 75);  // violet, red, orange, yellow (hue through 360)
    } else if (name == "lab_ice") {
        lut = labRamp(8, 98, 280, 200, 45);
    } else {
        std::string known;
        for (auto& n : colourMapNames()) known += (known.empty() ? "" : ", ") + n;
        throw core::SettingError("colour map '" + name + "' is unknown (known: " + known + ")");
    }
    return cache.emplace(name, lut).first->second;
}

}  // namespace

void labToSrgb(double L, double a, double b, double rgb[3], bool* clipped) {
    const double fy = (L + 16) / 116, fx = fy + a / 500, fz = fy - b / 200;
    auto finv = [](double t) { return t > 6.0 / 29 ? t * t * t : 3 * (6.0 / 29) * (6.0 / 29) * (t - 4.0 / 29); };
    const double X = 0.95047 * finv(fx), Y = finv(fy), Z = 1.08883 * finv(fz);
    const double lin[3] = {3.2406 * X - 1.5372 * Y - 0.4986 * Z, -0.9689 * X + 1.8758 * Y + 0.0415 * Z,
                           0.0557 * X - 0.2040 * Y + 1.0570 * Z};
    bool clip = false;
    for (int k = 0; k < 3; ++k) {
        double v = lin[k];
        if (v < -1e-6 || v > 1 + 1e-6) clip = true;
        v = std::clamp(v, 0.0, 1.0);
        rgb[k] = v <= 0.0031308 ? 12.92 * v : 1.055 * std::pow(v, 1 / 2.4) - 0.055;
    }
    if (clipped) *clipped = clip;
}

core::StageSpec colourMapSpec() {
    using namespace detail;
    return {"colour_map",
            "Colour map",
            "Maps dB values to colours: grayscale or linear-lightness CIELAB ramps.",
            {choiceParam("map", "Colour map", "grayscale, or ramps with lightness linear in the value: lab_gray, lab_heat, lab_ice.",
                         colourMapNames(), "grayscale", true),
             flagParam("invert", "Invert", "Reverse the map (low values bright).", false, true)}};
}

ColourMapParams colourMapParams(const core::Recipe& r) {
    ColourMapParams p;
    p.map = r.text("colour_map.map");
    p.invert = r.flag("colour_map.invert");
    return p;
}

std::vector<std::string> colourMapNames() { return {"grayscale", "lab_gray", "lab_heat", "lab_ice"}; }

void colourAt(const std::string& map, double t, uint8_t rgb[3]) {
    const Lut& lut = lutFor(map);
    const int i = int(std::lround(std::clamp(std::isfinite(t) ? t : 0.0, 0.0, 1.0) * 255));
    for (int k = 0; k < 3; ++k) rgb[k] = lut[i][k];
}

std::vector<uint8_t> colouriseValues(const std::vector<float>& db, double dr, const ColourMapParams& p) {
    const Lut& lut = lutFor(p.map);
    std::vector<uint8_t> out(db.size() * 3);
    for (size_t i = 0; i < db.size(); ++i) {
        double t = dr > 0 ? (double(db[i]) + dr) / dr : 0;
        if (!std::isfinite(t)) t = 0;
        t = std::clamp(t, 0.0, 1.0);
        if (p.invert) t = 1 - t;
        const auto& c = lut[size_t(std::lround(t * 255))];
        out[3 * i] = c[0];
        out[3 * i + 1] = c[1];
        out[3 * i + 2] = c[2];
    }
    return out;
}

}  // namespace umbra::recon
