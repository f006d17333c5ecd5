// SPDX-License-Identifier: MIT
#pragma once
// Sensitivity (coverage) map of a view: for every pixel, the total-focusing response to a unit
// point reflector there, summed over the aperture,
//   S(p) = (sum_e A_tx(e, p)) (sum_e A_rx(e, p)),  A = element directivity x ray-tube spreading,
// normalised to its largest value and given in dB (0 dB at the best pixel). Qt-free; the
// workstation draws its contours over the image.
//   Directivity: a baffled strip of width w radiating into the first medium on the path (the
//   wedge, or the part on contact), sinc(pi w sin(a) / lambda) cos(a) with a the ray's angle to
//   the element normal (common practice; Krautkraemer & Krautkraemer, Ultrasonic Testing of
//   Materials, 4th ed., 1990, ch. 4).
//   Spreading: ray tube through the flat interfaces (Cerveny, Seismic Ray Theory, 2001, for
//   layered media): in plane 1 / sqrt(cos^2(a_0) / c_0 x sum_i L_i c_i / cos^2(a_i)) (L_i, c_i,
//   a_i length, speed and angle of leg i; 1 / sqrt(L) in one medium), times out of plane (3-D,
//   point source) 1 / sqrt(sum_i L_i c_i / c_0) (1 / L in one medium).
//   Interfaces (transmission on, default): the wedge-to-part transmission coefficient on the
//   way in and the part-to-wedge one on the way back, and the back-wall reflection coefficient
//   with mode conversion of skip paths (reconstruction/interface_coefficients.h; densities of a
//   polymer wedge and steel). Contact element directivity on a solid is the strip's (approximate).
#include <string>
#include <vector>

#include "core/capture.h"
#include "reconstruction/pipeline.h"

namespace umbra::recon {

/// dB given to pixels that no path of the view reaches (in the wedge, below the back wall).
inline constexpr float kCoverageFloorDb = -120.0f;

struct CoverageOptions {
    double element_width_m = 0;  ///< 0 = the capture's /array element_width_m
    bool directivity = true;     ///< element directivity on
    bool spreading = true;       ///< geometric spreading on
    bool spreading_3d = false;   ///< point-source (3-D) instead of line-source (2-D) spreading
    bool transmission = true;    ///< interface coefficients (wedge surface, back-wall reflection)
    int threads = 0;             ///< <= 0: all hardware threads
};

struct CoverageMap {
    std::string mode;                ///< the view, e.g. "TT-T"
    std::vector<double> x_m, z_m;    ///< pixel centres (specimen frame with a wedge)
    std::vector<float> db;           ///< [N_z][N_x], <= 0 dB; kCoverageFloorDb where no path
    float at(size_t iz, size_t ix) const { return db[iz * x_m.size() + ix]; }
};

/// Coverage map of `mode` (delay_model.mode notation) for the capture over `grid`, with the
/// speeds of the capture (overridden by the recipe's delay_model speeds when r is given).
/// Throws core::SettingError when the capture cannot support the mode (as makeDelayModel).
CoverageMap coverageMap(const core::CaptureHeader& h, const std::string& mode, const Grid& grid, const CoverageOptions& o = {},
                        const core::Recipe* r = nullptr);

}  // namespace umbra::recon
