// SPDX-License-Identifier: MIT
// DICOM ultrasound images: core::readDicomFile / readDicomBuffer / writeDicomFile.
// Inputs come from pydicom (tests/app/fixtures/make_dicom.py, Debian's python3-pydicom); the
// expected calibration is the Sequence of Ultrasound Regions definition (DICOM PS3.3 C.8.5.5):
// x = ReferencePixelPhysicalValueX + (column - RegionLocationMinX0 - ReferencePixelX0) x
// PhysicalDeltaX, in cm (PhysicalUnitsXDirection 3), likewise depth.
#include <gtest/gtest.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>

#include "core/dicom_image.h"
#include "core/error.h"

namespace fs = std::filesystem;
using namespace umbra;

namespace {
// Values of tests/app/fixtures/make_dicom.py.
constexpr size_t kRows = 120, kCols = 160, kX0 = 10, kY0 = 8, kX1 = 149, kY1 = 111, kRefX0 = 70, kRefY0 = 0;
constexpr double kRefXcm = 0.0, kRefYcm = 0.5, kDXcm = 0.02, kDYcm = 0.015;
int value(size_t f, size_t r, size_t c, size_t s = 0) { return int((7 * r + 3 * c + 11 * f + 50 * s) % 256); }

struct TempDir {
    fs::path dir;
    TempDir() {
        const auto* t = ::testing::UnitTest::GetInstance()->current_test_info();
        dir = fs::temp_directory_path() / ("umbra_dicom_" + std::to_string(::getpid()) + "_" + t->name());
        fs::remove_all(dir);
        fs::create_directories(dir);
    }
    ~TempDir() { fs::remove_all(dir); }
    std::string operator/(const std::string& n) const { return (dir / n).string(); }
};

// Writes a fixture with pydicom: make_dicom.write(path, **kwargs).
void pydicomWrite(const std::string& path, const std::string& kwargs) {
    const std::string fixtures = std::string(UMBRA_SOURCE_DIR) + "/tests/app/fixtures";
    const std::string cmd = "/usr/bin/python3 -B -c \"import sys; sys.path.insert(0, '" + fixtures +
                            "'); import make_dicom as m; m.write('" + path + "'" + (kwargs.empty() ? "" : ", " + kwargs) + ")\"";
    ASSERT_EQ(std::system(cmd.c_str()), 0) << cmd;
}

std::vector<uint8_t> bytesOf(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    return {std::istreambuf_iterator<char>(in), {}};
}
}  // namespace

TEST(DicomImage, CalibrationFromUltrasoundRegionWrittenByPydicom) {
    TempDir t;
    const std::string p = t / "multi.dcm";
    pydicomWrite(p, "frames=4");
    const auto img = core::readDicomFile(p);
    EXPECT_EQ(img.rows, kRows);
    EXPECT_EQ(img.columns, kCols);
    EXPECT_EQ(img.frames, 4u);
    EXPECT_EQ(img.samples, 1u);
    ASSERT_TRUE(img.calibration);
    const auto& c = *img.calibration;
    EXPECT_EQ(c.col0, kX0);
    EXPECT_EQ(c.row0, kY0);
    EXPECT_EQ(c.cols, kX1 - kX0 + 1);
    EXPECT_EQ(c.rows, kY1 - kY0 + 1);
    EXPECT_NEAR(c.dx_m, kDXcm * 1e-2, 1e-15);
    EXPECT_NEAR(c.dz_m, kDYcm * 1e-2, 1e-15);
    // PS3.3 C.8.5.5: the reference pixel is relative to the region's upper left corner.
    EXPECT_NEAR(c.x0_m, (kRefXcm - double(kRefX0) * kDXcm) * 1e-2, 1e-15);
    EXPECT_NEAR(c.z0_m, (kRefYcm - double(kRefY0) * kDYcm) * 1e-2, 1e-15);
    ASSERT_TRUE(img.frame_time_s);
    EXPECT_NEAR(*img.frame_time_s, 33.3e-3, 1e-12);  // FrameTime 33.3 ms in the fixture
    EXPECT_TRUE(img.synthetic);
    for (size_t f = 0; f < 4; ++f)
        for (size_t r = 0; r < kRows; r += 13)
            for (size_t col = 0; col < kCols; col += 17) ASSERT_EQ(img.grey(f, r, col), value(f, r, col));
    const auto st = img.toImageStack();
    EXPECT_FALSE(st.axes_in_pixels);
    ASSERT_EQ(st.x_m.size(), kX1 - kX0 + 1);
    EXPECT_NEAR(st.x_m[kRefX0], kRefXcm * 1e-2, 1e-15);  // the reference pixel sits at its physical value
    EXPECT_NEAR(st.z_m[kRefY0], kRefYcm * 1e-2, 1e-15);
}

TEST(DicomImage, RgbLuminanceAndMonochromeOne) {
    TempDir t;
    pydicomWrite(t / "rgb.dcm", "frames=2, samples=3");
    const auto rgb = core::readDicomFile(t / "rgb.dcm");
    ASSERT_EQ(rgb.samples, 3u);
    // ITU-R BT.601 luma: 0.299 R + 0.587 G + 0.114 B.
    EXPECT_NEAR(rgb.grey(1, 5, 7), 0.299 * value(1, 5, 7, 0) + 0.587 * value(1, 5, 7, 1) + 0.114 * value(1, 5, 7, 2), 1e-9);
    pydicomWrite(t / "m1.dcm", "photometric='MONOCHROME1'");
    const auto m1 = core::readDicomFile(t / "m1.dcm");
    EXPECT_EQ(m1.grey(0, 3, 4), 255 - value(0, 3, 4));  // MONOCHROME1: 0 is white (PS3.3 C.7.6.3.1.2)
}

