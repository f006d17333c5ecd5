// SPDX-License-Identifier: MIT
// The case file: round trip of every field, atomic save, capture checks by SHA-256, relative
// capture paths, and clear errors for bad files.
#include <gtest/gtest.h>
#include <sys/resource.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "core/capture_file.h"
#include "core/case_file.h"
#include "core/error.h"

using namespace umbra::core;
namespace fs = std::filesystem;

namespace {

class TempDir {
public:
    TempDir() {
        const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
        path_ = fs::temp_directory_path() /
                ("umbra-case-" + std::to_string(::getpid()) + "-" + info->name());
        fs::remove_all(path_);
        fs::create_directories(path_);
    }
    ~TempDir() {
        std::error_code ec;
        fs::permissions(path_, fs::perms::owner_all, fs::perm_options::add, ec);
        fs::remove_all(path_, ec);
    }
    const fs::path& path() const { return path_; }

private:
    fs::path path_;
};

void writeFile(const fs::path& p, const std::string& bytes) {
    fs::create_directories(p.parent_path());
    std::ofstream(p, std::ios::binary) << bytes;
}

std::string readFile(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

// A case with every field set to something other than its default. The capture "files" are
// synthetic bytes: the case only records their path and hash.
CaseDocument fullCase(const fs::path& dir) {
    const fs::path cap1 = dir / "data" / "weld-synthetic.h5";
    const fs::path cap2 = dir / "data" / "block-synthetic.h5";
    writeFile(cap1, "synthetic capture bytes one");
    writeFile(cap2, "synthetic capture bytes two");

    CaseDocument d;
    d.title = "Synthetic weld W-12, demo";
    d.background = "Routine check of a synthetic butt weld after repair.";
    d.technique = "64-element array, 5 MHz, full-matrix capture; TFM, f-number 2.0";
    d.pertinent_negatives = {"No root indications between x = -20 and 20 mm", "No transverse reflectors"};
    d.prior_comparison = "Prior examination (synthetic) showed the same reflector at 11.9 mm.";
    d.active_capture = 1;

    CaseCapture c1;
    c1.path = cap1.string();
    c1.sha256 = fileSha256(cap1.string());
    // A recipe as the recipe code writes it (ordered keys, 2-space indent).
    c1.recipe_json = "{\n  \"das\": {\n    \"f_number\": 2.0,\n    \"mode\": \"tfm\"\n  },\n  \"log_compression\": {\n    \"dynamic_range_db\": 40.0\n  }\n}";
    c1.view = {3, 2.5, -1.25, 12.5, "caliper", {"TT-T", "T-T", "L-L"}};
    c1.measurements.push_back({"M1", MeasurementKind::Caliper, {{1, 2}, {4, 6}}, "root to cap", 3});
    c1.measurements.push_back({"M2", MeasurementKind::DepthMarker, {{0.1, 12.3}}, "", 3});
    c1.measurements.push_back({"M3", MeasurementKind::ExtentBox, {{-2, 10}, {2.5, 11.75}}, "box", 4});
    c1.measurements.push_back({"M4", MeasurementKind::Ellipse, {{0, 10}, {5, 10}, {0, 13}}, "ellipse", 0});
    c1.speed_calibration = {"Speed of sound (calibrated from the back wall): 5921 ± 14 m/s (k = 2)"};
    c1.element_health = {"Elements flagged: 5 dead", "  rule: ..."};

    CaseCapture c2;
    c2.path = cap2.string();
    c2.sha256 = fileSha256(cap2.string());
    c2.view = {0, 1, 0.1 + 0.2, 1.0 / 3.0, "", {}};  // doubles that need all 17 digits

    d.captures = {c1, c2};
    d.weld = WeldGeometry{};
    d.weld->shape = WeldShape::X;
    d.weld->root_face_mm = 1.5;

    Finding f1;
    f1.id = "F1";
    f1.number = 1;
    f1.indication = {"frame 3 (y = 10.0 mm), x = 2.4 mm", 0, 3, 2.4, 12.3, 4.1, 1.75, 6.5,
                     "Ø2.5 mm SDH at 10 mm (synthetic reference block)", {"M1", "M3"},
                     "Planar reflector at the root, 4.1 mm long, 6.5 dB above reference."};
    f1.interpretation = Interpretation::Relevant;
    f1.interpretation_reason = "Seen from both sides at the same position.";
    f1.evaluation = Evaluation::ReferForReview;
    f1.criterion = "Length limit of the applicable written procedure (synthetic)";
    Finding f2;
    f2.id = "F3";
    f2.number = 2;
    f2.indication.location = "frame 0";
    f2.indication.capture_index = 1;
    f2.indication.description = "Echo at 30 mm, moves with the probe wedge.";
    f2.interpretation = Interpretation::False;
    f2.interpretation_reason = "Wedge echo";
    d.findings = {f1, f2};
    return d;
}

}  // namespace

TEST(case_file_test, round_trip_keeps_every_field) {
    TempDir t;
    const CaseDocument d = fullCase(t.path());
    const fs::path file = t.path() / "w12.umbracase";
    saveCase(file.string(), d);
    const CaseDocument back = loadCase(file.string());
    EXPECT_EQ(back.title, d.title);
    EXPECT_EQ(back.background, d.background);
    EXPECT_EQ(back.technique, d.technique);
    EXPECT_EQ(back.pertinent_negatives, d.pertinent_negatives);
    EXPECT_EQ(back.prior_comparison, d.prior_comparison);
    EXPECT_EQ(back.active_capture, d.active_capture);
    ASSERT_EQ(back.captures.size(), 2u);
    EXPECT_EQ(back.captures[0].recipe_json, d.captures[0].recipe_json);
    EXPECT_EQ(back.captures[0].measurements, d.captures[0].measurements);
    EXPECT_EQ(back.captures[1].view, d.captures[1].view);
    EXPECT_EQ(back.findings, d.findings);
    EXPECT_FALSE(back.findings[1].indication.peak_db.has_value());
    EXPECT_TRUE(back == d);  // every field, including the ones not listed above
    // Saving the loaded case again gives the same bytes.
    EXPECT_EQ(caseToJson(back, t.path().string()), readFile(file));
}

// The case's speed-of-sound setting for the uncertainty budgets survives a save and load.
TEST(case_file_test, sizing_settings_round_trip) {
    CaseDocument d;
    d.sizing_medium = "water";
    d.speed_uncertainty_rel = 0.005;
    const CaseDocument back = caseFromJson(caseToJson(d), "mem");
    EXPECT_EQ(back.sizing_medium, "water");
    ASSERT_TRUE(back.speed_uncertainty_rel.has_value());
    EXPECT_DOUBLE_EQ(*back.speed_uncertainty_rel, 0.005);
    EXPECT_EQ(caseToJson(CaseDocument{}).find("sizing"), std::string::npos);  // absent when unset
}

// The weld geometry survives a save and load exactly; a case written before the weld existed
// (no "weld" key) loads without one; a bad weld value is refused naming its key.
TEST(case_file_test, weld_geometry_round_trip) {
    CaseDocument d;
    WeldGeometry w;
    w.shape = WeldShape::U;
    w.thickness_mm = 25.4;
    w.centre_x_mm = -3.25;
    w.bevel_angle_deg = 10;
    w.root_gap_mm = 0.5;
    w.root_face_mm = 1.5;
    w.groove_radius_mm = 6.35;
    w.cap_width_mm = 19;
    w.cap_height_mm = 1.2;
    w.root_width_mm = 4;
    w.root_height_mm = 0.8;
    d.weld = w;
    const std::string text = caseToJson(d);
    const CaseDocument back = caseFromJson(text, "mem");
    ASSERT_TRUE(back.weld.has_value());
    EXPECT_TRUE(*back.weld == w);
    EXPECT_EQ(caseToJson(back), text);
    EXPECT_EQ(caseToJson(CaseDocument{}).find("weld"), std::string::npos);  // absent when unset
    const CaseDocument old = caseFromJson("{\"format\": \"umbracase\", \"version\": 1, \"captures\": []}", "old");
    EXPECT_FALSE(old.weld.has_value());

    auto problem = [&](const std::string& from, const std::string& to) {
        std::string s = text;
        const size_t p = s.find(from);
        EXPECT_NE(p, std::string::npos) << from;
        s.replace(p, from.size(), to);
        try {
            caseFromJson(s, "w.umbracase");
        } catch (const InputError& e) {
            return e.problems().at(0).where;
        }
        return std::string("no error");
    };
    EXPECT_EQ(problem("\"shape\": \"U\"", "\"shape\": \"K\""), "weld.shape");
    EXPECT_EQ(problem("\"root_face_mm\": 1.5", "\"root_face_mm\": 30"), "weld.root_face_mm");
    EXPECT_EQ(problem("\"bevel_angle_deg\": 10.0", "\"bevel_angle_deg\": 95"), "weld.bevel_angle_deg");
    EXPECT_EQ(problem("\"thickness_mm\": 25.4", "\"thickness_mm\": \"thick\""), "weld.thickness_mm");
}

TEST(case_file_test, capture_paths_are_stored_relative_to_the_case) {
    TempDir t;
    const CaseDocument d = fullCase(t.path());
    const fs::path file = t.path() / "w12.umbracase";
    saveCase(file.string(), d);
    const std::string text = readFile(file);
    EXPECT_NE(text.find("\"path\": \"data/weld-synthetic.h5\""), std::string::npos) << text;
    // The absolute path at save time is kept beside it, as a fallback when the case file moves alone.
    EXPECT_NE(text.find("\"path_absolute\": \"" + (t.path() / "data" / "weld-synthetic.h5").generic_string() + "\""),
              std::string::npos) << text;
    // A path outside the case folder is reached with "../".
    EXPECT_NE(caseToJson(d, (t.path() / "cases").string()).find("\"../data/weld-synthetic.h5\""), std::string::npos);
}

// One file, one path: "/data/./w.h5", "/data/w.h5/" and "/data/x/../w.h5" are held as "/data/w.h5",
// so that a case saved and loaded again is the same case (a fuzzing find: an absolute path with a
// trailing "/." was kept as written and came back without it). POSIX path resolution (from memory).
TEST(case_file_test, capture_paths_are_held_in_one_normal_form) {
    const std::string sha(64, 'a');
    for (const std::string written : {"/data/./w.h5", "/data/w.h5/", "/data/x/../w.h5", "/data//w.h5"}) {
        const std::string text = R"({"format": "umbracase", "version": 1, "captures": [{"path": ")" + written +
                                 R"(", "sha256": ")" + sha + R"("}]})";
        const CaseDocument d = caseFromJson(text, "n.umbracase", "/cases");
        ASSERT_EQ(d.captures.size(), 1u);
        EXPECT_EQ(d.captures[0].path, "/data/w.h5") << written;
        EXPECT_EQ(caseFromJson(caseToJson(d, "/cases"), "n.umbracase", "/cases"), d) << written;
    }
    // Relative paths are resolved against the case's folder into the same form.
    const std::string rel = R"({"format": "umbracase", "version": 1, "captures": [{"path": "../data/./w.h5", "sha256": ")" + sha + R"("}]})";
    EXPECT_EQ(caseFromJson(rel, "n.umbracase", "/cases").captures[0].path, "/data/w.h5");
}

