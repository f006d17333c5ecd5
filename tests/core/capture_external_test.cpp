// SPDX-License-Identifier: MIT
// Interchange with an independent HDF5 writer/reader (h5py, Debian's python3-h5py):
// a capture written by tests/core/fixtures/write_capture.py is read by CaptureReader, and a
// capture written by CaptureWriter is checked by tests/core/fixtures/check_capture.py.
// Reference for every name, shape and unit: the capture file contract (capture format v1).
#include <gtest/gtest.h>

#include <filesystem>

#include "core/capture_file.h"
#include "fixtures/known_capture.h"

namespace fs = std::filesystem;
using namespace umbra;
using namespace umbra::test;

TEST(CaptureExternal, ReaderReadsEveryFieldWrittenByH5py) {
    const std::string path = (badCapturesDir() / "good.h5").string();
    ASSERT_TRUE(fs::exists(path));
    core::CaptureReader r(path);
    const auto& h = r.header();
    EXPECT_EQ(h.title, known::title);
    EXPECT_EQ(h.created_utc, known::created_utc);
    ASSERT_EQ(h.array.elementCount(), known::n_el);
    for (size_t i = 0; i < known::n_el; ++i) {
        EXPECT_DOUBLE_EQ(h.array.element_position_m[i][0], known::elementX(i));
        EXPECT_EQ(h.array.element_position_m[i][1], 0.0);
        EXPECT_EQ(h.array.element_position_m[i][2], 0.0);
    }
    EXPECT_NEAR(h.array.pitch_m(), known::pitch_m, 1e-15);
    EXPECT_EQ(h.array.centre_frequency_hz, known::centre_frequency_hz);
    EXPECT_EQ(h.array.fractional_bandwidth, known::fractional_bandwidth);
    EXPECT_EQ(h.array.element_width_m, known::element_width_m);
    ASSERT_TRUE(h.array.element_height_m);
    EXPECT_EQ(*h.array.element_height_m, known::element_height_m);

    EXPECT_EQ(h.transmit.kind, core::TransmitKind::SingleElement);
    EXPECT_EQ(h.transmit.source_element, known::source_element);
    ASSERT_EQ(h.transmits(), known::n_tx);
    ASSERT_EQ(h.transmit.delay_s.size(), known::n_tx * known::n_el);
    ASSERT_EQ(h.transmit.apodization.size(), known::n_tx * known::n_el);
    for (size_t t = 0; t < known::n_tx; ++t)
        for (size_t e = 0; e < known::n_el; ++e) {
            EXPECT_EQ(h.transmit.delay_s[t * known::n_el + e], known::delay(t, e));
            EXPECT_EQ(h.transmit.apodization[t * known::n_el + e], known::apodization(t, e));
        }

    ASSERT_EQ(h.receives(), known::n_el);
    for (size_t i = 0; i < known::n_el; ++i) EXPECT_EQ(h.receive.element_index[i], int32_t(i));
    EXPECT_EQ(h.receive.sampling_frequency_hz, known::sampling_frequency_hz);
    EXPECT_EQ(h.receive.start_time_s, known::start_time_s);

    EXPECT_EQ(h.medium.speed_of_sound_m_s, known::speed_of_sound_m_s);
    EXPECT_EQ(h.medium.shear_speed_m_s, known::shear_speed_m_s);
    EXPECT_EQ(h.medium.attenuation_db_per_cm_mhz, known::attenuation_db_per_cm_mhz);
    EXPECT_EQ(h.medium.thickness_m, known::thickness_m);
    ASSERT_TRUE(h.medium.wedge);
    EXPECT_EQ(h.medium.wedge->speed_of_sound_m_s, known::wedge_speed_m_s);
    EXPECT_EQ(h.medium.wedge->surface_origin_m, known::wedge_origin_m);
    EXPECT_EQ(h.medium.wedge->surface_tilt_rad, known::wedge_tilt_rad);

    ASSERT_TRUE(h.scan);
    EXPECT_EQ(h.scan->position_m, known::scan_position_m);
    EXPECT_EQ(h.scan->time_s, known::scan_time_s);
    ASSERT_TRUE(h.truth);
    EXPECT_EQ(h.truth->scatterer_position_m, known::truth_position_m);
    EXPECT_EQ(h.truth->scatterer_amplitude, known::truth_amplitude);
    EXPECT_EQ(h.truth->frame, "specimen");
    EXPECT_EQ(h.provenance.at("part_id"), "SYN-0001");
    EXPECT_EQ(h.provenance.at("scenario"), "external-writer fixture");
    EXPECT_TRUE(h.isSynthetic());

    EXPECT_EQ(h.frames, known::n_frames);
    EXPECT_EQ(h.samples, known::n_samples);
    EXPECT_EQ(h.sample_type, core::SampleType::Int16);
    EXPECT_EQ(h.rf_scale, known::rf_scale);
    EXPECT_EQ(h.rf_units, "V");

    // Every block, scale applied: value = count * scale (counts and scale are exact in float
    // to well within one part in 2^24).
    std::vector<float> block(h.blockSize());
    for (size_t f = 0; f < known::n_frames; ++f)
        for (size_t t = 0; t < known::n_tx; ++t) {
            r.readBlock(f, t, block.data());
            for (size_t rx = 0; rx < known::n_el; ++rx)
                for (size_t s = 0; s < known::n_samples; ++s)
                    ASSERT_FLOAT_EQ(block[rx * known::n_samples + s], float(known::rfCount(f, t, rx, s) * known::rf_scale))
                        << "frame " << f << " transmit " << t << " receive " << rx << " sample " << s;
        }
    EXPECT_TRUE(core::CaptureReader::validate(path).empty());
}

TEST(CaptureExternal, H5pyReadsWriterFileWithContractNames) {
    const fs::path dir = fs::temp_directory_path() / ("umbra_ext_" + std::to_string(::getpid()));
    fs::create_directories(dir);
    const std::string path = (dir / "written_by_umbra.h5").string();
    const auto h = known::header();
    {
        core::CaptureWriter w(path, h);
        std::vector<float> block(h.blockSize());
        for (size_t f = 0; f < h.frames; ++f)
            for (size_t t = 0; t < h.transmits(); ++t) {
                for (size_t rx = 0; rx < h.receives(); ++rx)
                    for (size_t s = 0; s < h.samples; ++s)
                        block[rx * h.samples + s] = float(known::rfCount(f, t, rx, s) * known::rf_scale);
                w.writeBlock(f, t, block.data());
            }
        w.finish();
    }
    EXPECT_EQ(runPython(fixtureScript("check_capture.py"), "'" + path + "'"), 0);
    fs::remove_all(dir);
}
