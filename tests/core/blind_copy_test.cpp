// SPDX-License-Identifier: MIT
// Blind copy: the copy keeps the captures (path, SHA-256) and recipes and holds none of the
// first reader's strings. Reference: docs/case-file.md, every key of the case format.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <unistd.h>

#include <nlohmann/json.hpp>

#include "core/blind_copy.h"
#include "core/capture_file.h"
#include "core/error.h"

using namespace umbra::core;
namespace fs = std::filesystem;

namespace {

fs::path tempDir() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    fs::path d = fs::temp_directory_path() / ("umbra_blind_" + std::to_string(::getpid()) + "_" + info->name());
    fs::remove_all(d);
    fs::create_directories(d);
    return d;
}

std::string slurp(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

void strings(const nlohmann::json& j, std::set<std::string>& out) {
    if (j.is_string()) out.insert(j.get<std::string>());
    if (!j.is_structured()) return;
    for (const auto& [k, v] : j.items()) {
        if (j.is_object()) out.insert(k);
        strings(v, out);
    }
}

/// A case filled in every field, each text naming the first reader.
CaseDocument firstReading(const fs::path& dir) {
    CaseDocument c;
    c.title = "W-12 read by Reader Alpha";
    c.background = "Alpha background text";
    c.technique = "Alpha technique text";
    c.pertinent_negatives = {"Alpha negative one"};
    c.prior_comparison = "Alpha prior comparison";
    c.sizing_medium = "steel";
    c.speed_uncertainty_rel = 0.012;
    for (int i = 0; i < 2; ++i) {
        const fs::path cap = dir / "data" / ("capture" + std::to_string(i) + ".h5");
        fs::create_directories(cap.parent_path());
        std::ofstream(cap) << "capture bytes " << i;
        CaseCapture cc;
        cc.path = cap.string();
        cc.sha256 = fileSha256(cap.string());
        cc.recipe_json = R"({"das":{"f_number":1.5}})";
        cc.view = {4, 2.5, 3.25, 11.5, "caliper", {"T-T", "TT-T"}};
        cc.measurements.push_back({"M" + std::to_string(i + 1), MeasurementKind::Caliper, {{1, 2}, {3, 4}}, "Alpha label", 4});
        c.captures.push_back(cc);
    }
    c.active_capture = 1;
    Finding f;
    f.id = "F1";
    f.number = 1;
    f.indication.location = "Alpha location";
    f.indication.x_mm = 2.5;
    f.indication.depth_mm = 12;
    f.indication.reference = "Alpha reference";
    f.indication.measurement_ids = {"M1"};
    f.indication.description = "Alpha description";
    f.interpretation = Interpretation::Relevant;
    f.interpretation_reason = "Alpha reason";
    f.evaluation = Evaluation::Rejectable;
    f.criterion = "Alpha criterion";
    c.findings.push_back(f);
    DistanceAmplitudeCurve curve;
    curve.label = "Alpha curve label";
    curve.recipe_json = R"({"das":{"f_number":1.0}})";
    curve.points.push_back({0.005, 0.001, 812.5, "Alpha SDH", c.captures[0].sha256, 0});
    c.curve = curve;
    return c;
}

}  // namespace

TEST(BlindCopy, HoldsNoneOfTheFirstReadersStrings) {
    const fs::path dir = tempDir();
    const fs::path src = dir / "first.umbracase";
    const CaseDocument first = firstReading(dir);
    saveCase(src.string(), first);
    fs::create_directories(dir / "second");
    const fs::path dst = dir / "second" / "blind.umbracase";
    writeBlindCopy(src.string(), dst.string());
    const std::string text = slurp(dst);
    // Every string of the original file (keys and values) that is not part of the capture
    // identity, the recipe or the format must be absent from the blind copy.
    std::set<std::string> original;
    strings(nlohmann::json::parse(slurp(src)), original);
    std::set<std::string> blind_keys;
    strings(nlohmann::json::parse(text), blind_keys);
    for (const auto& s : original) {
        if (s.find("Alpha") == std::string::npos && s.find(dir.string()) == std::string::npos) continue;
        EXPECT_EQ(text.find(s), std::string::npos) << "blind copy contains \"" << s << "\"";
    }
    EXPECT_EQ(text.find("Alpha"), std::string::npos);
    EXPECT_EQ(text.find(dir.string()), std::string::npos) << "absolute paths name the first reader's folders";
    EXPECT_EQ(blind_keys.count("path_absolute"), 0u);
    // Same captures and recipes; reopens and finds them.
    const CaseDocument b = loadCase(dst.string());
    ASSERT_EQ(b.captures.size(), 2u);
    for (size_t i = 0; i < 2; ++i) {
        EXPECT_EQ(b.captures[i].sha256, first.captures[i].sha256);
        EXPECT_EQ(nlohmann::json::parse(b.captures[i].recipe_json), nlohmann::json::parse(first.captures[i].recipe_json));
        EXPECT_TRUE(b.captures[i].measurements.empty());
        EXPECT_EQ(b.captures[i].view, ViewState{});
        EXPECT_EQ(checkCapture(b.captures[i]), CaptureStatus::Ok);
    }
    EXPECT_TRUE(b.findings.empty());
    EXPECT_FALSE(b.curve);
    EXPECT_EQ(b.title, kBlindCopyTitle);
    EXPECT_TRUE(b.background.empty() && b.technique.empty() && b.prior_comparison.empty() && b.pertinent_negatives.empty());
    EXPECT_EQ(b.speed_uncertainty_rel, first.speed_uncertainty_rel);
    fs::remove_all(dir);
}

// With the captures copied beside the new case, no path leads back to the first reader's folder.
TEST(BlindCopy, CopyCapturesBesideTheNewCase) {
    const fs::path dir = tempDir();
    const fs::path src = dir / "reader1" / "first.umbracase";
    fs::create_directories(src.parent_path());
    saveCase(src.string(), firstReading(dir / "reader1"));
    const fs::path dst = dir / "reader2" / "blind.umbracase";
    fs::create_directories(dst.parent_path());
    writeBlindCopy(src.string(), dst.string(), true);
    const std::string text = slurp(dst);
    EXPECT_EQ(text.find("reader1"), std::string::npos) << text;
    const CaseDocument b = loadCase(dst.string());
    for (const auto& c : b.captures) EXPECT_EQ(checkCapture(c), CaptureStatus::Ok);
    EXPECT_TRUE(fs::exists(dir / "reader2" / "capture0.h5"));
    EXPECT_THROW(writeBlindCopy(src.string(), src.string()), InputError);  // never over the source
    fs::remove_all(dir);
}