TEST(case_file_test, moving_the_whole_folder_keeps_captures_found) {
    TempDir t;
    const fs::path a = t.path() / "a", b = t.path() / "b";
    const CaseDocument d = fullCase(a);
    saveCase((a / "w12.umbracase").string(), d);
    fs::rename(a, b);
    const CaseDocument back = loadCase((b / "w12.umbracase").string());
    EXPECT_EQ(fs::path(back.captures[0].path), b / "data" / "weld-synthetic.h5");
    EXPECT_EQ(checkCapture(back.captures[0]), CaptureStatus::Ok);
    EXPECT_EQ(checkCapture(back.captures[1]), CaptureStatus::Ok);
}

TEST(case_file_test, moving_the_case_file_alone_keeps_captures_found) {
    TempDir t;
    const CaseDocument d = fullCase(t.path() / "work");
    saveCase((t.path() / "work" / "w12.umbracase").string(), d);
    fs::create_directories(t.path() / "archive" / "2026");
    const fs::path moved = t.path() / "archive" / "2026" / "w12.umbracase";
    fs::rename(t.path() / "work" / "w12.umbracase", moved);
    const CaseDocument back = loadCase(moved.string());
    EXPECT_EQ(fs::path(back.captures[0].path), t.path() / "work" / "data" / "weld-synthetic.h5");
    EXPECT_EQ(checkCapture(back.captures[0]), CaptureStatus::Ok);
}