TEST(DicomImage, WithoutRegionIsUncalibratedPixels) {
    TempDir t;
    pydicomWrite(t / "n.dcm", "regions=False");
    const auto img = core::readDicomFile(t / "n.dcm");
    EXPECT_FALSE(img.calibration);
    EXPECT_NE(img.calibration_note.find("no Sequence of Ultrasound Regions"), std::string::npos);
    const auto st = img.toImageStack();
    EXPECT_TRUE(st.axes_in_pixels);
    EXPECT_EQ(st.x_m.size(), kCols);
    EXPECT_EQ(st.x_m.back(), double(kCols - 1));
}

TEST(DicomImage, WriteThenReadKeepsGridAndPixels) {
    TempDir t;
    std::vector<double> x, z;
    for (int i = 0; i < 50; ++i) x.push_back(-5e-3 + i * 0.2e-3);
    for (int i = 0; i < 40; ++i) z.push_back(2e-3 + i * 0.25e-3);
    std::vector<uint8_t> px(3 * x.size() * z.size());
    for (size_t i = 0; i < px.size(); ++i) px[i] = uint8_t(i * 31 % 251);
    core::DicomExportInfo info;
    info.title = "grid test";
    info.synthetic = true;
    info.frame_time_s = 0.05;
    core::writeDicomFile(t / "o.dcm", x, z, 3, 1, px, info);
    EXPECT_FALSE(fs::exists(t / "o.dcm.partial"));
    const auto back = core::readDicomFile(t / "o.dcm");
    ASSERT_TRUE(back.calibration);
    EXPECT_EQ(back.frames, 3u);
    EXPECT_EQ(back.pixels, px);
    ASSERT_TRUE(back.frame_time_s);
    EXPECT_NEAR(*back.frame_time_s, 0.05, 1e-9);
    const auto st = back.toImageStack();
    ASSERT_EQ(st.x_m.size(), x.size());
    for (size_t i = 0; i < x.size(); ++i) EXPECT_NEAR(st.x_m[i], x[i], 1e-12);
    for (size_t i = 0; i < z.size(); ++i) EXPECT_NEAR(st.z_m[i], z[i], 1e-12);
    EXPECT_TRUE(back.synthetic);
    std::vector<double> uneven = x;
    uneven[10] += 0.05e-3;
    EXPECT_THROW(core::writeDicomFile(t / "u.dcm", uneven, z, 3, 1, px, info), core::SettingError);
}

TEST(DicomImage, BufferAndFileAgree) {
    TempDir t;
    pydicomWrite(t / "a.dcm", "frames=2, samples=3, implicit=True");
    const auto bytes = bytesOf(t / "a.dcm");
    const auto a = core::readDicomFile(t / "a.dcm");
    const auto b = core::readDicomBuffer(bytes.data(), bytes.size(), "mem");
    EXPECT_EQ(a.pixels, b.pixels);
    ASSERT_TRUE(b.calibration);
    EXPECT_EQ(a.calibration->x0_m, b.calibration->x0_m);
}

// Damaged bytes: every truncation point and scattered byte changes of a valid file are either
// read or refused with InputError; nothing else escapes (the fuzz entry point's contract).
TEST(DicomImage, DamagedBytesGiveInputErrorOnly) {
    TempDir t;
    pydicomWrite(t / "g.dcm", "frames=2");
    const auto good = bytesOf(t / "g.dcm");
    size_t refused = 0;
    for (size_t cut = 0; cut < good.size(); cut += (cut < 1200 ? 7 : 997)) {
        try {
            core::readDicomBuffer(good.data(), cut, "cut");
        } catch (const core::InputError&) {
            ++refused;
        }
        EXPECT_EQ(core::fuzzDicomBuffer(good.data(), cut), 0);
    }
    EXPECT_GT(refused, 100u);
    uint32_t seed = 12345;
    for (int k = 0; k < 400; ++k) {
        auto b = good;
        for (int j = 0; j < 4; ++j) {
            seed = seed * 1664525u + 1013904223u;  // Numerical Recipes LCG
            b[(seed >> 8) % std::min<size_t>(b.size(), 1400)] = uint8_t(seed >> 24);
        }
        EXPECT_EQ(core::fuzzDicomBuffer(b.data(), b.size()), 0);
    }
}

// A pixel data element claiming nearly 4 GiB in a small buffer, and a header claiming more
// pixels than the limit: refused with a message, without allocating what they claim.
TEST(DicomImage, ClaimedSizesAreBoundedBeforeAllocation) {
    TempDir t;
    pydicomWrite(t / "g.dcm", "");
    auto b = bytesOf(t / "g.dcm");
    // Find the Pixel Data tag (7FE0,0010) OB, explicit VR little endian: tag, "OB", 2 reserved, 4-byte length.
    const uint8_t tag[] = {0xE0, 0x7F, 0x10, 0x00, 'O', 'B', 0, 0};
    auto it = std::search(b.begin(), b.end(), std::begin(tag), std::end(tag));
    ASSERT_NE(it, b.end());
    const size_t len_at = size_t(it - b.begin()) + 8;
    b[len_at] = 0xF0, b[len_at + 1] = 0xFF, b[len_at + 2] = 0xFF, b[len_at + 3] = 0xFF;
    EXPECT_THROW(core::readDicomBuffer(b.data(), b.size(), "long"), core::InputError);
}
