// SPDX-License-Identifier: MIT
// Display chain: time-gain compensation, log compression and colour maps.
#include <gtest/gtest.h>

#include <cmath>

#include "recon_test_util.h"
#include "reconstruction/colour_map_stage.h"
#include "reconstruction/log_compression_stage.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/tgc_stage.h"

using namespace umbra;

// Common practice (convention, no single source): round-trip TCG gain 2 alpha f z dB (alpha one way, dB/cm/MHz).
// 0.5 dB/cm/MHz, 5 MHz, 4 cm -> 20 dB.
TEST(display_test, tgc_gain_is_round_trip_attenuation) {
    testutil::SynthSpec s;
    s.attenuation = 0.5;
    const auto h = testutil::makeHeader(s);
    auto r = recon::defaultRecipe();
    const std::vector<double> z = {0.0, 0.01, 0.04};
    const auto g = recon::tgcGain(h, r, z);  // attenuation from the capture, f = centre frequency
    EXPECT_NEAR(20 * std::log10(g[0]), 0.0, 1e-5);
    EXPECT_NEAR(20 * std::log10(g[1]), 5.0, 1e-4);
    EXPECT_NEAR(20 * std::log10(g[2]), 20.0, 1e-4);
    r.setNumber("tgc.attenuation_db_per_cm_mhz", 0.7);
    r.setNumber("tgc.frequency_mhz", 3);
    EXPECT_NEAR(20 * std::log10(recon::tgcGain(h, r, {0.02})[0]), 2 * 0.7 * 3 * 2, 1e-4);
    r.setText("tgc.mode", "off");
    EXPECT_NEAR(recon::tgcGain(h, r, {0.04})[0], 1.0f, 1e-7);
}

// A user curve: linear between points, held beyond the ends (definition of the stage).
TEST(display_test, tgc_curve_interpolates_and_rejects_bad_text) {
    testutil::SynthSpec s;
    const auto h = testutil::makeHeader(s);
    auto r = recon::defaultRecipe();
    r.setText("tgc.mode", "curve");
    r.setText("tgc.curve", "0:0,10:6,20:12");
    const auto g = recon::tgcGain(h, r, {0.0, 0.005, 0.015, 0.03});
    EXPECT_NEAR(20 * std::log10(g[1]), 3.0, 1e-4);
    EXPECT_NEAR(20 * std::log10(g[2]), 9.0, 1e-4);
    EXPECT_NEAR(20 * std::log10(g[3]), 12.0, 1e-4);
    for (const char* bad : {"", "0:0,10", "0:0,abc:3", "10:0,5:3", "0:0,10:6dB", "0:999"}) {
        r.setText("tgc.curve", bad);
        EXPECT_THROW(recon::tgcParams(r), core::SettingError) << bad;
    }
}

// Log compression: the reference maps to 0 dB and values clip at -dynamic range
// (20 log10 amplitude ratio, common practice).
TEST(display_test, log_compression_reference_and_clip) {
    core::Frame f;
    f.x_m = {0, 1, 2, 3};
    f.z_m = {0};
    f.envelope = {2.0f, 1.0f, 0.02f, 0.0f};
    auto r = recon::defaultRecipe();
    r.setNumber("log_compression.dynamic_range_db", 30);
    auto db = recon::logCompress(f, r);
    EXPECT_NEAR(db[0], 0.0, 1e-6);
    EXPECT_NEAR(db[1], -6.0206, 1e-3);
    EXPECT_NEAR(db[2], -30.0, 1e-6);  // -40 dB clipped
    EXPECT_NEAR(db[3], -30.0, 1e-6);
    r.setText("log_compression.reference", "user");
    r.setNumber("log_compression.reference_amplitude", 1.0);
    r.setNumber("log_compression.gain_db", 3);
    db = recon::logCompress(f, r);
    EXPECT_NEAR(db[0], 0.0, 1e-6);       // +6 + 3 dB clipped to 0
    EXPECT_NEAR(db[1], 0.0, 1e-6);       // reference + 3 dB gain, clipped at 0
    r.setNumber("log_compression.gain_db", -3);
    db = recon::logCompress(f, r);
    EXPECT_NEAR(db[1], -3.0, 1e-5);
}

// The CIELAB ramps have lightness linear in the value (Kovesi 2015, arXiv:1509.03700): convert
// the 8-bit colours back to L* (CIE 15:2004, sRGB IEC 61966-2-1) and check equal steps.
TEST(display_test, lab_colour_maps_have_linear_lightness) {
    auto lstar = [](const uint8_t c[3]) {
        double lin[3];
        for (int k = 0; k < 3; ++k) {
            const double v = c[k] / 255.0;
            lin[k] = v <= 0.04045 ? v / 12.92 : std::pow((v + 0.055) / 1.055, 2.4);
        }
        const double Y = 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2];
        return Y > 0.008856 ? 116 * std::cbrt(Y) - 16 : 903.3 * Y;
    };
    for (const std::string m : {"lab_gray", "lab_heat", "lab_ice"}) {
        uint8_t c0[3], c1[3];
        recon::colourAt(m, 0, c0);
        recon::colourAt(m, 1, c1);
        const double L0 = lstar(c0), L1 = lstar(c1);
        double worst = 0;
        for (int i = 0; i <= 20; ++i) {
            uint8_t c[3];
            recon::colourAt(m, i / 20.0, c);
            worst = std::max(worst, std::fabs(lstar(c) - (L0 + (L1 - L0) * i / 20.0)));
        }
        EXPECT_GT(L1 - L0, 80) << m;
        EXPECT_LT(worst, 1.5) << m << ": L* departs from linear by " << worst;
    }
    EXPECT_THROW(recon::colourAt("no_such_map", 0.5, nullptr), core::SettingError);
}

// Every display-only parameter lives in the TCG, log-compression and colour-map stages, and
// every parameter of those stages is display-only (they never re-run delay-and-sum).
TEST(display_test, display_stages_are_display_only) {
    for (const auto& st : recon::allStages()) {
        const bool display = st.name == "tgc" || st.name == "log_compression" || st.name == "colour_map";
        for (const auto& p : st.params) EXPECT_EQ(p.display_only, display) << st.name << "." << p.name;
    }
    auto a = recon::defaultRecipe(), b = a;
    b.setNumber("log_compression.dynamic_range_db", 40);
    EXPECT_TRUE(a.differsOnlyInDisplay(b));
}
