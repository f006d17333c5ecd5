// SPDX-License-Identifier: MIT
// Malformed captures: one test per problem. The files are made by
// tests/core/fixtures/make_bad_captures.py (h5py, from the valid synthetic fixture of
// write_capture.py); its manifest says which HDF5 path the reader must name and a fragment
// of the message. Contract: "a reader refuses, with a message naming the path and the
// problem, any file whose shapes disagree, whose required names are missing, whose numbers
// are not finite or out of physical range, or whose version it does not know. It never
// crashes and never reads past what the header promises."
#include <gtest/gtest.h>
#include <sys/resource.h>

#include <algorithm>
#include <cctype>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>

#include "core/capture_file.h"
#include "fixtures/known_capture.h"

namespace fs = std::filesystem;
using namespace umbra;
using namespace umbra::test;

namespace {

// Every case of make_bad_captures.py, listed here so that each is its own ctest test.
const std::vector<std::string> kCases = {
    "truncated_0.001", "truncated_0.1", "truncated_0.5", "truncated_0.9", "truncated_0.999",
    "not_hdf5", "empty_file", "directory", "missing_file",
    "missing_attr__umbra_format", "missing_attr__umbra_format_version", "missing_attr__title",
    "missing_attr__created_utc", "missing_attr_array_centre_frequency_hz",
    "missing_attr_array_fractional_bandwidth", "missing_attr_array_element_width_m",
    "missing_attr_transmit_kind", "missing_attr_receive_sampling_frequency_hz",
    "missing_attr_medium_speed_of_sound_m_s", "missing_attr_medium_wedge_speed_of_sound_m_s",
    "missing_attr_medium_wedge_surface_origin_m", "missing_attr_medium_wedge_surface_tilt_rad",
    "missing_array", "missing_array_element_position_m", "missing_transmit",
    "missing_transmit_source_element", "missing_receive", "missing_receive_element_index",
    "missing_receive_start_time_s", "missing_medium", "missing_data", "missing_data_rf",
    "array_is_dataset", "rank_element_position", "shape_element_position", "rank_source_element",
    "float_source_element", "rank_element_index", "rank_start_time", "rank_rf",
    "string_centre_frequency", "string_version", "scalar_surface_origin",
    "rf_vs_transmit_count", "rf_vs_receive_count", "start_time_length", "delay_shape",
    "delay_transposed", "apodization_shape", "scan_length", "truth_length",
    "nan_element_position", "inf_element_position", "nan_start_time", "inf_start_time",
    "nan_sampling_frequency", "inf_sampling_frequency", "zero_sampling_frequency",
    "negative_sampling_frequency", "undersampled", "nan_speed", "inf_speed", "negative_speed",
    "nan_wedge_tilt", "nan_rf_scale", "zero_centre_frequency", "nan_delay",
    "format_image", "format_unknown", "version_2", "version_0", "transmit_kind_unknown",
    "plane_wave_without_angles",
    "rf_1e12_samples", "rf_1e9_frames", "element_positions_1e9", "element_positions_1e6",
    "delay_1e12", "start_time_1e9", "truth_1e9", "rf_chunk_2gib", "scan_1e9",
    "empty_transmit_list", "source_element_too_big", "source_element_negative",
    "element_index_too_big", "element_index_negative", "rf_vs_kind_follow_on",
    "rf_int32", "rf_float64", "rf_uint16", "rf_nan_sample",
};

const nlohmann::json& manifest() {
    static nlohmann::json m = [] {
        std::ifstream in(badCapturesDir() / "manifest.json");
        nlohmann::json j = nlohmann::json::array();
        if (in) in >> j;
        return j;
    }();
    return m;
}

nlohmann::json entry(const std::string& name) {
    for (auto& e : manifest())
        if (e["name"] == name) return e;
    return nullptr;
}

std::string lower(std::string s) {
    std::transform(s.begin(), s.end(), s.begin(), [](unsigned char c) { return char(std::tolower(c)); });
    return s;
}

// True if one problem is at `where` and its text contains `what` (lower case).
bool hasProblem(const std::vector<core::Problem>& ps, const std::string& where, const std::string& what) {
    for (auto& p : ps)
        if (p.where == where && lower(p.what).find(what) != std::string::npos) return true;
    return false;
}

std::string describe(const std::vector<core::Problem>& ps) {
    std::string s;
    for (auto& p : ps) s += "  [" + p.where + "] " + p.what + "\n";
    return s;
}

long peakRssMiB() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    return u.ru_maxrss / 1024;  // ru_maxrss is in KiB on Linux
}

