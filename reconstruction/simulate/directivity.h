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

namespace umbra::recon::sim {

/// Far-field directivity of a normal-stress strip (line) source on the free surface of an
/// isotropic solid, for the longitudinal (L) or shear (T) wave at angle theta from the surface
/// normal (Miller & Pursey, Proc. R. Soc. Lond. A 223 (1954) 521-541; formulas from memory):
///   D_L = cos(t) (mu^2 - 2 sin^2 t) / F0(sin t),
///   D_T = mu^(5/2) (mu^2 sin^2 t - 1)^(1/2) sin 2t / F0(mu sin t),
///   F0(z) = (2 z^2 - mu^2)^2 - 4 z^2 (z^2 - 1)^(1/2) (z^2 - mu^2)^(1/2),  mu = c_L / c_T,
/// magnitudes, both scaled by mu^2 so that D_L(0) = 1 (the ratio of T to L is kept).
double millerPurseyDirectivity(bool shear, double theta_rad, double c_l, double c_t);

}  // namespace umbra::recon::sim
