// SPDX-License-Identifier: MIT
// Calibration and element health against simulated captures of known speed, thickness and hole
// depths (reconstruction/simulate, docs/scene-format.md), and a capture with a deliberately
// zeroed and a deliberately weakened element. Uncertainty arithmetic against the GUM
// (JCGM 100:2008, 4.3.7 rectangular a/√3; 5.1.6 relative components of a quotient).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "core/capture_file.h"
#include "core/error.h"
#include "recon_test_util.h"
#include "reconstruction/calibration.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/simulate/scene.h"
#include "reconstruction/simulate/simulator.h"

using namespace umbra;

namespace {

// A 32-element full matrix over a plate; `extra` adds reflectors.
std::string plateScene(double c, double thickness_mm, size_t samples, const std::string& reflectors) {
    return R"J({"title": "calibration plate (synthetic)", "scenario": "calibration_test", "seed": 7,
      "array": {"elements": 32, "pitch_mm": 0.6, "element_width_mm": 0.5, "centre_frequency_mhz": 5, "fractional_bandwidth": 0.6},
      "transmit": {"kind": "single_element"},
      "sampling": {"frequency_mhz": 50, "samples": )J" +
           std::to_string(samples) + R"J(},
      "medium": {"speed_m_s": )J" + std::to_string(c) + R"J(, "thickness_mm": )J" + std::to_string(thickness_mm) + R"J(},
      "reflectors": )J" + reflectors + R"J(,
      "noise": {"snr_db": 40, "reference": "peak"}})J";
}

// Simulates the scene, applies `edit` to the traces and header, writes the capture.
template <class Edit>
std::string writeScene(const std::string& name, const std::string& scene_json, Edit edit) {
    auto sim = recon::sim::simulate(recon::sim::parseScene(scene_json, name));
    edit(sim);
    const std::string path = testutil::tempPath(name);
    core::CaptureWriter w(path, sim.header);
    for (size_t t = 0; t < sim.header.transmits(); ++t) w.writeBlock(0, t, sim.block(0, t));
    w.finish();
    return path;
}

// Scales element e's traces as transmitter and as receiver by `k`.
void scaleElement(recon::sim::SimulatedCapture& s, size_t e, float k) {
    const auto& h = s.header;
    const size_t ns = h.samples, nrx = h.receives();
    for (size_t t = 0; t < h.transmits(); ++t)
        for (size_t r = 0; r < nrx; ++r)
            if (size_t(h.transmit.source_element[t]) == e || size_t(h.receive.element_index[r]) == e) {
                float* p = s.rf.data() + (t * nrx + r) * ns;
                for (size_t j = 0; j < ns; ++j) p[j] *= k;
            }
}

const std::string kBackWall = R"J({"back_wall": {"depth_mm": 10, "amplitude": 1.0, "repeats": 1}})J";

}  // namespace

// Steel plate 10 mm, c = 5920 m/s; the record (10 µs) holds the back wall (3.378 µs) and its
// repeat (6.757 µs). The speed comes back within its expanded uncertainty, the fixed delay is
// zero within its own (the simulator's time zero is the element face).
TEST(calibration_test, speed_from_back_wall_and_repeat) {
    const auto path = writeScene("cal_plate.h5", plateScene(5920, 10, 500, kBackWall), [](auto&) {});
    core::CaptureReader cap(path);
    const auto c = recon::speedFromBackWall(cap, 10e-3, 0.02e-3);
    EXPECT_EQ(c.method, "back wall and its repeat");
    ASSERT_EQ(c.echoes.size(), 2u);
    EXPECT_NEAR(c.echoes[0].time_s, 2 * 10e-3 / 5920, 2e-9);  // 3.3784 µs (formula t = 2 d / c)
    EXPECT_NEAR(c.echoes[1].time_s, 4 * 10e-3 / 5920, 4e-9);
    const double U = c.speed.budget.expanded();
    EXPECT_LE(std::abs(c.speed.value - 5920), U) << c.speed.value << " ± " << U;
    EXPECT_LT(U, 0.005 * 5920);
    ASSERT_TRUE(c.single_echo_speed);
    EXPECT_LE(std::abs(c.single_echo_speed->value - 5920), c.single_echo_speed->budget.expanded());
    EXPECT_NEAR(c.single_echo_speed->value, 5920, 5920 * 1e-3);
    ASSERT_TRUE(c.fixed_delay);
    EXPECT_LE(std::abs(c.fixed_delay->value), std::max(c.fixed_delay->budget.expanded(), 2e-9));
    // Fixed delay at the known speed: t - 2d/c is zero within its uncertainty.
    const auto t0 = recon::fixedDelay(c.echoes[0], 10e-3, 0.02e-3, 5920, 0);
    EXPECT_LE(std::abs(t0.value), t0.budget.expanded());
}

