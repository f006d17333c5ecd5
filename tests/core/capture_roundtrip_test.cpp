// SPDX-License-Identifier: MIT
// CaptureWriter -> CaptureReader round trip of every field of the capture file contract
// (capture format v1): root attributes, /array (with and without the optional height),
// each /transmit kind with delay_s and apodization, /receive, /medium with its optional
// attributes and wedge, /scan, /truth with its frame and regions_json attributes, /provenance, and /data/rf as
// int16 with a scale and as float32. All data are synthetic.
#include <gtest/gtest.h>

#include <cmath>
#include <atomic>
#include <filesystem>
#include <thread>

#include "core/capture_file.h"
#include "core/frame.h"

namespace fs = std::filesystem;
using namespace umbra::core;

namespace {

struct TempDir {
    fs::path path;
    TempDir() {
        path = fs::temp_directory_path() / ("umbra_rt_" + std::to_string(::getpid()) + "_" +
                                            ::testing::UnitTest::GetInstance()->current_test_info()->name());
        fs::create_directories(path);
    }
    ~TempDir() { std::error_code ec; fs::remove_all(path, ec); }
    std::string file(const std::string& n) const { return (path / n).string(); }
};

// A synthetic header using every field; the numbers are arbitrary but distinct so that a
// swapped field shows.
CaptureHeader fullHeader(TransmitKind kind, SampleType type) {
    CaptureHeader h;
    h.title = "Round trip — synthetic, UTF-8 µ";
    h.created_utc = "2026-12-01T10:20:30Z";
    const size_t nel = 6, ntx = 3;
    for (size_t i = 0; i < nel; ++i) h.array.element_position_m.push_back({(double(i) - 2.5) * 0.3e-3, 1e-6 * double(i), -2e-6});
    h.array.centre_frequency_hz = 7.5e6;
    h.array.fractional_bandwidth = 0.72;
    h.array.element_width_m = 0.28e-3;
    h.array.element_height_m = 7e-3;
    h.transmit.kind = kind;
    switch (kind) {
        case TransmitKind::SingleElement: h.transmit.source_element = {5, 0, 3}; break;
        case TransmitKind::PlaneWave: h.transmit.angle_rad = {-0.2, 0.0, 0.35}; break;
        case TransmitKind::VirtualSource: h.transmit.virtual_source_m = {{-1e-3, 0, -5e-3}, {0, 0, -6e-3}, {1e-3, 0.5e-3, 20e-3}}; break;
    }
    for (size_t t = 0; t < ntx; ++t)
        for (size_t e = 0; e < nel; ++e) {
            h.transmit.delay_s.push_back(1e-9 * double(7 * t + e) + 1e-12);
            h.transmit.apodization.push_back(0.125f * float((t + e) % 8));
        }
    h.receive.element_index = {5, 4, 3, 2};
    h.receive.sampling_frequency_hz = 40e6;
    h.receive.start_time_s = {0.5e-6, 0.75e-6, -0.25e-6};
    h.medium.speed_of_sound_m_s = 1480.5;
    h.medium.shear_speed_m_s = 3100.25;
    h.medium.attenuation_db_per_cm_mhz = 0.5;
    h.medium.thickness_m = 0.025;
    h.medium.wedge = WedgeInfo{2337.0, {0.001, -0.002, 0.0125}, -0.3};
    h.scan = ScanInfo{{0.0, 0.5e-3}, {0.0, 0.02}};
    h.truth.emplace();
    h.truth->scatterer_position_m = {{0, 0, 0.01}, {2e-3, 0, 0.02}, {-1e-3, 0, 0.015}};
    h.truth->scatterer_amplitude = {1.0, 0.25, 0.5};
    h.truth->frame = "array";
    h.truth->regions_json = R"([{"kind":"disc","centre_m":[0,0,0.02],"diameter_m":0.004}])";
    h.provenance = {{"part_id", "SYN-RT-7"}, {"operator", "test operator (synthetic)"}, {"scenario", "round trip"}};
    h.frames = 2;
    h.samples = 50;
    h.sample_type = type;
    h.rf_scale = type == SampleType::Int16 ? 0.25e-3 : 2.0;
    h.rf_units = type == SampleType::Int16 ? "V" : "a.u.";
    return h;
}

// Physical value written for sample s: for int16 an exact multiple of the scale so that the
// quantised round trip is exact.
float sampleValue(const CaptureHeader& h, size_t f, size_t t, size_t r, size_t s) {
    const double counts = double(int(f * 700 + t * 90 + r * 11 + s) - 400);
    return h.sample_type == SampleType::Int16 ? float(counts * h.rf_scale) : float(counts * 0.01);
}

void writeAll(const std::string& path, const CaptureHeader& h) {
    CaptureWriter w(path, h);
    std::vector<float> b(h.blockSize());
    for (size_t f = 0; f < h.frames; ++f)
        for (size_t t = 0; t < h.transmits(); ++t) {
            for (size_t r = 0; r < h.receives(); ++r)
                for (size_t s = 0; s < h.samples; ++s) b[r * h.samples + s] = sampleValue(h, f, t, r, s);
            w.writeBlock(f, t, b.data());
        }
    w.finish();
}

void expectSameHeader(const CaptureHeader& a, const CaptureHeader& b) {
    EXPECT_EQ(a.title, b.title);
    EXPECT_EQ(a.created_utc, b.created_utc);
    EXPECT_EQ(a.array.element_position_m, b.array.element_position_m);
    EXPECT_EQ(a.array.centre_frequency_hz, b.array.centre_frequency_hz);
    EXPECT_EQ(a.array.fractional_bandwidth, b.array.fractional_bandwidth);
    EXPECT_EQ(a.array.element_width_m, b.array.element_width_m);
    EXPECT_EQ(a.array.element_height_m, b.array.element_height_m);
    EXPECT_EQ(a.transmit.kind, b.transmit.kind);
    EXPECT_EQ(a.transmit.source_element, b.transmit.source_element);
    EXPECT_EQ(a.transmit.angle_rad, b.transmit.angle_rad);
    EXPECT_EQ(a.transmit.virtual_source_m, b.transmit.virtual_source_m);
    EXPECT_EQ(a.transmit.delay_s, b.transmit.delay_s);
    EXPECT_EQ(a.transmit.apodization, b.transmit.apodization);
    EXPECT_EQ(a.receive.element_index, b.receive.element_index);
    EXPECT_EQ(a.receive.sampling_frequency_hz, b.receive.sampling_frequency_hz);
    EXPECT_EQ(a.receive.start_time_s, b.receive.start_time_s);
    EXPECT_EQ(a.medium.speed_of_sound_m_s, b.medium.speed_of_sound_m_s);
    EXPECT_EQ(a.medium.shear_speed_m_s, b.medium.shear_speed_m_s);
    EXPECT_EQ(a.medium.attenuation_db_per_cm_mhz, b.medium.attenuation_db_per_cm_mhz);
    EXPECT_EQ(a.medium.thickness_m, b.medium.thickness_m);
    ASSERT_EQ(a.medium.wedge.has_value(), b.medium.wedge.has_value());
    if (a.medium.wedge) {
        EXPECT_EQ(a.medium.wedge->speed_of_sound_m_s, b.medium.wedge->speed_of_sound_m_s);
        EXPECT_EQ(a.medium.wedge->surface_origin_m, b.medium.wedge->surface_origin_m);
        EXPECT_EQ(a.medium.wedge->surface_tilt_rad, b.medium.wedge->surface_tilt_rad);
    }
    ASSERT_EQ(a.scan.has_value(), b.scan.has_value());
    if (a.scan) {
        EXPECT_EQ(a.scan->position_m, b.scan->position_m);
        EXPECT_EQ(a.scan->time_s, b.scan->time_s);
    }
    ASSERT_EQ(a.truth.has_value(), b.truth.has_value());
    if (a.truth) {
        EXPECT_EQ(a.truth->scatterer_position_m, b.truth->scatterer_position_m);
        EXPECT_EQ(a.truth->scatterer_amplitude, b.truth->scatterer_amplitude);
        EXPECT_EQ(a.truth->frame, b.truth->frame);
        EXPECT_EQ(a.truth->regions_json, b.truth->regions_json);
    }
    EXPECT_EQ(a.provenance, b.provenance);
    EXPECT_EQ(a.frames, b.frames);
    EXPECT_EQ(a.samples, b.samples);
    EXPECT_EQ(a.sample_type, b.sample_type);
    EXPECT_EQ(a.rf_scale, b.rf_scale);
    EXPECT_EQ(a.rf_units, b.rf_units);
}

struct Case {
    TransmitKind kind;
    SampleType type;
};

class CaptureRoundTrip : public ::testing::TestWithParam<Case> {};

TEST_P(CaptureRoundTrip, EveryFieldAndEverySampleSurvives) {
    TempDir dir;
    const auto h = fullHeader(GetParam().kind, GetParam().type);
    const std::string path = dir.file("rt.h5");
    writeAll(path, h);
    EXPECT_FALSE(fs::exists(path + ".partial"));
    CaptureReader r(path);
    expectSameHeader(r.header(), h);
    EXPECT_EQ(r.path(), path);
    std::vector<float> b(h.blockSize());
    for (size_t f = 0; f < h.frames; ++f)
        for (size_t t = 0; t < h.transmits(); ++t) {
            r.readBlock(f, t, b.data());
            for (size_t rx = 0; rx < h.receives(); ++rx)
                for (size_t s = 0; s < h.samples; ++s)
                    ASSERT_FLOAT_EQ(b[rx * h.samples + s], sampleValue(h, f, t, rx, s)) << f << "," << t << "," << rx << "," << s;
        }
    // readFrame = the blocks of one frame in transmit order.
    auto frame1 = r.readFrame(1);
    ASSERT_EQ(frame1.size(), h.transmits() * h.blockSize());
    EXPECT_FLOAT_EQ(frame1[2 * h.blockSize() + 3 * h.samples + 7], sampleValue(h, 1, 2, 3, 7));
    EXPECT_TRUE(CaptureReader::validate(path).empty());
}

INSTANTIATE_TEST_SUITE_P(KindsAndTypes, CaptureRoundTrip,
                         ::testing::Values(Case{TransmitKind::SingleElement, SampleType::Int16},
                                           Case{TransmitKind::SingleElement, SampleType::Float32},
                                           Case{TransmitKind::PlaneWave, SampleType::Int16},
                                           Case{TransmitKind::PlaneWave, SampleType::Float32},
                                           Case{TransmitKind::VirtualSource, SampleType::Int16},
                                           Case{TransmitKind::VirtualSource, SampleType::Float32}),
                         [](const auto& info) {
                             return std::string(toString(info.param.kind)) +
                                    (info.param.type == SampleType::Int16 ? "_int16" : "_float32");
                         });

TEST(CaptureRoundTripOptional, AbsentOptionalsStayAbsent) {
    TempDir dir;
    auto h = fullHeader(TransmitKind::PlaneWave, SampleType::Float32);
    h.array.element_height_m.reset();
    h.transmit.delay_s.clear();
    h.transmit.apodization.clear();
    h.medium.shear_speed_m_s.reset();
    h.medium.attenuation_db_per_cm_mhz.reset();
    h.medium.thickness_m.reset();
    h.medium.wedge.reset();
    h.scan.reset();
    h.truth.reset();
    h.provenance.clear();
    h.rf_scale = 1.0;
    h.rf_units.clear();
    const std::string path = dir.file("minimal.h5");
    writeAll(path, h);
    CaptureReader r(path);
    expectSameHeader(r.header(), h);
    EXPECT_FALSE(r.header().isSynthetic());
}

TEST(CaptureRoundTripOptional, Int16QuantisesRoundsAndSaturates) {
    // Writer contract: int16 counts = round(value / scale), saturating at the int16 range.
    TempDir dir;
    auto h = fullHeader(TransmitKind::SingleElement, SampleType::Int16);
    h.frames = 1;
    h.scan.reset();
    h.rf_scale = 0.5;
    const std::string path = dir.file("q.h5");
    std::vector<float> in(h.blockSize(), 0.0f);
    in[0] = 1e9f;      // saturates to 32767 counts
    in[1] = -1e9f;     // saturates to -32768 counts
    in[2] = 1.3f;      // 2.6 counts -> 3
    in[3] = -1.2f;     // -2.4 counts -> -2
    in[4] = 16383.5f;  // 32767 counts exactly
    {
        CaptureWriter w(path, h);
        for (size_t t = 0; t < h.transmits(); ++t) w.writeBlock(0, t, in.data());
        w.finish();
    }
    CaptureReader r(path);
    std::vector<float> out(h.blockSize());
    r.readBlock(0, 1, out.data());
    EXPECT_EQ(out[0], 32767 * 0.5f);
    EXPECT_EQ(out[1], -32768 * 0.5f);
    EXPECT_EQ(out[2], 1.5f);
    EXPECT_EQ(out[3], -1.0f);
    EXPECT_EQ(out[4], 16383.5f);
}

TEST(CaptureRoundTripOptional, UnfinishedWriterLeavesNoFile) {
    TempDir dir;
    const std::string path = dir.file("never.h5");
    {
        CaptureWriter w(path, fullHeader(TransmitKind::SingleElement, SampleType::Float32));
        EXPECT_TRUE(fs::exists(path + ".partial"));
    }
    EXPECT_FALSE(fs::exists(path));
    EXPECT_FALSE(fs::exists(path + ".partial"));
}

TEST(CaptureRoundTripOptional, WriterRefusesBadHeaderNamingTheFile) {
    TempDir dir;
    auto h = fullHeader(TransmitKind::SingleElement, SampleType::Float32);
    h.receive.start_time_s.pop_back();
    const std::string path = dir.file("bad.h5");
    try {
        CaptureWriter w(path, h);
        FAIL() << "bad header accepted";
    } catch (const InputError& e) {
        EXPECT_EQ(e.file(), path);
        EXPECT_NE(std::string(e.what()).find("/receive/start_time_s"), std::string::npos) << e.what();
    }
    EXPECT_FALSE(fs::exists(path + ".partial"));
}

TEST(CaptureRoundTripOptional, BlocksOutsideTheCaptureAreRefused) {
    TempDir dir;
    const auto h = fullHeader(TransmitKind::SingleElement, SampleType::Float32);
    const std::string path = dir.file("rt.h5");
    writeAll(path, h);
    CaptureReader r(path);
    std::vector<float> b(h.blockSize());
    EXPECT_THROW(r.readBlock(h.frames, 0, b.data()), InputError);
    EXPECT_THROW(r.readBlock(0, h.transmits(), b.data()), InputError);
    CaptureWriter w(dir.file("w.h5"), h);
    EXPECT_THROW(w.writeBlock(0, h.transmits(), b.data()), InputError);
}

TEST(CaptureRoundTripOptional, FileShaMatchesTheBytes) {
    // SHA-256 of a file is the SHA-256 of its bytes: "abc" -> FIPS 180-2 appendix B.1 digest.
    TempDir dir;
    const std::string path = dir.file("abc.bin");
    { FILE* f = std::fopen(path.c_str(), "wb"); std::fputs("abc", f); std::fclose(f); }
    EXPECT_EQ(fileSha256(path), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    EXPECT_THROW(fileSha256(dir.file("missing.bin")), InputError);
}

TEST(CaptureRoundTripOptional, ReadersInThreadsAndImageWritesDoNotInterfere) {
    // HDF5 (Debian's serial build) is not thread-safe; the core serialises every call. Two
    // readers in two threads and an image writer in a third must all see correct data.
    TempDir dir;
    const auto h = fullHeader(TransmitKind::PlaneWave, SampleType::Int16);
    const std::string path = dir.file("shared.h5");
    writeAll(path, h);
    std::atomic<int> bad{0};
    auto reader = [&] {
        CaptureReader r(path);
        std::vector<float> b(h.blockSize());
        for (int rep = 0; rep < 50; ++rep)
            for (size_t f = 0; f < h.frames; ++f)
                for (size_t t = 0; t < h.transmits(); ++t) {
                    r.readBlock(f, t, b.data());
                    if (b[3 * h.samples + 9] != sampleValue(h, f, t, 3, 9)) ++bad;
                }
    };
    auto imager = [&] {
        ImageStack s;
        s.x_m = {0.0, 1e-3};
        s.z_m = {1e-3};
        s.frames = 1;
        s.envelope = {1.0f, 2.0f};
        for (int i = 0; i < 20; ++i) {
            const std::string p = dir.file("img" + std::to_string(i) + ".h5");
            writeImageFile(p, s);
            if (readImageFile(p).envelope != s.envelope) ++bad;
        }
    };
    std::thread a(reader), b(reader), c(imager);
    a.join();
    b.join();
    c.join();
    EXPECT_EQ(bad.load(), 0);
}

}  // namespace
