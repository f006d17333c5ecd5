// SPDX-License-Identifier: MIT
// Coverage (sensitivity) maps against their formulas: 2-D spreading 1/sqrt(r) in one medium,
// strip directivity sinc(pi w sin a / lambda) cos a, and the beam of a shear-wave wedge
// centred on the ray Snell's law gives.
#include <gtest/gtest.h>

#include <cmath>

#include "core/error.h"
#include "reconstruction/coverage.h"
#include "recon_test_util.h"

using namespace umbra;
using namespace umbra::recon;

TEST(Coverage, ContactLLSpreadingIsTheSquaredSumOfOneOverRootR) {
    testutil::SynthSpec s;
    s.elements = 8;
    s.pitch = 1e-3;
    const auto h = testutil::makeHeader(s);
    const Grid grid{-10e-3, 10e-3, 2e-3, 30e-3, 1e-3};
    CoverageOptions o;
    o.directivity = false;
    o.transmission = false;
    const auto m = coverageMap(h, "L-L", grid, o);
    // Reference: S = (sum_e r_e^-1/2)^2 (2-D line-source spreading, transmit and receive).
    std::vector<double> ref(m.db.size());
    double best = 0;
    for (size_t iz = 0; iz < m.z_m.size(); ++iz)
        for (size_t ix = 0; ix < m.x_m.size(); ++ix) {
            double a = 0;
            for (auto& e : h.array.element_position_m) a += 1 / std::sqrt(std::hypot(m.x_m[ix] - e[0], m.z_m[iz]));
            best = std::max(best, ref[iz * m.x_m.size() + ix] = a * a);
        }
    for (size_t i = 0; i < ref.size(); i += 37) EXPECT_NEAR(m.db[i], 20 * std::log10(ref[i] / best), 1e-3) << i;
}

TEST(Coverage, StripDirectivityOfOneElement) {
    testutil::SynthSpec s;
    s.elements = 1;
    s.pitch = 1e-3;
    auto h = testutil::makeHeader(s);
    h.array.element_width_m = 0.5e-3;
    const Grid grid{-20e-3, 20e-3, 20e-3, 20e-3, 1e-3};  // one row at 20 mm
    CoverageOptions o;
    o.spreading = false;
    o.transmission = false;
    const auto m = coverageMap(h, "L-L", grid, o);
    const double lambda = s.c / s.f0;
    for (size_t ix = 0; ix < m.x_m.size(); ix += 5) {
        const double a = std::atan2(m.x_m[ix], 20e-3), u = M_PI * 0.5e-3 * std::sin(a) / lambda;
        const double d = (u == 0 ? 1 : std::sin(u) / u) * std::cos(a);
        EXPECT_NEAR(m.at(0, ix), 20 * std::log10(d * d), 1e-3) << m.x_m[ix];  // transmit and receive
    }
}

TEST(Coverage, ShearWedgeBeamFollowsSnellsLawAndSkipsStopAtTheBackWall) {
    testutil::SynthSpec s;
    s.elements = 16;
    s.pitch = 0.6e-3;
    auto h = testutil::makeHeader(s);
    h.array.element_width_m = 0.55e-3;
    h.medium.speed_of_sound_m_s = 5900;
    h.medium.shear_speed_m_s = 3240;
    h.medium.thickness_m = 20e-3;
    h.medium.wedge = core::WedgeInfo{2330, {0, 0, 10e-3}, 36 * M_PI / 180};
    const Grid grid{-10e-3, 50e-3, 15e-3, 15e-3, 0.25e-3};
    // One wide element (a directional crystal, 6 mm) at the array centre: its directivity peaks
    // along its normal, which meets the surface at 36 deg incidence in 2330 m/s and refracts to
    // asin(3240 / 2330 sin 36 deg) = 54.8 deg (Snell's law) from the foot at x_s = 0.
    auto one = h;
    one.array.element_position_m = {{0, 0, 0}};
    one.array.element_width_m = 6e-3;
    one.transmit.source_element = {0};
    one.receive.element_index = {0};
    one.receive.start_time_s = {0};
    CoverageOptions o;
    o.spreading = false;
    o.transmission = false;
    const auto m = coverageMap(one, "T-T", grid, o);
    size_t best = 0;
    for (size_t ix = 0; ix < m.x_m.size(); ++ix)
        if (m.at(0, ix) > m.at(0, best)) best = ix;
    const double want = 15e-3 * std::tan(std::asin(3240.0 / 2330 * std::sin(36 * M_PI / 180)));
    EXPECT_NEAR(m.x_m[best], want, 0.25e-3);
    EXPECT_FLOAT_EQ(m.at(0, best), 0.0f);
    // The full map (16 elements, spreading, interfaces): 0 dB at its best pixel, finite elsewhere.
    const auto full = coverageMap(h, "T-T", grid);
    float mx = -1000;
    for (float v : full.db) {
        mx = std::max(mx, v);
        EXPECT_GT(v, kCoverageFloorDb);
    }
    EXPECT_FLOAT_EQ(mx, 0.0f);
    // A skip view below the back wall: no path, the floor value.
    const Grid deep{0, 10e-3, 19e-3, 22e-3, 1e-3};
    const auto k = coverageMap(h, "TT-T", deep);
    EXPECT_GT(k.at(0, 5), kCoverageFloorDb);
    EXPECT_EQ(k.at(3, 5), kCoverageFloorDb);
    h.medium.thickness_m.reset();
    EXPECT_THROW(coverageMap(h, "TT-T", deep), core::SettingError);
}
