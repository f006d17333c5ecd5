// SPDX-License-Identifier: MIT
#pragma once
// Point-spread widths of a delay-and-sum image at a given place, for sizing and uncertainty:
// the −6 dB (half-amplitude) full widths of the envelope, axial c·T/2 (pointSpreadWidths in
// grid_stage.h) and lateral K·λ·F_eff, where K is the two-way width factor of the aperture
// window (lateralWidthFactor) and F_eff the f-number of the aperture that actually reaches
// the pixel (the dynamic aperture clipped at the array's ends). Not a stage: a model read by
// the sizing tools. No Qt.
#include <optional>
#include <string>

#include "core/parameters.h"

namespace umbra::recon {

/// Two-way −6 dB lateral width, in units of λ·F#, of an aperture weighted by `apodization`
/// ("rectangular"/"uniform", "hann", "tukey" with `tukey_alpha`) in transmit and receive: the
/// pattern of one aperture is the Fourier transform of its window, the two-way pattern its
/// square, so the −6 dB two-way width is where one-way falls to 1/√2. Computed numerically.
/// Rectangular: 0.886 (sinc² root); Hann: 1.44 (3 dB bandwidth of the Hann window, 1.44 bins,
/// Harris, Proc. IEEE 66 (1978) 51, Table I).
double lateralWidthFactor(const std::string& apodization, double tukey_alpha = 0.5);

/// What the model needs, from the recipe and the acquisition.
struct PointSpreadModel {
    double c_m_s = 0;                 ///< speed of sound, m/s
    double f0_hz = 0;                 ///< centre frequency, Hz
    double fractional_bandwidth = 0;  ///< −6 dB fractional bandwidth
    double array_x_min_m = 0, array_x_max_m = 0;  ///< x of the first and last element centre, m
    double pitch_m = 0;               ///< element pitch (smallest aperture), m
    bool full_aperture = false;       ///< das.aperture == "full"
    double f_number = 1;              ///< das.f_number
    double width_factor = 0.886;      ///< lateralWidthFactor(das.apodization, das.tukey_alpha)

    /// −6 dB widths (m) at pixel (x, z), m. z ≤ 0 gives the pitch-limited widths at the face.
    struct Widths {
        double lateral_m = 0, axial_m = 0;
        double f_number = 0;  ///< effective f-number used
    };
    Widths at(double x_m, double z_m) const;
};

/// Model for an image made with `recipe` (das.* settings) by an array with the given centre
/// frequency, bandwidth, element x range and pitch, in a medium of speed c.
PointSpreadModel pointSpreadModel(const core::Recipe& recipe, double c_m_s, double f0_hz, double fractional_bandwidth,
                                  double array_x_min_m, double array_x_max_m, double pitch_m);

}  // namespace umbra::recon
