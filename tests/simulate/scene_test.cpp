// SPDX-License-Identifier: MIT
// Scene parsing: every demo scene parses; bad scenes are refused with a message naming the
// file and the key.
#include <gtest/gtest.h>

#include <filesystem>

#include "core/error.h"
#include "sim_test_util.h"

using namespace simtest;
using umbra::recon::sim::parseScene;

namespace {
/// Parses j and returns the error text (empty if it parsed).
std::string errorOf(const nlohmann::json& j) {
    try {
        parseScene(j.dump(), "bad_scene.json");
    } catch (const umbra::core::InputError& e) {
        EXPECT_EQ(e.file(), "bad_scene.json");
        return e.what();
    }
    return "";
}
}  // namespace

TEST(scene_test, base_scene_parses_in_si_units) {
    auto s = scene(baseScene());
    EXPECT_EQ(s.array.elements, 8);
    EXPECT_DOUBLE_EQ(s.array.pitch_m, 0.6e-3);
    EXPECT_DOUBLE_EQ(s.array.centre_frequency_hz, 5e6);
    EXPECT_DOUBLE_EQ(s.sampling.frequency_hz, 50e6);
    EXPECT_EQ(s.transmit.count(8), 8u);
    auto x = s.array.elementX();
    EXPECT_DOUBLE_EQ(x.front(), -2.1e-3);
    EXPECT_DOUBLE_EQ(x.back(), 2.1e-3);
}

TEST(scene_test, max_depth_gives_two_way_sample_count) {
    auto j = baseScene();
    j["sampling"].erase("samples");
    j["sampling"]["max_depth_mm"] = 29.6;
    auto s = scene(j);
    EXPECT_EQ(s.sampling.samples, 500u);  // 2 * 29.6 mm / 5920 m/s * 50 MHz
}

TEST(scene_test, missing_key_is_named) {
    auto j = baseScene();
    j["array"].erase("pitch_mm");
    const auto e = errorOf(j);
    EXPECT_NE(e.find("bad_scene.json"), std::string::npos) << e;
    EXPECT_NE(e.find("array.pitch_mm"), std::string::npos) << e;
    EXPECT_NE(e.find("missing"), std::string::npos) << e;
}

TEST(scene_test, negative_speed_is_refused) {
    auto j = baseScene();
    j["medium"]["speed_m_s"] = -1540;
    const auto e = errorOf(j);
    EXPECT_NE(e.find("medium.speed_m_s"), std::string::npos) << e;
}

TEST(scene_test, unknown_key_is_refused) {
    auto j = baseScene();
    j["medium"]["sped_m_s"] = 1540;
    EXPECT_NE(errorOf(j).find("medium.sped_m_s"), std::string::npos);
}

TEST(scene_test, wrong_types_and_values_are_refused) {
    auto j = baseScene();
    j["array"]["elements"] = "sixty-four";
    EXPECT_NE(errorOf(j).find("array.elements"), std::string::npos);
    j = baseScene();
    j["array"]["elements"] = 2.5;
    EXPECT_NE(errorOf(j).find("array.elements"), std::string::npos);
    j = baseScene();
    j["transmit"]["kind"] = "focused";
    EXPECT_NE(errorOf(j).find("transmit.kind"), std::string::npos);
    j = baseScene();
    j["sampling"]["frequency_mhz"] = 8;  // below Nyquist for a 5 MHz pulse
    EXPECT_NE(errorOf(j).find("sampling.frequency_mhz"), std::string::npos);
    j = baseScene();
    j["reflectors"]["points"] = {{{"position_mm", {0, 0}}}};
    EXPECT_NE(errorOf(j).find("reflectors.points[0].position_mm"), std::string::npos);
    j = baseScene();
    j["reflectors"]["back_wall"] = nlohmann::json::object();  // no depth and no thickness
    EXPECT_NE(errorOf(j).find("reflectors.back_wall.depth_mm"), std::string::npos);
    j = baseScene();
    j["speckle"] = {{"x_range_mm", {-5, 5}}, {"z_range_mm", {1, 10}}, {"density_per_mm2", 10},
                    {"regions", {{{"shape", "circle"}, {"centre_mm", {0, 5}}, {"diameter_mm", 2}, {"contrast_db", "dark"}}}}};
    EXPECT_NE(errorOf(j).find("speckle.regions[0].contrast_db"), std::string::npos);
    j = baseScene();
    j["noise"] = {{"snr_db", 40}, {"reference", "back_wall"}};  // no back wall in the scene
    EXPECT_NE(errorOf(j).find("noise.reference"), std::string::npos);
}

TEST(scene_test, absurd_sizes_are_refused_before_allocating) {
    auto j = baseScene();
    j["array"]["elements"] = 4096;
    j["sampling"]["samples"] = 4000000;
    j["frames"] = {{"kind", "encoded"}, {"count", 100000}, {"start_mm", 0}, {"step_mm", 1}};
    EXPECT_FALSE(errorOf(j).empty());
    j = baseScene();
    j["speckle"] = {{"x_range_mm", {-50, 50}}, {"z_range_mm", {1, 100}}, {"density_per_mm2", 1000}};
    EXPECT_NE(errorOf(j).find("speckle.density_per_mm2"), std::string::npos);
    j = baseScene();  // one frame of 4096 x 4096 x 100 000 samples: 6.7 TB
    j["array"]["elements"] = 4096;
    j["array"]["pitch_mm"] = 0.6;
    j["sampling"]["samples"] = 100000;
    EXPECT_NE(errorOf(j).find("sampling.samples"), std::string::npos);
    j = baseScene();  // 1 000 000 scatterers x 1024 transmits of tables (12 GB)
    j["array"]["elements"] = 1024;
    j["sampling"]["samples"] = 100;
    j["speckle"] = {{"x_range_mm", {-50, 50}}, {"z_range_mm", {1, 101}}, {"density_per_mm2", 100}};
    EXPECT_NE(errorOf(j).find("speckle.density_per_mm2"), std::string::npos);
}

TEST(scene_test, malformed_json_names_the_file) {
    try {
        parseScene("{\"title\": ", "broken.json");
        FAIL() << "no error";
    } catch (const umbra::core::InputError& e) {
        EXPECT_EQ(e.file(), "broken.json");
        EXPECT_NE(std::string(e.what()).find("JSON"), std::string::npos);
    }
    EXPECT_THROW(umbra::recon::sim::loadScene("/nonexistent/scene.json"), umbra::core::InputError);
}

TEST(scene_test, every_demo_scene_parses) {
    size_t n = 0;
    for (auto& e : std::filesystem::directory_iterator(std::string(UMBRA_SOURCE_DIR) + "/samples")) {
        const auto name = e.path().filename().string();
        if (e.path().extension() != ".json" || name.find(".answers.") != std::string::npos) continue;
        EXPECT_NO_THROW(umbra::recon::sim::loadScene(e.path().string())) << name;
        ++n;
    }
    EXPECT_GE(n, 5u);
}
