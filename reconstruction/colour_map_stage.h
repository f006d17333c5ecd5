// SPDX-License-Identifier: MIT
#pragma once
// Colour-map stage (display only): dB values in [-dynamic range, 0] to 8-bit RGB.
// Maps: "grayscale" (linear in 8-bit sRGB value, common practice) and ramps whose CIE L*
// lightness rises linearly with the value, so equal dB steps look equally large:
// "lab_gray" (neutral), "lab_heat" (violet-red-orange-yellow), "lab_ice" (blue-cyan).
// The linear-lightness design follows Kovesi, "Good colour maps: how to design them",
// arXiv:1509.03700 (2015); CIELAB to sRGB by CIE 15:2004 and IEC 61966-2-1 (D65 white).
#include <cstdint>
#include <string>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon {

struct ColourMapParams {
    std::string map = "grayscale";  ///< one of colourMapNames(); default "grayscale"
    bool invert = false;            ///< reverse the map (bright = low); default off
};

/// Declaration of the "colour_map" stage (all display-only).
core::StageSpec colourMapSpec();
/// The stage's values from a recipe.
ColourMapParams colourMapParams(const core::Recipe& r);

/// Pure function: RGB (3 bytes per value) for dB values in [-dynamic_range_db, 0].
std::vector<uint8_t> colouriseValues(const std::vector<float>& db, double dynamic_range_db, const ColourMapParams& p);

/// sRGB (0..1 each) of a CIELAB colour (D65), out-of-gamut flag set when any channel clipped.
void labToSrgb(double L, double a, double b, double rgb[3], bool* clipped = nullptr);

}  // namespace umbra::recon