TEST(case_file_test, moved_capture_is_missing_and_can_be_relocated) {
    TempDir t;
    CaseDocument d = fullCase(t.path());
    saveCase((t.path() / "w12.umbracase").string(), d);
    const fs::path moved = t.path() / "elsewhere" / "renamed.h5";
    fs::create_directories(moved.parent_path());
    fs::rename(d.captures[0].path, moved);
    CaseDocument back = loadCase((t.path() / "w12.umbracase").string());
    EXPECT_EQ(checkCapture(back.captures[0]), CaptureStatus::Missing);
    // Pointing it at a different file is refused (hash differs) and changes nothing.
    const std::string old_path = back.captures[0].path;
    EXPECT_FALSE(relocateCapture(back.captures[0], back.captures[1].path));
    EXPECT_EQ(back.captures[0].path, old_path);
    // Pointing it at the moved file succeeds.
    EXPECT_TRUE(relocateCapture(back.captures[0], moved.string()));
    EXPECT_EQ(back.captures[0].path, moved.string());
    EXPECT_EQ(checkCapture(back.captures[0]), CaptureStatus::Ok);
    EXPECT_THROW(relocateCapture(back.captures[0], (t.path() / "nope.h5").string()), InputError);
}

TEST(case_file_test, changed_capture_is_detected) {
    TempDir t;
    CaseDocument d = fullCase(t.path());
    EXPECT_EQ(checkCapture(d.captures[0]), CaptureStatus::Ok);
    writeFile(d.captures[0].path, "synthetic capture bytes onE");  // one byte differs
    EXPECT_EQ(checkCapture(d.captures[0]), CaptureStatus::Changed);
    const std::string old_hash = d.captures[0].sha256;
    EXPECT_FALSE(relocateCapture(d.captures[0], d.captures[0].path));
    EXPECT_EQ(d.captures[0].sha256, old_hash);
    EXPECT_FALSE(relocateCapture(d.captures[0], d.captures[0].path, /*accept_changed=*/true));
    EXPECT_NE(d.captures[0].sha256, old_hash);
    EXPECT_EQ(checkCapture(d.captures[0]), CaptureStatus::Ok);
}

