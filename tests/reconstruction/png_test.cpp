// SPDX-License-Identifier: MIT
// PNG export read back by an independent reader (fixtures/read_png.py: Python's zlib and struct
// after the PNG specification, ISO/IEC 15948): valid chunks and CRCs, 8-bit RGB, the canvas size,
// a white margin and the top of the colour bar in the colour map's brightest colour; a file that
// cannot be created is an InputError naming it, and no temporary file is left behind.
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <string>

#include "core/error.h"
#include "recon_test_util.h"
#include "reconstruction/pipeline.h"

using namespace umbra;

namespace {

std::string run(const std::string& cmd) {
    std::string out;
    if (FILE* p = ::popen(cmd.c_str(), "r")) {
        char buf[256];
        while (std::fgets(buf, sizeof buf, p)) out += buf;
        if (::pclose(p) != 0) out = "failed: " + out;
    }
    return out;
}

core::Frame smallFrame() {
    core::Frame f;
    for (int i = 0; i < 100; ++i) f.x_m.push_back(-5e-3 + i * 1e-4);
    for (int i = 0; i < 80; ++i) f.z_m.push_back(1e-3 + i * 1e-4);
    f.envelope.assign(100 * 80, 0.01f);
    f.envelope[40 * 100 + 50] = 1.0f;
    return f;
}

}  // namespace

TEST(png_test, written_png_reads_back_with_an_independent_decoder) {
    const std::string path = testutil::tempPath("frame.png");
    const core::Recipe r = recon::defaultRecipe();
    recon::writePng(path, smallFrame(), r, "synthetic test frame");
    EXPECT_FALSE(std::filesystem::exists(path + ".partial"));
    const std::string reader = std::string(UMBRA_TEST_DIR) + "/fixtures/read_png.py";
    // Pixel (0, 0): the white margin of the canvas.
    const std::string corner = run("/usr/bin/python3 " + reader + " " + path + " 0 0");
    int w = 0, h = 0, cr = 0, cg = 0, cb = 0;
    ASSERT_EQ(std::sscanf(corner.c_str(), "%d %d %d,%d,%d", &w, &h, &cr, &cg, &cb), 5) << corner;
    // 100 x 80 pixels scaled up by min(4, 640 / 100) = 4 plus margins 70 + 110 and 46 + 50.
    EXPECT_EQ(w, 400 + 70 + 110);
    EXPECT_EQ(h, 320 + 46 + 50);
    EXPECT_EQ(cr, 255);
    EXPECT_EQ(cg, 255);
    EXPECT_EQ(cb, 255);
    // Top row of the colour bar (x = 70 + 400 + 18 + 9, y = 46): the map at t = 1.
    const std::string bar = run("/usr/bin/python3 " + reader + " " + path + " " + std::to_string(70 + 400 + 18 + 9) + " 46");
    ASSERT_EQ(std::sscanf(bar.c_str(), "%d %d %d,%d,%d", &w, &h, &cr, &cg, &cb), 5) << bar;
    uint8_t top[3];
    recon::colourAt(r.text("colour_map.map"), 1.0, top);
    EXPECT_EQ(cr, top[0]);
    EXPECT_EQ(cg, top[1]);
    EXPECT_EQ(cb, top[2]);
}

TEST(png_test, unwritable_path_is_an_input_error) {
    EXPECT_THROW(recon::writePng("/nonexistent-dir/frame.png", smallFrame(), recon::defaultRecipe(), "t"), core::InputError);
}
