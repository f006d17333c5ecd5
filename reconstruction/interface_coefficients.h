// SPDX-License-Identifier: MIT
#pragma once
// Plane-wave amplitude coefficients (displacement amplitude ratios) at the two interfaces of a
// weld view: the wedge-to-part surface (the wedge treated as a fluid: no shear in it) and the
// part's stress-free back wall with mode conversion. Angles from the interface normal, rad.
// Past a critical angle the coefficient's magnitude is given (the evanescent wave carries none).
//
// Free surface of an isotropic solid (Achenbach, Wave Propagation in Elastic Solids, 1973,
// sec. 5.6), kappa = c_L / c_T, D = sin 2a_L sin 2a_T + kappa^2 cos^2 2a_T:
//   P in: R_PP = (sin 2a_L sin 2a_T - kappa^2 cos^2 2a_T) / D,  R_PS = 2 kappa sin 2a_L cos 2a_T / D
//   SV in: R_SS = (sin 2a_T sin 2a_L - kappa^2 cos^2 2a_T) / D,  R_SP = kappa sin 4a_T / D
// Fluid-solid interface (Brekhovskikh, Waves in Layered Media, 1980; Krautkraemer &
// Krautkraemer, Ultrasonic Testing of Materials, 1990), Z_i = rho_i c_i / cos a_i,
// D = Z_L cos^2 2a_T + Z_T sin^2 2a_T + Z_1:
//   T_L = (rho_1 / rho_2)(c_1 / c_L) 2 Z_L cos 2a_T / D,  T_T = (rho_1 / rho_2)(c_1 / c_T) 2 Z_T sin 2a_T / D.
// The tests check energy conservation across each interface.
#include "reconstruction/view_mode.h"

namespace umbra::recon {

/// Densities used when a capture records none (common practice values): a polymer wedge and steel, kg/m^3.
inline constexpr double kWedgeDensityKgM3 = 1050, kPartDensityKgM3 = 7850;

/// |displacement reflection coefficient| at a free surface for an incident wave `in` at angle
/// a_in reflected as `out` (angle from Snell's law). c_l > c_t > 0.
double freeSurfaceReflection(Wave in, Wave out, double a_in_rad, double c_l, double c_t);

/// |displacement transmission coefficient| from a fluid (c1, rho1) at incidence a1 into `out`
/// of a solid (c_l, c_t, rho2); 0 past that wave's critical angle.
double fluidSolidTransmission(Wave out, double a1_rad, double c1, double rho1, double c_l, double c_t, double rho2);

/// |displacement transmission coefficient| back from the solid (wave `in` at angle a_in) into
/// the fluid: by reciprocity of the energy-normalised coefficients, the forward coefficient
/// times rho2 c_in cos a_in / (rho1 c1 cos a1).
double solidFluidTransmission(Wave in, double a_in_rad, double c1, double rho1, double c_l, double c_t, double rho2);

}  // namespace umbra::recon