// SHA-256 of "abc" from FIPS 180-2, Appendix B.1: the hash the case records is the standard one.
TEST(case_file_test, recorded_hash_is_standard_sha256) {
    TempDir t;
    writeFile(t.path() / "abc.bin", "abc");
    EXPECT_EQ(fileSha256((t.path() / "abc.bin").string()),
              "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

TEST(case_file_test, failed_save_leaves_the_old_file_intact) {
    TempDir t;
    CaseDocument d = fullCase(t.path());
    const fs::path file = t.path() / "w12.umbracase";
    saveCase(file.string(), d);
    const std::string before = readFile(file);
    // Make the temporary file impossible to create: a folder stands in its place.
    fs::create_directories(file.string() + ".saving");
    d.title = "changed";
    try {
        saveCase(file.string(), d);
        FAIL() << "expected InputError";
    } catch (const InputError& e) {
        EXPECT_EQ(e.file(), file.string());
    }
    EXPECT_EQ(readFile(file), before);
    EXPECT_EQ(loadCase(file.string()).title, "Synthetic weld W-12, demo");
    fs::remove(file.string() + ".saving");
    saveCase(file.string(), d);
    EXPECT_EQ(loadCase(file.string()).title, "changed");
    EXPECT_FALSE(fs::exists(file.string() + ".saving"));  // no temporary file left behind
}

TEST(case_file_test, failed_rename_removes_the_temporary_file) {
    TempDir t;
    // The target is a non-empty folder: writing the temporary file works, renaming over it fails.
    const fs::path target = t.path() / "occupied.umbracase";
    writeFile(target / "keep.txt", "still here");
    EXPECT_THROW(saveCase(target.string(), fullCase(t.path())), InputError);
    EXPECT_EQ(readFile(target / "keep.txt"), "still here");
    EXPECT_FALSE(fs::exists(target.string() + ".saving"));
}

TEST(case_file_test, unwritable_location_save_fails_cleanly) {
    // The temporary file cannot be created because its folder is a regular file (this fails for
    // root too, unlike permission bits); the existing case must stay as it was.
    TempDir t;
    CaseDocument d = fullCase(t.path());
    const fs::path file = t.path() / "w12.umbracase";
    saveCase(file.string(), d);
    const std::string before = readFile(file);
    writeFile(t.path() / "not-a-folder", "plain file");
    d.title = "changed";
    EXPECT_THROW(saveCase((t.path() / "not-a-folder" / "w12.umbracase").string(), d), InputError);
    EXPECT_EQ(readFile(file), before);
}

TEST(case_file_test, bad_files_give_errors_naming_file_and_key) {
    TempDir t;
    const fs::path file = t.path() / "bad.umbracase";
    auto where = [&](const std::string& text) -> std::string {
        writeFile(file, text);
        try {
            loadCase(file.string());
        } catch (const InputError& e) {
            EXPECT_EQ(e.file(), file.string());
            EXPECT_NE(std::string(e.what()).find(file.string()), std::string::npos);
            return e.problems().at(0).where + " | " + e.problems().at(0).what;
        }
        return "no error";
    };
    EXPECT_NE(where("{\"format\": \"umbracase\", ").find("not valid JSON"), std::string::npos);
    EXPECT_NE(where("[1, 2]").find("must be a JSON object"), std::string::npos);
    EXPECT_EQ(where("{\"format\": \"umbracase\", \"version\": 2}").rfind("version | unknown case version 2", 0), 0u);
    EXPECT_EQ(where("{\"format\": \"other\", \"version\": 1}").rfind("format |", 0), 0u);
    EXPECT_EQ(where("{\"format\": \"umbracase\"}"), "version | missing");

    const std::string good = caseToJson(fullCase(t.path()), t.path().string());
    auto replaced = [&](const std::string& from, const std::string& to) {
        std::string s = good;
        const size_t p = s.find(from);
        EXPECT_NE(p, std::string::npos) << from;
        return s.replace(p, from.size(), to);
    };
    EXPECT_EQ(where(replaced("\"class\": \"relevant\"", "\"class\": \"defect\"")).rfind("findings[0].interpretation.class |", 0), 0u);
    EXPECT_EQ(where(replaced("\"outcome\": \"refer-for-review\"", "\"outcome\": 3")).rfind("findings[0].evaluation.outcome |", 0), 0u);
    EXPECT_EQ(where(replaced("\"kind\": \"ellipse\"", "\"kind\": \"circle\"")).rfind("captures[0].measurements[3].kind |", 0), 0u);
    EXPECT_EQ(where(replaced("\"sha256\": \"", "\"sha257\": \"")).rfind("captures[0].sha256 | missing", 0), 0u);
    EXPECT_EQ(where(replaced("\"active_capture\": 1", "\"active_capture\": 5")).rfind("active_capture |", 0), 0u);
    EXPECT_EQ(where(replaced("\"x_mm\": 2.4", "\"x_mm\": \"2.4\"")).rfind("findings[0].indication.x_mm |", 0), 0u);
    EXPECT_EQ(where(good), "no error");
    // Sizing settings: a known medium and a relative uncertainty in [0, 0.5].
    EXPECT_EQ(where(replaced("\"findings\":", "\"sizing\": {\"medium\": \"glass\"}, \"findings\":")).rfind("sizing.medium |", 0), 0u);
    EXPECT_EQ(where(replaced("\"findings\":", "\"sizing\": {\"speed_uncertainty_rel\": 2}, \"findings\":"))
                  .rfind("sizing.speed_uncertainty_rel |", 0),
              0u);

    try {
        loadCase((t.path() / "absent.umbracase").string());
        FAIL();
    } catch (const InputError& e) {
        EXPECT_NE(std::string(e.what()).find("does not exist"), std::string::npos);
    }
}

TEST(case_file_test, autosave_path_is_a_sibling) {
    EXPECT_EQ(autosavePath("/cases/w12.umbracase"), "/cases/w12.umbracase.autosave");
    EXPECT_EQ(autosavePath("/cases/w12"), "/cases/w12.umbracase.autosave");
}

// The distance–amplitude curve (label, basis, recipe, points with where they came from)
// survives save and load; a second save is byte for byte the first; a case without one stays
// without.
TEST(case_file_test, distance_amplitude_curve_round_trip) {
    TempDir t;
    CaseDocument d = fullCase(t.path());
    EXPECT_FALSE(loadCase([&] { const fs::path f = t.path() / "none.umbracase"; saveCase(f.string(), d); return f.string(); }())
                     .curve.has_value());
    DistanceAmplitudeCurve c;
    c.label = "Ø2.5 mm SDH, reference block RB-25";
    c.recipe_json = "{\n  \"das\": {\n    \"f_number\": 2.0\n  }\n}";
    c.recipe_fingerprint = "0123456789abcdef";
    for (int i = 1; i <= 4; ++i) {
        DacPoint p;
        p.depth_m = 5e-3 * i;
        p.x_m = -9e-3 + 6e-3 * (i - 1);
        p.amplitude = 0.0123456789012345 / i;
        p.label = "SDH " + std::to_string(5 * i) + " mm";
        p.capture_sha256 = std::string(64, 'c');
        c.points.push_back(p);
    }
    d.curve = c;
    const fs::path file = t.path() / "dac.umbracase";
    saveCase(file.string(), d);
    const CaseDocument back = loadCase(file.string());
    ASSERT_TRUE(back.curve.has_value());
    EXPECT_EQ(back.curve->label, c.label);
    EXPECT_EQ(back.curve->basis, AmplitudeBasis::BeforeTcg);
    EXPECT_EQ(back.curve->recipe_json, c.recipe_json);
    EXPECT_EQ(back.curve->recipe_fingerprint, c.recipe_fingerprint);
    ASSERT_EQ(back.curve->points.size(), 4u);
    for (size_t i = 0; i < 4; ++i) {
        EXPECT_EQ(back.curve->points[i], c.points[i]);
    }
    EXPECT_TRUE(back == d);
    EXPECT_EQ(caseToJson(back, t.path().string()), readFile(file));
    EXPECT_EQ(readFile(file).find("amplitude_reference"), std::string::npos);  // the old key is not written

    // A point amplitude that is not positive is refused, naming the key.
    std::string text = readFile(file);
    const std::string from = "\"amplitude\": 0.0123456789012345";
    const size_t p = text.find(from);
    ASSERT_NE(p, std::string::npos);
    writeFile(file, text.replace(p, from.size(), "\"amplitude\": 0"));
    try {
        loadCase(file.string());
        FAIL();
    } catch (const InputError& e) {
        EXPECT_EQ(e.problems().at(0).where, "distance_amplitude_curve.points[0].amplitude");
    }
}

// A case written by another program from docs/case-file.md: only the required keys, points in
// any order, a curve without a recipe. Loads, points sorted by depth.
TEST(case_file_test, hand_written_curve_per_the_documentation_loads) {
    const std::string text = R"({
  "format": "umbracase", "version": 1, "captures": [],
  "distance_amplitude_curve": {
    "label": "SDH 2.5 mm",
    "points": [
      {"depth_m": 0.015, "amplitude": 2},
      {"depth_m": 0.005, "amplitude": 8, "x_m": -0.006, "frame": 0},
      {"depth_m": 0.025, "amplitude": 1, "label": "deepest"}
    ]
  }
})";
    const CaseDocument d = caseFromJson(text, "other.umbracase");
    ASSERT_TRUE(d.curve.has_value());
    EXPECT_EQ(d.curve->basis, AmplitudeBasis::BeforeTcg);
    EXPECT_TRUE(d.curve->recipe_json.empty());
    ASSERT_EQ(d.curve->points.size(), 3u);
    EXPECT_DOUBLE_EQ(d.curve->points[0].depth_m, 5e-3);
    EXPECT_DOUBLE_EQ(d.curve->points[0].x_m, -6e-3);
    EXPECT_EQ(d.curve->points[2].label, "deepest");
    // 20 log10(4 / curve at 10 mm): the curve is 20 log10 4 there (geometric mean of 8 and 2).
    EXPECT_NEAR(dbReCurve(*d.curve, 4.0, 10e-3)->db, 0.0, 1e-9);

    // No points: no curve (amplitudes re the frame peak).
    EXPECT_FALSE(caseFromJson(R"({"format": "umbracase", "version": 1, "distance_amplitude_curve": {"points": []}})", "x")
                     .curve.has_value());

    // Errors name the key.
    auto where = [](const std::string& t) {
        try {
            caseFromJson(t, "other.umbracase");
        } catch (const InputError& e) {
            return e.problems().at(0).where;
        }
        return std::string("(no error)");
    };
    const std::string head = R"({"format": "umbracase", "version": 1, "distance_amplitude_curve": )";
    EXPECT_EQ(where(head + R"({"label": "x"}})"), "distance_amplitude_curve.points");
    EXPECT_EQ(where(head + R"({"points": [{"amplitude": 1}]}})"), "distance_amplitude_curve.points[0].depth_m");
    EXPECT_EQ(where(head + R"({"amplitude_basis": "raw", "points": []}})"), "distance_amplitude_curve.amplitude_basis");
    EXPECT_EQ(where(head + R"({"points": [{"depth_m": 0.005, "amplitude": 1, "capture_sha256": "abc"}]}})"),
              "distance_amplitude_curve.points[0].capture_sha256");
}

