// SPDX-License-Identifier: MIT
// Reconstructed image file (umbra_format "image", version 1): round trip of every name of the
// contract (/image/envelope [N_frames, N_z, N_x] float32, /image/x_m, /image/z_m, root attrs
// recipe_json and capture_sha256), and refusal of files that are not image files.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <stdexcept>
#include <chrono>
#include <iterator>
#include <mutex>
#include <thread>

#include "core/capture_file.h"
#include "core/detail/h5.h"
#include "core/error.h"
#include "core/frame.h"
#include "fixtures/known_capture.h"

namespace fs = std::filesystem;
using namespace umbra::core;

namespace {

struct TempDir {
    fs::path path = fs::temp_directory_path() /
                    ("umbra_img_" + std::to_string(::getpid()) + "_" +
                     ::testing::UnitTest::GetInstance()->current_test_info()->name());
    TempDir() { fs::create_directories(path); }
    ~TempDir() { std::error_code ec; fs::remove_all(path, ec); }
    std::string file(const std::string& n) const { return (path / n).string(); }
};

ImageStack sampleStack() {
    ImageStack s;
    s.x_m = {-2e-3, -1e-3, 0.0, 1e-3, 2e-3};
    s.z_m = {5e-3, 6e-3, 7e-3};
    s.frames = 2;
    for (size_t i = 0; i < s.frames * s.z_m.size() * s.x_m.size(); ++i) s.envelope.push_back(0.5f * float(i) + 0.125f);
    s.recipe_json = R"({"das":{"f_number":2.0}})";
    s.capture_sha256 = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";
    return s;
}

TEST(ImageFile, RoundTrip) {
    TempDir d;
    const auto s = sampleStack();
    const std::string path = d.file("img.h5");
    writeImageFile(path, s);
    EXPECT_FALSE(fs::exists(path + ".partial"));
    const auto r = readImageFile(path);
    EXPECT_EQ(r.x_m, s.x_m);
    EXPECT_EQ(r.z_m, s.z_m);
    EXPECT_EQ(r.frames, s.frames);
    EXPECT_EQ(r.envelope, s.envelope);
    EXPECT_EQ(r.recipe_json, s.recipe_json);
    EXPECT_EQ(r.capture_sha256, s.capture_sha256);
    // Frame i is the i-th [N_z][N_x] slab, row-major.
    const Frame f = r.frame(1);
    EXPECT_EQ(f.frame_index, 1u);
    EXPECT_EQ(f.nx(), 5u);
    EXPECT_EQ(f.nz(), 3u);
    EXPECT_EQ(f.at(2, 4), s.envelope[15 + 2 * 5 + 4]);
    EXPECT_EQ(f.peak(), s.envelope.back());
}

TEST(ImageFile, WriterRefusesInconsistentSizes) {
    TempDir d;
    auto s = sampleStack();
    s.envelope.pop_back();
    EXPECT_THROW(writeImageFile(d.file("bad.h5"), s), InputError);
    EXPECT_FALSE(fs::exists(d.file("bad.h5")));
}

TEST(ImageFile, ReaderRefusesOtherFilesNamingThem) {
    TempDir d;
    const std::string text = d.file("notes.txt");
    std::ofstream(text) << "not an image\n";
    try {
        readImageFile(text);
        FAIL();
    } catch (const InputError& e) {
        EXPECT_EQ(e.file(), text);
    }
    // A capture is not an image.
    const std::string cap = (umbra::test::badCapturesDir() / "good.h5").string();
    try {
        readImageFile(cap);
        FAIL();
    } catch (const InputError& e) {
        EXPECT_EQ(e.file(), cap);
        EXPECT_NE(std::string(e.what()).find("/@umbra_format"), std::string::npos) << e.what();
    }
    EXPECT_THROW(readImageFile(d.file("missing.h5")), InputError);
    EXPECT_THROW(readImageFile(d.path.string()), InputError);
}

// Replaces /image/envelope by a chunked float32 dataset of the given shape whose chunks are
// never written: the file stays tiny whatever the shape claims.
void replaceEnvelope(const std::string& path, std::vector<hsize_t> dims) {
    using namespace umbra::core::detail;
    std::lock_guard lock(hdf5Mutex());
    Hid f(H5Fopen(path.c_str(), H5F_ACC_RDWR, H5P_DEFAULT));
    ASSERT_TRUE(f.valid());
    ASSERT_GE(H5Ldelete(f.get(), "/image/envelope", H5P_DEFAULT), 0);
    Hid sp(H5Screate_simple(int(dims.size()), dims.data(), nullptr));
    Hid dcpl(H5Pcreate(H5P_DATASET_CREATE));
    std::vector<hsize_t> chunk(dims.size(), 1);
    chunk.back() = dims.back();
    H5Pset_chunk(dcpl.get(), int(chunk.size()), chunk.data());
    Hid ds(H5Dcreate2(f.get(), "/image/envelope", H5T_IEEE_F32LE, sp.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT));
    ASSERT_TRUE(ds.valid());
}

std::string imageErrorOf(const std::string& path) {
    try {
        readImageFile(path);
    } catch (const InputError& e) {
        EXPECT_EQ(e.file(), path);
        return e.what();
    }
    return "";
}

TEST(ImageFile, ShapeAgainstAxesAndAbsurdSizesRefusedBeforeReading) {
    TempDir d;
    const std::string path = d.file("img.h5");
    writeImageFile(path, sampleStack());
    replaceEnvelope(path, {2, 4, 5});  // N_z should be 3
    EXPECT_NE(imageErrorOf(path).find("/image/envelope: shape does not match"), std::string::npos) << imageErrorOf(path);
    replaceEnvelope(path, {2, 3});
    EXPECT_NE(imageErrorOf(path).find("/image/envelope"), std::string::npos);
    // 2^31 frames of 3 x 5 pixels: 120 GiB claimed by a file of a few kB.
    replaceEnvelope(path, {hsize_t(1) << 31, 3, 5});
    EXPECT_LT(fs::file_size(path), 100000u);
    EXPECT_NE(imageErrorOf(path).find("too large"), std::string::npos) << imageErrorOf(path);
    // 2^20 frames (60 MiB, under the size limit) of which nothing was written: reading them
    // back as fill values would take long; the reader says the data is missing instead, and
    // so does the header read (the header check the workstation and the CLI run first).
    replaceEnvelope(path, {hsize_t(1) << 20, 3, 5});
    EXPECT_NE(imageErrorOf(path).find("never written"), std::string::npos) << imageErrorOf(path);
    EXPECT_THROW(readImageFileHeader(path), InputError);
}

// The contract says /image/x_m and /image/z_m are pixel centres; a file whose axes are not
// finite and increasing cannot be drawn or measured on, so the reader refuses it by name.
TEST(ImageFile, AxesMustBeFiniteAndIncreasing) {
    TempDir d;
    auto s = sampleStack();
    s.x_m[2] = s.x_m[1];  // repeated centre
    writeImageFile(d.file("repeat.h5"), s);
    EXPECT_NE(imageErrorOf(d.file("repeat.h5")).find("/image/x_m: pixel centres must be strictly increasing"), std::string::npos)
        << imageErrorOf(d.file("repeat.h5"));
    s = sampleStack();
    s.z_m[1] = std::nan("");
    writeImageFile(d.file("nan.h5"), s);
    EXPECT_NE(imageErrorOf(d.file("nan.h5")).find("/image/z_m: non-finite"), std::string::npos) << imageErrorOf(d.file("nan.h5"));
    s = sampleStack();
    s.frames = 0;
    s.envelope.clear();
    writeImageFile(d.file("empty.h5"), s);
    EXPECT_NE(imageErrorOf(d.file("empty.h5")).find("no frames"), std::string::npos) << imageErrorOf(d.file("empty.h5"));
}

// ImageWriter appends frame by frame into a chunked dataset, one chunk per frame (HDF5 User's
// Guide, "Chunking in HDF5": a chunk is the unit of I/O, so a frame is written without the
// others in memory), and the result reads back exactly as the whole stack written at once.
TEST(ImageFile, WriterAppendsOneFramePerChunk) {
    TempDir d;
    const auto s = sampleStack();
    const std::string path = d.file("appended.h5");
    {
        ImageWriter w(path, s.x_m, s.z_m, s.recipe_json);
        const size_t n = s.x_m.size() * s.z_m.size();
        for (size_t i = 0; i < s.frames; ++i) {
            w.append(s.envelope.data() + i * n, n);
            EXPECT_TRUE(fs::exists(path + ".partial"));
            EXPECT_FALSE(fs::exists(path));
        }
        EXPECT_EQ(w.frames(), s.frames);
        w.setCaptureSha256(s.capture_sha256);
        w.finish();
    }
    EXPECT_FALSE(fs::exists(path + ".partial"));
    const auto r = readImageFile(path);
    EXPECT_EQ(r.frames, s.frames);
    EXPECT_EQ(r.envelope, s.envelope);
    EXPECT_EQ(r.capture_sha256, s.capture_sha256);
    const auto h = readImageFileHeader(path);
    EXPECT_EQ(h.frames, s.frames);
    EXPECT_TRUE(h.envelope.empty());
    EXPECT_EQ(h.recipe_json, s.recipe_json);
    using namespace umbra::core::detail;
    std::lock_guard lock(hdf5Mutex());
    Hid f(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT));
    Hid ds(H5Dopen2(f.get(), "/image/envelope", H5P_DEFAULT));
    Hid dcpl(H5Dget_create_plist(ds.get()));
    hsize_t chunk[3] = {0, 0, 0};
    ASSERT_EQ(H5Pget_chunk(dcpl.get(), 3, chunk), 3);
    EXPECT_EQ(chunk[0], 1u);
    EXPECT_EQ(chunk[1], s.z_m.size());
    EXPECT_EQ(chunk[2], s.x_m.size());
}

