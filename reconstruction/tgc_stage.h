// SPDX-License-Identifier: MIT
#pragma once
// Time-gain compensation stage (display only): a gain per depth row, either from the medium's
// attenuation, round trip: G(z) = 2 alpha f z dB (alpha in dB/cm/MHz one way, f in MHz, z in cm),
// or a user curve of dB versus depth points.
#include <string>
#include <utility>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon {

struct TgcParams {
    std::string mode = "attenuation";  ///< "off", "attenuation" (2 alpha f z) or "curve"
    double attenuation_db_per_cm_mhz = 0;  ///< one-way alpha, dB/cm/MHz; default 0 = the capture's (none: 0)
    double frequency_mhz = 0;              ///< f, MHz; default 0 = the capture's centre frequency
    std::string curve = "0:0";             ///< "mm:dB,mm:dB,..." depths increasing; linear between, held beyond
};

/// Declaration of the "tgc" stage (all display-only).
core::StageSpec tgcSpec();
/// The stage's values from a recipe (curve syntax checked: SettingError).
TgcParams tgcParams(const core::Recipe& r);

/// Parses "0:0,10:6,20:12" (depth mm : gain dB, depths strictly increasing) into (m, dB) pairs.
/// Throws SettingError naming the bad item.
std::vector<std::pair<double, double>> parseTgcCurve(const std::string& text);

/// Pure function: gain in dB at each depth z_m (m). alpha_db_cm_mhz and f_mhz are the resolved
/// values; depths above the array (z < 0) get the gain at z = 0.
std::vector<double> tgcGainDb(const TgcParams& p, double alpha_db_cm_mhz, double f_mhz, const std::vector<double>& z_m);

}  // namespace umbra::recon