// Files from before the curve hold a single `amplitude_reference`: it opens as a one-point curve
// whose amplitude was read after TCG (its recipe kept), and is saved back as a curve.
TEST(case_file_test, old_single_amplitude_reference_opens_as_a_one_point_curve) {
    TempDir t;
    const std::string text = R"({
  "format": "umbracase", "version": 1, "captures": [],
  "amplitude_reference": {
    "label": "Ø2.5 mm SDH at 10 mm, reference block",
    "amplitude": 0.5,
    "capture_sha256": "",
    "recipe": {"das": {"f_number": 2.0}},
    "frame": 0, "x_mm": -1.25, "z_mm": 10.0
  }
})";
    const fs::path file = t.path() / "old.umbracase";
    writeFile(file, text);
    const CaseDocument d = loadCase(file.string());
    ASSERT_TRUE(d.curve.has_value());
    EXPECT_EQ(d.curve->label, "Ø2.5 mm SDH at 10 mm, reference block");
    EXPECT_EQ(d.curve->basis, AmplitudeBasis::AfterTcg);
    EXPECT_NE(d.curve->recipe_json.find("f_number"), std::string::npos);
    ASSERT_EQ(d.curve->points.size(), 1u);
    EXPECT_DOUBLE_EQ(d.curve->points[0].depth_m, 10e-3);
    EXPECT_DOUBLE_EQ(d.curve->points[0].x_m, -1.25e-3);
    EXPECT_EQ(d.curve->points[0].amplitude, 0.5);
    // 0.25 re 0.5 is −6.02 dB at the reference's depth, and flagged elsewhere.
    EXPECT_NEAR(dbReCurve(*d.curve, 0.25, 10e-3)->db, -6.020599913, 1e-9);
    EXPECT_TRUE(dbReCurve(*d.curve, 0.25, 15e-3)->outside);
    saveCase(file.string(), d);
    const std::string again = readFile(file);
    EXPECT_NE(again.find("\"distance_amplitude_curve\""), std::string::npos);
    EXPECT_NE(again.find("\"after TCG\""), std::string::npos);
    EXPECT_EQ(loadCase(file.string()).curve->basis, AmplitudeBasis::AfterTcg);
    // Its capture hash is checked as the curve's are (found by fuzzing: a bad hash loaded, then
    // the saved curve did not load back).
    writeFile(file, R"({"format": "umbracase", "version": 1,
  "amplitude_reference": {"label": "x", "amplitude": 2.0, "capture_sha256": "umbracase", "frame": 0, "x_mm": 1, "z_mm": 5}})");
    try {
        loadCase(file.string());
        ADD_FAILURE() << "a bad capture hash was accepted";
    } catch (const InputError& e) {
        EXPECT_EQ(e.problems().at(0).where, "amplitude_reference.capture_sha256");
    }
}