// The speed is measured, not read from the file: a capture simulated at 6320 m/s but labelled
// 5920 m/s calibrates to 6320 m/s. Without the repeat in the record (6 µs) the single echo gives
// c = 2 d / t, and the thickness component of the budget is c (a/√3) / d (GUM 4.3.7, 5.1.6).
TEST(calibration_test, speed_is_measured_and_budget_follows_the_gum) {
    const auto path = writeScene("cal_label.h5", plateScene(6320, 10, 300, kBackWall),
                                 [](auto& s) { s.header.medium.speed_of_sound_m_s = 5920; });
    core::CaptureReader cap(path);
    const double tol = 0.1e-3;
    const auto c = recon::speedFromBackWall(cap, 10e-3, tol);
    EXPECT_EQ(c.method, "back wall");
    EXPECT_NEAR(c.speed.value, 6320, 6320 * 1e-3);
    ASSERT_EQ(c.speed.budget.components.size(), 2u);
    EXPECT_EQ(c.speed.budget.components[0].name, "thickness");
    EXPECT_NEAR(c.speed.budget.components[0].standard, c.speed.value * (tol / std::sqrt(3.0)) / 10e-3, 1e-9);
    EXPECT_NEAR(c.speed.budget.expanded(), 2 * std::hypot(c.speed.budget.components[0].standard, c.speed.budget.components[1].standard),
                1e-9);
    EXPECT_LE(std::abs(c.speed.value - 6320), c.speed.budget.expanded());
}

// Two Ø2 mm side-drilled holes at 5 and 10 mm depth: c = 2 (z2 - z1) / (t2 - t1).
TEST(calibration_test, speed_from_two_holes) {
    const std::string holes =
        R"J({"side_drilled_holes": [{"centre_mm": [-4, 5], "diameter_mm": 2}, {"centre_mm": [3.7, 10], "diameter_mm": 2}]})J";
    const auto path = writeScene("cal_holes.h5", plateScene(5920, 30, 600, holes), [](auto&) {});
    core::CaptureReader cap(path);
    const auto c = recon::speedFromHoles(cap, 5e-3, 10e-3, 0.02e-3);
    EXPECT_EQ(c.method, "two holes");
    ASSERT_EQ(c.echoes.size(), 2u);
    // Near-surface echo of a hole: t = 2 (z - a) / c (docs/scene-format.md, side-drilled holes).
    EXPECT_NEAR(c.echoes[0].time_s, 2 * (5e-3 - 1e-3) / 5920, 5e-9);
    EXPECT_NEAR(c.echoes[1].time_s, 2 * (10e-3 - 1e-3) / 5920, 5e-9);
    EXPECT_LE(std::abs(c.speed.value - 5920), c.speed.budget.expanded()) << c.speed.value;
    EXPECT_NEAR(c.speed.value, 5920, 5920 * 0.005);
}

// The demo reference block (samples/reference_block.json: Ø2.5 mm holes at 5, 10, 15, 20 mm
// staggered in x, back wall at 25 mm, 5920 m/s): every pair of holes gives the speed, although
// the shallower holes' oblique echoes and the back wall fall near the deeper holes' times.
TEST(calibration_test, reference_block_holes_in_any_pair) {
    const std::string scene = std::string(UMBRA_TEST_DIR) + "/../../samples/reference_block.json";
    const auto path = testutil::tempPath("cal_block.h5");
    recon::sim::simulateToFile(recon::sim::loadScene(scene), path);
    core::CaptureReader cap(path);
    for (auto [z1, z2] : {std::pair{5.0, 10.0}, {10.0, 15.0}, {15.0, 20.0}, {5.0, 20.0}}) {
        const auto c = recon::speedFromHoles(cap, z1 * 1e-3, z2 * 1e-3, 0.02e-3);
        // Echo from the near surface: t = 2 (z - 1.25 mm) / c.
        EXPECT_NEAR(c.echoes[0].time_s, 2 * (z1 - 1.25) * 1e-3 / 5920, 5e-9) << z1;
        EXPECT_NEAR(c.echoes[1].time_s, 2 * (z2 - 1.25) * 1e-3 / 5920, 5e-9) << z2;
        EXPECT_LE(std::abs(c.speed.value - 5920), c.speed.budget.expanded()) << z1 << ", " << z2 << ": " << c.speed.value;
    }
}

