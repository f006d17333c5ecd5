// SPDX-License-Identifier: MIT
#pragma once
// Far-field directivity of a strip element of width w in a soft baffle (pressure-release),
// narrow-band at wavelength lambda:
//     D(theta) = sinc(pi w sin(theta) / lambda) * cos(theta),   sinc(u) = sin(u)/u
// Selfridge, Kino & Khuri-Yakub, "A theory for the radiation pattern of a narrow-strip acoustic
// transducer", Appl. Phys. Lett. 37 (1980) 35-36. The cos(theta) is the soft-baffle obliquity
// factor. Used on transmit and on receive (reciprocity), evaluated at the centre frequency.
#include <cmath>

namespace umbra::recon::sim {

/// Directivity (amplitude, 1 on axis) at angle theta (rad) from the element normal.
inline double stripDirectivity(double theta_rad, double width_m, double wavelength_m) {
    const double u = M_PI * width_m * std::sin(theta_rad) / wavelength_m;
    const double s = std::abs(u) < 1e-8 ? 1.0 : std::sin(u) / u;
    return s * std::cos(theta_rad);
}

/// Same, from the direction cosine: sin(theta) = dx / r, cos(theta) = dz / r (dz >= 0).
inline double stripDirectivity(double dx, double dz, double r, double width_m, double wavelength_m) {
    const double st = dx / r, ct = dz / r;
    const double u = M_PI * width_m * st / wavelength_m;
    const double s = std::abs(u) < 1e-8 ? 1.0 : std::sin(u) / u;
    return s * ct;
}

}  // namespace umbra::recon::sim