// A damaged or hostile case file must be refused before it takes memory: 90 MB holding 30 M
// empty strings would take gigabytes as a parsed tree (each string a heap node). Refused by the
// file-size limit in loadCase, and by the value count / memory estimate in caseFromJson; the
// process's peak resident memory (getrusage, Linux reports KiB) stays near the text's own size.
TEST(case_file_test, huge_case_of_empty_strings_is_refused_within_a_memory_budget) {
    TempDir dir;
    std::string text = R"({"version": 1, "title": "t", "pertinent_negatives": [)";
    const size_t n = 30'000'000;
    text.reserve(text.size() + 3 * n + 16);
    for (size_t i = 0; i < n; ++i) text += i ? ",\"\"" : "\"\"";
    text += "]}";
    ASSERT_GT(text.size(), size_t(89000000));  // 90 MB
    const fs::path p = dir.path() / "huge.umbracase";
    writeFile(p, text);
    try {
        (void)umbra::core::loadCase(p.string());
        FAIL() << "a 90 MB case was loaded";
    } catch (const umbra::core::InputError& e) {
        EXPECT_NE(std::string(e.what()).find("huge.umbracase"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("at most"), std::string::npos) << e.what();
    }
    try {
        (void)umbra::core::caseFromJson(text, "huge.umbracase");
        FAIL() << "30 M strings were parsed";
    } catch (const umbra::core::InputError& e) {
        EXPECT_NE(std::string(e.what()).find("too large to load"), std::string::npos) << e.what();
    }
    rusage ru{};
    getrusage(RUSAGE_SELF, &ru);
#if !defined(__SANITIZE_ADDRESS__)
    EXPECT_LT(double(ru.ru_maxrss) * 1024, 600.0 * (1 << 20)) << "peak resident memory while refusing";
#endif
}

// Fewer values than the count limit (3 M) but 1.5 M small objects, each a map in memory: refused
// by the memory estimate (about 210 B each, 12 MB of text), with the budget named.
TEST(case_file_test, case_over_the_memory_budget_is_refused) {
    std::string text = R"({"version": 1, "title": "t", "pertinent_negatives": [)";
    for (size_t i = 0; i < 1'500'000; ++i) text += i ? R"(,{"a":0})" : R"({"a":0})";
    text += "]}";
    try {
        (void)umbra::core::caseFromJson(text, "long.umbracase");
        FAIL() << "a case over the memory budget was parsed";
    } catch (const umbra::core::InputError& e) {
        EXPECT_NE(std::string(e.what()).find("more than 256 MiB of memory"), std::string::npos) << e.what();
    }
}