TEST(ImageFile, WriterRefusesWrongFrameSizeAndLeavesNothingUnfinished) {
    TempDir d;
    const auto s = sampleStack();
    const std::string path = d.file("unfinished.h5");
    {
        ImageWriter w(path, s.x_m, s.z_m, s.recipe_json);
        EXPECT_THROW(w.append(s.envelope.data(), 3), InputError);
        w.append(s.envelope.data(), s.x_m.size() * s.z_m.size());
    }  // never finished: nothing left behind
    EXPECT_FALSE(fs::exists(path));
    EXPECT_FALSE(fs::exists(path + ".partial"));
    EXPECT_THROW(ImageWriter(d.file("none.h5"), {}, s.z_m, s.recipe_json), InputError);
    EXPECT_THROW(ImageWriter((d.path / "no_such_folder" / "x.h5").string(), s.x_m, s.z_m, s.recipe_json), InputError);
}

// Same content, written at different times: the same bytes (no object timestamps), so batch
// outputs can be compared byte for byte.
TEST(ImageFile, SameContentSameBytes) {
    TempDir d;
    const auto s = sampleStack();
    writeImageFile(d.file("a.h5"), s);
    std::this_thread::sleep_for(std::chrono::milliseconds(1100));  // a different second for any timestamp
    writeImageFile(d.file("b.h5"), s);
    auto bytes = [](const std::string& p) {
        std::ifstream in(p, std::ios::binary);
        return std::string(std::istreambuf_iterator<char>(in), {});
    };
    const auto a = bytes(d.file("a.h5")), b = bytes(d.file("b.h5"));
    ASSERT_FALSE(a.empty());
    EXPECT_TRUE(a == b);
}

TEST(ImageFile, FrameOutsideTheStackIsRefused) {
    const auto s = sampleStack();
    EXPECT_NO_THROW(s.frame(s.frames - 1));
    EXPECT_THROW(s.frame(s.frames), std::out_of_range);
}

}  // namespace
