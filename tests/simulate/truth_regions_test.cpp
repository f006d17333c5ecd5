// SPDX-License-Identifier: MIT
// /truth@regions_json (capture format v1, optional addition): the simulator lists a scene's
// speckle regions (cysts, ellipses, tubes) with their true sizes; CaptureWriter writes the
// string, CaptureReader reads it back, an independent HDF5 reader (Debian's h5py) sees the same
// JSON, and a non-string attribute is refused with a message naming the attribute.
// Expected values are the scene file's own numbers converted to metres by hand.
#include <gtest/gtest.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>

#include "core/capture_file.h"
#include "core/error.h"
#include "sim_test_util.h"

using namespace simtest;
namespace fs = std::filesystem;

namespace {
std::string tempFile(const std::string& name) {
    const auto dir = fs::temp_directory_path() / ("umbra_sim_truth_" + std::to_string(::getpid()));
    fs::create_directories(dir);
    return (dir / name).string();
}

nlohmann::json speckleScene() {
    auto j = baseScene();
    j["sampling"]["samples"] = 400;
    j["speckle"] = nlohmann::json::parse(R"JSON({
      "x_range_mm": [-3, 3], "z_range_mm": [2, 6], "density_per_mm2": 2,
      "regions": [
        {"label": "cyst", "shape": "circle", "centre_mm": [-1, 3], "diameter_mm": 4, "contrast_db": "anechoic"},
        {"label": "oval", "shape": "ellipse", "centre_mm": [1.5, 4], "axes_mm": [3, 1.2], "angle_deg": 30, "contrast_db": -12},
        {"label": "vessel", "shape": "tube", "start_mm": [-2, 5], "end_mm": [2, 5], "diameter_mm": 1, "contrast_db": 6}
      ]})JSON");
    return j;
}

const nlohmann::json* byLabel(const nlohmann::json& list, const std::string& label) {
    for (auto& r : list)
        if (r.value("label", "") == label) return &r;
    return nullptr;
}
}  // namespace

TEST(truth_regions_test, simulator_lists_every_speckle_region_with_its_size) {
    const auto h = umbra::recon::sim::makeHeader(scene(speckleScene()));
    ASSERT_TRUE(h.truth) << "a speckle-only scene still carries /truth for its regions";
    EXPECT_TRUE(h.truth->scatterer_position_m.empty());
    const auto list = nlohmann::json::parse(h.truth->regions_json);
    ASSERT_TRUE(list.is_array());
    ASSERT_EQ(list.size(), 3u);

    const auto* c = byLabel(list, "cyst");
    ASSERT_TRUE(c);
    EXPECT_EQ((*c)["kind"], "circle");
    EXPECT_NEAR((*c)["centre_m"][0].get<double>(), -1e-3, 1e-12);
    EXPECT_NEAR((*c)["centre_m"][1].get<double>(), 3e-3, 1e-12);
    EXPECT_NEAR((*c)["diameter_m"].get<double>(), 4e-3, 1e-12);
    EXPECT_TRUE((*c)["anechoic"].get<bool>());
    EXPECT_TRUE((*c)["echogenicity_db"].is_null());

    const auto* e = byLabel(list, "oval");
    ASSERT_TRUE(e);
    EXPECT_EQ((*e)["kind"], "ellipse");
    EXPECT_NEAR((*e)["axes_m"][0].get<double>(), 3e-3, 1e-12);  // full lengths, as in the scene file
    EXPECT_NEAR((*e)["axes_m"][1].get<double>(), 1.2e-3, 1e-12);
    EXPECT_NEAR((*e)["angle_deg"].get<double>(), 30, 1e-9);
    EXPECT_FALSE((*e)["anechoic"].get<bool>());
    EXPECT_NEAR((*e)["echogenicity_db"].get<double>(), -12, 1e-12);

    const auto* t = byLabel(list, "vessel");
    ASSERT_TRUE(t);
    EXPECT_EQ((*t)["kind"], "tube");
    EXPECT_NEAR((*t)["centre_m"][0].get<double>(), 0, 1e-12);
    EXPECT_NEAR((*t)["centre_m"][1].get<double>(), 5e-3, 1e-12);
    EXPECT_NEAR((*t)["start_m"][0].get<double>(), -2e-3, 1e-12);
    EXPECT_NEAR((*t)["end_m"][0].get<double>(), 2e-3, 1e-12);
    EXPECT_NEAR((*t)["diameter_m"].get<double>(), 1e-3, 1e-12);
    EXPECT_NEAR((*t)["angle_deg"].get<double>(), 0, 1e-9);  // axis along +x
    EXPECT_NEAR((*t)["echogenicity_db"].get<double>(), 6, 1e-12);
}

TEST(truth_regions_test, scene_without_regions_writes_no_regions) {
    auto j = baseScene();
    j["reflectors"]["points"] = {{{"position_mm", {0, 0, 5}}, {"amplitude", 1}}};
    const auto h = umbra::recon::sim::makeHeader(scene(j));
    ASSERT_TRUE(h.truth);
    EXPECT_TRUE(h.truth->regions_json.empty());
}

TEST(truth_regions_test, round_trip_through_the_capture_file) {
    const auto sc = scene(speckleScene());
    const auto path = tempFile("regions.h5");
    umbra::recon::sim::SimOptions o;
    o.threads = 1;
    o.created_utc = "2026-01-01T00:00:00Z";
    umbra::recon::sim::simulateToFile(sc, path, o);
    const auto written = umbra::recon::sim::makeHeader(sc, o).truth->regions_json;
    {
        umbra::core::CaptureReader r(path);
        ASSERT_TRUE(r.header().truth);
        EXPECT_EQ(r.header().truth->regions_json, written);
    }
    // An independent reader sees a string attribute holding the same JSON list.
    const auto out = tempFile("regions_h5py.json");
    const std::string cmd = "/usr/bin/python3 -c \"import h5py,sys; a=h5py.File(sys.argv[1],'r')['truth'].attrs['regions_json']; "
                            "open(sys.argv[2],'w').write(a.decode() if isinstance(a, bytes) else str(a))\" '" +
                            path + "' '" + out + "'";
    ASSERT_EQ(std::system(cmd.c_str()), 0);
    std::ifstream in(out);
    EXPECT_EQ(nlohmann::json::parse(in), nlohmann::json::parse(written));

    // A number where the string belongs is refused, naming the attribute.
    const std::string bad = "/usr/bin/python3 -c \"import h5py,sys; g=h5py.File(sys.argv[1],'r+')['truth']; "
                            "del g.attrs['regions_json']; g.attrs['regions_json']=3.5\" '" +
                            path + "'";
    ASSERT_EQ(std::system(bad.c_str()), 0);
    try {
        umbra::core::CaptureReader r(path);
        FAIL() << "a numeric regions_json was accepted";
    } catch (const umbra::core::InputError& e) {
        EXPECT_NE(std::string(e.what()).find("regions_json"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("string"), std::string::npos) << e.what();
    }
    fs::remove_all(fs::path(path).parent_path());
}
