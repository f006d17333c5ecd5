// SPDX-License-Identifier: MIT
// Bad recipe values are clear errors (SettingError naming the setting) and the CLI exits 2.
#include <gtest/gtest.h>
#include <sys/wait.h>

#include <cstdlib>

#include "recon_test_util.h"
#include "reconstruction/pipeline.h"

using namespace umbra;

namespace {
std::string smallCapture() {
    static const std::string path = [] {
        testutil::SynthSpec s;
        s.elements = 8;
        s.samples = 400;
        const auto p = testutil::tempPath("small.h5");
        testutil::writePointCapture(p, s, {{0, 4e-3, 1}});
        return p;
    }();
    return path;
}

template <class F>
std::string errorOf(F f) {
    try {
        f();
    } catch (const core::SettingError& e) {
        return e.what();
    }
    return "";
}

int cli(const std::string& args) {
    const std::string cmd = std::string(UMBRA_BINARY_DIR) + "/bin/umbra-cli reconstruct " + args + " >/dev/null 2>&1";
    const int rc = std::system(cmd.c_str());
    return WIFEXITED(rc) ? WEXITSTATUS(rc) : -1;
}
}  // namespace

TEST(recipe_errors_test, each_bad_value_is_a_setting_error_naming_it) {
    auto r = recon::defaultRecipe();
    EXPECT_NE(errorOf([&] { r.set("delay_model.speed_of_sound_m_s", "-1480"); }).find("speed_of_sound"), std::string::npos);
    EXPECT_NE(errorOf([&] { r.set("das.f_number", "0"); }).find("f_number"), std::string::npos);
    EXPECT_NE(errorOf([&] { r.set("das.f_number", "-2"); }).find("f_number"), std::string::npos);

    core::CaptureReader cap(smallCapture());
    auto empty = recon::defaultRecipe();
    empty.setNumber("grid.x_min_mm", 5);
    empty.setNumber("grid.x_max_mm", 5);
    EXPECT_NE(errorOf([&] { recon::resolveGrid(cap.header(), empty); }).find("empty"), std::string::npos);
    auto huge = recon::defaultRecipe();  // 1000 mm x 1000 mm at 0.03 mm: 1.1e9 pixels
    huge.setNumber("grid.x_min_mm", -500);
    huge.setNumber("grid.x_max_mm", 500);
    huge.setNumber("grid.z_min_mm", 0.1);
    huge.setNumber("grid.z_max_mm", 1000);
    huge.setNumber("grid.step_mm", 0.03);
    EXPECT_NE(errorOf([&] { recon::Reconstructor rec(cap, huge, 1); }).find("Mpx"), std::string::npos);
    // A speed of sound below any real medium is refused when resolved.
    auto slow = recon::defaultRecipe();
    slow.setNumber("delay_model.speed_of_sound_m_s", 5);
    EXPECT_NE(errorOf([&] { recon::Reconstructor rec(cap, slow, 1); }).find("speed of sound"), std::string::npos);
}

TEST(recipe_errors_test, cli_exits_2_for_bad_settings_and_0_for_good_ones) {
    const auto cap = smallCapture();
    const auto out = testutil::tempPath("cli_out.h5");
    EXPECT_EQ(cli(cap + " -o " + out + " --set delay_model.speed_of_sound_m_s=-1540"), 2);
    EXPECT_EQ(cli(cap + " -o " + out + " --set das.f_number=0"), 2);
    EXPECT_EQ(cli(cap + " -o " + out + " --grid-mm 5:5:1:6:0.1"), 2);
    EXPECT_EQ(cli(cap + " -o " + out + " --grid-mm -500:500:0.1:1000:0.03"), 2);
    EXPECT_EQ(cli(cap + " -o " + out + " --set tgc.curve=0:0,nope"), 2);
    EXPECT_EQ(cli(cap + " -o " + out + " --set no_such.setting=1"), 2);
    EXPECT_EQ(cli(cap + " -o " + out + " --frames 7"), 2);
    EXPECT_EQ(cli(std::string("/nonexistent/capture.h5 -o ") + out), 2);
    EXPECT_EQ(cli(cap), 2);  // -o missing
    EXPECT_EQ(cli(cap + " -o " + out + " --grid-mm -3:3:1:6:0.05 --png " + testutil::tempPath("cli.png")), 0);
    const auto img = core::readImageFile(out);
    EXPECT_EQ(img.frames, 1u);
    EXPECT_EQ(img.capture_sha256, core::fileSha256(cap));
    EXPECT_NE(img.recipe_json.find("f_number"), std::string::npos);
}