// Element 5 (index 4) zeroed, element 12 (index 11) at 0.3 (-10.5 dB) as transmitter and
// receiver: 5 is dead, 12 weak, no other element flagged.
TEST(calibration_test, dead_and_weak_elements_are_found) {
    const auto path = writeScene("cal_elements.h5", plateScene(5920, 10, 500, kBackWall), [](auto& s) {
        scaleElement(s, 4, 0.0f);
        scaleElement(s, 11, 0.3f);
    });
    core::CaptureReader cap(path);
    const auto h = recon::elementHealth(cap);
    ASSERT_EQ(h.elements.size(), 32u);
    EXPECT_TRUE(h.transmit_known);
    EXPECT_EQ(h.flagged(), (std::vector<int>{4, 11}));
    EXPECT_EQ(h.elements[4].status, recon::ElementStatus::Dead);
    EXPECT_EQ(h.elements[11].status, recon::ElementStatus::Weak);
    // Transmit energy of element 12: its own event scaled by 0.3 (0.09 for its own receive
    // channel): close to 20 log10(0.3) = -10.5 dB re the median.
    EXPECT_NEAR(h.elements[11].transmit_db, 20 * std::log10(0.3), 1.0);
    EXPECT_EQ(recon::elementListText(h.flagged()), "5, 12");
    // The speed calibration ignores both (their peaks are more than 12 dB down or absent).
    const auto c = recon::speedFromBackWall(cap, 10e-3, 0.02e-3);
    EXPECT_LE(c.echoes[0].elements, 31u);
    EXPECT_LE(std::abs(c.speed.value - 5920), c.speed.budget.expanded());
    // An intact capture flags nothing.
    const auto ok = writeScene("cal_elements_ok.h5", plateScene(5920, 10, 500, kBackWall), [](auto&) {});
    EXPECT_TRUE(recon::elementHealth(core::CaptureReader(ok)).flagged().empty());
}

TEST(calibration_test, element_lists_parse_and_print) {
    EXPECT_EQ(recon::parseElementList("3, 17-19"), (std::vector<int>{2, 16, 17, 18}));
    EXPECT_EQ(recon::parseElementList(""), std::vector<int>{});
    EXPECT_EQ(recon::parseElementList(" 5 ,5,4"), (std::vector<int>{3, 4}));
    EXPECT_EQ(recon::elementListText({2, 16, 17, 18}), "3, 17-19");
    for (const char* bad : {"0", "x", "3-1", "3,,4", "2-", "1.5"}) EXPECT_THROW(recon::parseElementList(bad), core::SettingError) << bad;
}

// Excluding a dead element restores the amplitude: each pixel is the weighted mean of its terms
// (das_stage.h), so a zeroed element that keeps its weight pulls a point's peak down, and with
// its weight set to 0 the peak reads as with every element working (analytic point echoes of
// constant amplitude, recon_test_util.h).
TEST(calibration_test, excluded_elements_get_zero_weight) {
    testutil::SynthSpec s;
    s.elements = 32;
    s.pitch = 0.3e-3;
    s.c = 5920;
    s.fs = 50e6;
    s.samples = 600;
    const std::vector<testutil::Point> pts{{0.0, 6e-3, 1.0}};
    const auto good = testutil::tempPath("excl_good.h5");
    testutil::writePointCapture(good, s, pts);
    // The same capture with element 16 (index 15, under the point) silenced.
    const auto dead = testutil::tempPath("excl_dead.h5");
    {
        core::CaptureReader in(good);
        core::CaptureHeader h = in.header();
        core::CaptureWriter w(dead, h);
        std::vector<float> b(h.blockSize());
        for (size_t t = 0; t < h.transmits(); ++t) {
            in.readBlock(0, t, b.data());
            for (size_t r = 0; r < h.receives(); ++r)
                if (t == 15 || r == 15) std::fill(b.begin() + long(r * h.samples), b.begin() + long((r + 1) * h.samples), 0.0f);
            w.writeBlock(0, t, b.data());
        }
        w.finish();
    }
    auto peak = [](const std::string& path, const std::string& excluded) {
        core::Recipe r(recon::allStages());
        r.setNumber("das.f_number", 1.0);
        r.setText("das.excluded_elements", excluded);
        testutil::setRegion(r, -1, 1, 5, 7, 0.02);
        core::CaptureReader cap(path);
        recon::Reconstructor rec(cap, r, 2);
        return testutil::framePeak(rec.run(0)).v;
    };
    const double v_good = peak(good, ""), v_dead = peak(dead, ""), v_excl = peak(dead, "16");
    EXPECT_LT(v_dead, 0.97 * v_good);
    EXPECT_NEAR(v_excl / v_good, 1.0, 0.01);
    // A number beyond the array is refused naming the parameter.
    try {
        peak(good, "40");
        FAIL();
    } catch (const core::SettingError& e) {
        EXPECT_NE(std::string(e.what()).find("das.excluded_elements"), std::string::npos);
    }
}

TEST(calibration_test, bad_requests_are_clear_errors) {
    const auto path = writeScene("cal_bad.h5", plateScene(5920, 10, 120, kBackWall), [](auto&) {});
    core::CaptureReader cap(path);
    EXPECT_THROW(recon::speedFromBackWall(cap, -1e-3, 0), core::SettingError);
    // 120 samples = 2.4 µs: a 10 mm back wall (3.4 µs) is beyond the record.
    try {
        recon::speedFromBackWall(cap, 10e-3, 0.02e-3);
        FAIL();
    } catch (const core::InputError& e) {
        EXPECT_NE(std::string(e.what()).find(path), std::string::npos);
    }
    EXPECT_THROW(recon::speedFromHoles(cap, 5e-3, 5e-3, 0), core::SettingError);
}
