// SPDX-License-Identifier: MIT
// Hostile scenes are refused before anything is allocated or simulated, with the key named:
// cine motion that runs off to infinity, flaws kilometres long, pulses that last millions of
// samples, too many reflectors, numbers beyond the range of a double, and amplitudes that
// overflow the samples.
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <string>

#include "core/error.h"
#include "reconstruction/simulate/simulator.h"
#include "sim_test_util.h"

using namespace simtest;
using umbra::recon::sim::parseScene;

namespace {
std::string errorOf(const std::string& text) {
    try {
        parseScene(text, "hostile.json");
    } catch (const umbra::core::InputError& e) {
        EXPECT_EQ(e.file(), "hostile.json");
        return e.what();
    }
    return "";
}
std::string errorOf(const nlohmann::json& j) { return errorOf(j.dump()); }
bool has(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }
}  // namespace

TEST(scene_bounds_test, cine_motion_to_infinity_is_refused) {
    auto j = baseScene();
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 10}}, {"amplitude", 1}}};
    j["frames"] = {{"kind", "cine"}, {"count", 10}, {"interval_ms", 1e300}, {"velocity_mm_s", {1e300, 0}}};
    const auto e = errorOf(j);
    EXPECT_TRUE(has(e, "frames")) << e;
}

TEST(scene_bounds_test, ten_km_flaw_is_refused_naming_the_key) {
    auto j = baseScene();
    j["reflectors"]["planar_flaws"] = {{{"start_mm", {0, 5}}, {"end_mm", {0, 1e7}}, {"amplitude", 1}}};
    const auto e = errorOf(j);
    EXPECT_TRUE(has(e, "reflectors.planar_flaws")) << e;
}

TEST(scene_bounds_test, very_long_pulse_is_refused) {
    for (auto [f0, bw] : {std::pair{0.001, 0.6}, std::pair{5.0, 1e-6}}) {
        auto j = baseScene();
        j["array"]["centre_frequency_mhz"] = f0;
        j["array"]["fractional_bandwidth"] = bw;
        j["sampling"]["frequency_mhz"] = 50;
        const auto e = errorOf(j);
        EXPECT_FALSE(e.empty()) << f0 << " " << bw;
        EXPECT_TRUE(has(e, "array.")) << e;
    }
}

TEST(scene_bounds_test, too_many_holes_are_refused) {
    auto j = baseScene();
    nlohmann::json holes = nlohmann::json::array();
    for (size_t i = 0; i <= umbra::recon::sim::kMaxSceneHoles; ++i) holes.push_back({{"position_mm", {0, 10}}, {"diameter_mm", 1}});
    j["reflectors"]["side_drilled_holes"] = holes;
    const auto e = errorOf(j);
    EXPECT_TRUE(has(e, "side_drilled_holes")) << e;
}

// RFC 8259 allows any magnitude in the text; a double does not: the key is named.
TEST(scene_bounds_test, number_beyond_double_range_names_its_key) {
    std::string text = baseScene().dump();
    text.replace(text.find("\"pitch_mm\":0.6"), 14, "\"pitch_mm\":1e999");
    const auto e = errorOf(text);
    EXPECT_TRUE(has(e, "array.pitch_mm")) << e;
    EXPECT_TRUE(has(e, "out of range")) << e;
}

TEST(scene_bounds_test, overflowing_amplitudes_are_refused_before_writing) {
    auto j = baseScene();
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 10}}, {"amplitude", 1e308}}, {{"position_mm", {0, 0, 10}}, {"amplitude", 1e308}}};
    const auto path = (std::filesystem::temp_directory_path() / ("umbra_scene_bounds_" + std::to_string(::getpid()) + ".h5")).string();
    umbra::recon::sim::SimOptions o;
    o.threads = 1;
    o.created_utc = "2026-01-01T00:00:00Z";
    EXPECT_THROW(umbra::recon::sim::simulateToFile(scene(j), path, o), umbra::core::InputError);
    EXPECT_FALSE(std::filesystem::exists(path));
    std::error_code ec;
    std::filesystem::remove(path + ".partial", ec);
}
