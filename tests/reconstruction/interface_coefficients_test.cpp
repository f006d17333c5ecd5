// SPDX-License-Identifier: MIT
// Plane-wave coefficients against energy conservation (the energy flux through an interface,
// rho c cos(a) |u|^2 per wave, is conserved) and normal-incidence values.
#include <gtest/gtest.h>

#include <cmath>
#include <complex>

#include "reconstruction/interface_coefficients.h"

using namespace umbra::recon;

namespace {
constexpr double kCl = 5900, kCt = 3240, kRho = 7850, kCw = 2330, kRhoW = 1050;  // steel, polymer wedge (from memory)
}

TEST(InterfaceCoefficients, FreeSurfaceConservesEnergy) {
    for (double deg = 1; deg < 89; deg += 4) {
        const double a = deg * M_PI / 180;
        // P incident: |R_PP|^2 + |R_PS|^2 (c_T cos a_T) / (c_L cos a_L) = 1.
        const double at = std::asin(std::sin(a) * kCt / kCl);
        const double rpp = freeSurfaceReflection(Wave::L, Wave::L, a, kCl, kCt), rps = freeSurfaceReflection(Wave::L, Wave::T, a, kCl, kCt);
        EXPECT_NEAR(rpp * rpp + rps * rps * (kCt * std::cos(at)) / (kCl * std::cos(a)), 1.0, 1e-9) << deg;
        // SV incident below the critical angle (sin a_L <= 1): the same balance.
        const double sl = std::sin(a) * kCl / kCt;
        if (sl < 1) {
            const double al = std::asin(sl);
            const double rss = freeSurfaceReflection(Wave::T, Wave::T, a, kCl, kCt), rsp = freeSurfaceReflection(Wave::T, Wave::L, a, kCl, kCt);
            EXPECT_NEAR(rss * rss + rsp * rsp * (kCl * std::cos(al)) / (kCt * std::cos(a)), 1.0, 1e-9) << deg;
        } else {  // past the critical angle all the energy stays shear
            EXPECT_NEAR(freeSurfaceReflection(Wave::T, Wave::T, a, kCl, kCt), 1.0, 1e-9) << deg;
            EXPECT_EQ(freeSurfaceReflection(Wave::T, Wave::L, a, kCl, kCt), 0.0);
        }
    }
    // Normal incidence: total reflection without conversion.
    EXPECT_NEAR(freeSurfaceReflection(Wave::L, Wave::L, 0, kCl, kCt), 1.0, 1e-12);
    EXPECT_NEAR(freeSurfaceReflection(Wave::L, Wave::T, 0, kCl, kCt), 0.0, 1e-12);
}

TEST(InterfaceCoefficients, FluidToSolidConservesEnergy) {
    for (double deg = 0; deg < 89; deg += 3) {
        const double a = deg * M_PI / 180, p = std::sin(a) / kCw;
        const double tl = fluidSolidTransmission(Wave::L, a, kCw, kRhoW, kCl, kCt, kRho);
        const double tt = fluidSolidTransmission(Wave::T, a, kCw, kRhoW, kCl, kCt, kRho);
        // Reflected pressure-wave share from the same impedances: R = (Z - Z1) / (Z + Z1).
        double flux = 0;
        if (p * kCl < 1) flux += tl * tl * kRho * kCl * std::sqrt(1 - p * p * kCl * kCl);
        if (p * kCt < 1) flux += tt * tt * kRho * kCt * std::sqrt(1 - p * p * kCt * kCt);
        flux /= kRhoW * kCw * std::cos(a);
        {
            // |R|^2 + transmitted flux = 1, R = (Z - Z1) / (Z + Z1), Z = Z_L cos^2 2a_T + Z_T sin^2 2a_T
            // (complex past the first critical angle).
            using C = std::complex<double>;
            auto cosOf = [](double s) { return s <= 1 ? C(std::sqrt(1 - s * s), 0) : C(0, std::sqrt(s * s - 1)); };
            const double st = p * kCt;
            const C zl = kRho * kCl / cosOf(p * kCl), zt = kRho * kCt / cosOf(st), z1 = kRhoW * kCw / std::cos(a);
            const C c2 = 1 - 2 * st * st, s2 = 2 * st * cosOf(st);
            const C z = zl * c2 * c2 + zt * s2 * s2;
            EXPECT_NEAR(std::norm((z - z1) / (z + z1)) + flux, 1.0, 1e-9) << deg;
        }
        // Normal incidence: T = 2 Z1 / (Z1 + Z2) in displacement (c1 / c2 x the stress ratio 2 Z2 / (Z1 + Z2) x rho1 / rho2).
        if (deg == 0) {
            const double z1 = kRhoW * kCw, z2 = kRho * kCl;
            EXPECT_NEAR(tl, 2 * z1 / (z1 + z2), 1e-12);
            EXPECT_NEAR(flux, 1 - std::pow((z2 - z1) / (z2 + z1), 2), 1e-9);
        }
    }
    // Between the critical angles (L evanescent) the shear wave is the only one transmitted, and
    // at 36 deg in the wedge it is strong (near its maximum).
    const double t36 = fluidSolidTransmission(Wave::T, 36 * M_PI / 180, kCw, kRhoW, kCl, kCt, kRho);
    EXPECT_EQ(fluidSolidTransmission(Wave::L, 36 * M_PI / 180, kCw, kRhoW, kCl, kCt, kRho), 0.0);
    EXPECT_GT(t36, fluidSolidTransmission(Wave::T, 10 * M_PI / 180, kCw, kRhoW, kCl, kCt, kRho));
}