class BadCapture : public ::testing::TestWithParam<std::string> {};

TEST_P(BadCapture, RefusedWithFileAndPathNamed) {
    const auto e = entry(GetParam());
    ASSERT_FALSE(e.is_null()) << "no case '" << GetParam() << "' in the manifest";
    const std::string file = (badCapturesDir() / e["file"].get<std::string>()).string();
    const std::string where = e["where"], what = e["what"], stage = e["stage"];

    if (stage == "open") {
        try {
            core::CaptureReader r(file);
            FAIL() << file << " was accepted";
        } catch (const core::InputError& err) {
            EXPECT_EQ(err.file(), file);
            const std::string msg = err.what();
            // "FILE: WHERE: WHAT", one line per problem.
            EXPECT_EQ(msg.rfind(file + ": ", 0), 0u) << msg;
            EXPECT_TRUE(hasProblem(err.problems(), where, what))
                << "expected [" << where << "] ~ '" << what << "', got\n" << describe(err.problems());
            size_t lines = size_t(std::count(msg.begin(), msg.end(), '\n')) + 1;
            EXPECT_EQ(lines, err.problems().size());
        }
    } else {
        EXPECT_NO_THROW(core::CaptureReader r(file));
    }
    // validate() never throws and reports the same problem.
    std::vector<core::Problem> ps;
    EXPECT_NO_THROW(ps = core::CaptureReader::validate(file));
    EXPECT_TRUE(hasProblem(ps, where, what)) << "validate: expected [" << where << "] ~ '" << what << "', got\n" << describe(ps);
    // No giant allocation on the way (the absurd headers claim up to 8 TB).
    EXPECT_LT(peakRssMiB(), 512);
}

INSTANTIATE_TEST_SUITE_P(Cases, BadCapture, ::testing::ValuesIn(kCases), [](const auto& info) {
    std::string n = info.param;
    std::replace(n.begin(), n.end(), '.', '_');
    return n;
});

TEST(BadCaptureManifest, EveryGeneratedCaseIsTested) {
    ASSERT_GT(manifest().size(), 0u);
    for (auto& e : manifest())
        EXPECT_NE(std::find(kCases.begin(), kCases.end(), e["name"].get<std::string>()), kCases.end())
            << "case " << e["name"] << " is generated but not tested";
    EXPECT_EQ(manifest().size(), kCases.size());
}

TEST(BadCaptureManifest, GoodFixtureIsAccepted) {
    // The cases are single edits of this file, so each refusal is due to its edit.
    EXPECT_TRUE(core::CaptureReader::validate((badCapturesDir() / "good.h5").string()).empty());
}

TEST(BadCaptureTruncation, OwnWriterFileCutAtEveryFortiethIsRefusedNotCrashed) {
    const fs::path dir = fs::temp_directory_path() / ("umbra_cut_" + std::to_string(::getpid()));
    fs::create_directories(dir);
    const std::string good = (dir / "good.h5").string();
    const auto h = known::header();
    {
        core::CaptureWriter w(good, h);
        std::vector<float> b(h.blockSize(), 0.25f);
        for (size_t f = 0; f < h.frames; ++f)
            for (size_t t = 0; t < h.transmits(); ++t) w.writeBlock(f, t, b.data());
        w.finish();
    }
    std::ifstream in(good, std::ios::binary);
    std::string bytes((std::istreambuf_iterator<char>(in)), {});
    ASSERT_GT(bytes.size(), 1000u);
    for (int k = 0; k < 40; ++k) {
        const size_t cut = bytes.size() * size_t(k) / 40;
        const std::string path = (dir / ("cut_" + std::to_string(cut) + ".h5")).string();
        std::ofstream(path, std::ios::binary).write(bytes.data(), std::streamsize(cut));
        auto ps = core::CaptureReader::validate(path);
        EXPECT_FALSE(ps.empty()) << "cut at " << cut << " of " << bytes.size() << " bytes accepted";
        EXPECT_THROW(core::CaptureReader r(path), core::InputError) << "cut at " << cut;
    }
    fs::remove_all(dir);
}

}  // namespace
