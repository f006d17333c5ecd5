// SPDX-License-Identifier: MIT
// Practice mode: answer files, scoring against the truth, the practice log, progress.
// References: the answer files in samples/ (true sizes of the simulated structures), the
// geometry of the measurement (a caliper's length by Pythagoras), Bland & Altman (1986).
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <unistd.h>

#include "core/error.h"
#include "core/practice.h"

using namespace umbra::core;
namespace fs = std::filesystem;

namespace {

std::string sample(const std::string& name) { return std::string(UMBRA_SOURCE_DIR) + "/samples/" + name; }

fs::path tempDir() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    fs::path d = fs::temp_directory_path() / ("umbra_practice_" + std::to_string(::getpid()) + "_" + info->name());
    fs::remove_all(d);
    fs::create_directories(d);
    return d;
}

Measurement caliper(const std::string& id, const std::string& label, PointMm a, PointMm b) {
    return Measurement{id, MeasurementKind::Caliper, {a, b}, label, 0};
}

UncertaintyModel model() {
    UncertaintyModel u;
    u.pixel_x_mm = 0.1;
    u.pixel_z_mm = 0.05;
    u.speed_rel = 0.01;
    return u;
}

}  // namespace

// Every shipped answer file parses, and the structure labels are exactly the labels of the
// scene's regions/reflectors (the trainee picks them).
TEST(Practice, ShippedAnswerFilesParse) {
    for (const char* name : {"practice_set_a", "practice_set_b", "practice_set_c"}) {
        const PracticeSet s = PracticeSet::load(sample(std::string(name) + ".answers.json"));
        EXPECT_EQ(s.scenario(), name);
        EXPECT_GE(s.structureLabels().size(), 3u) << name;
        std::ifstream in(sample(std::string(name) + ".json"));
        std::string scene((std::istreambuf_iterator<char>(in)), {});
        EXPECT_NE(scene.find("synthetic"), std::string::npos) << name << " must be labelled synthetic";
        for (const auto& l : s.structureLabels())
            EXPECT_NE(scene.find("\"" + l + "\""), std::string::npos) << name << ": label " << l << " not in the scene";
    }
}

// The tasks list names what to measure but never a true value.
TEST(Practice, TasksHideTheAnswers) {
    const PracticeSet s = PracticeSet::load(sample("practice_set_a.answers.json"));
    ASSERT_EQ(s.tasks().size(), 5u);
    EXPECT_EQ(s.tasks()[0], "cyst A1: diameter");
    for (const auto& t : s.tasks()) {
        const std::string what = t.substr(t.find(": ") + 2);  // after the label
        EXPECT_EQ(what.find_first_of("0123456789"), std::string::npos) << t;
    }
}

// Set A: a horizontal caliper across cyst A3 (true diameter 8 mm) of length 8.3 mm is 0.3 mm
// long; a vertical caliper across the tube A5 is compared with its axial extent (8.14 mm, the
// answer file), a box on ellipse A4 with its width (10) and height (6).
TEST(Practice, ScoresAgainstTheClosestTarget) {
    const PracticeSet s = PracticeSet::load(sample("practice_set_a.answers.json"));
    std::vector<PracticeReading> r;
    for (const auto& m : {caliper("M1", "cyst A3", {6.85, 14}, {15.15, 14}),
                          caliper("M2", "tube A5", {9, 27}, {9, 35}),
                          Measurement{"M3", MeasurementKind::ExtentBox, {{-14, 28}, {-4.5, 34}}, "ellipse A4", 0},
                          caliper("M4", "not a structure", {0, 0}, {1, 1})}) {
        auto v = practiceReadings(m, model());
        r.insert(r.end(), v.begin(), v.end());
    }
    const PracticeAttempt a = scoreAttempt(s, r, std::string(64, 'f'), "2026-01-01T00:00:00Z");
    ASSERT_EQ(a.results.size(), 4u);
    EXPECT_EQ(a.results[0].target, "diameter");
    EXPECT_NEAR(a.results[0].error_mm, 0.3, 1e-9);
    ASSERT_TRUE(a.results[0].error_in_u);
    EXPECT_NEAR(*a.results[0].error_in_u, 0.3 / a.results[0].expanded_mm, 1e-12);
    EXPECT_EQ(a.results[1].target, "axial extent");
    EXPECT_NEAR(a.results[1].error_mm, 8.0 - 8.14, 1e-9);
    EXPECT_EQ(a.results[2].target, "width");
    EXPECT_NEAR(a.results[2].error_mm, 9.5 - 10, 1e-9);
    EXPECT_EQ(a.results[3].target, "height");
    EXPECT_NEAR(a.results[3].error_mm, 0.0, 1e-9);
    EXPECT_EQ(a.unknown_labels, std::vector<std::string>{"not a structure"});
    EXPECT_EQ(a.unmeasured, (std::vector<std::string>{"cyst A1", "cyst A2"}));
}

// A diagonal caliper: length by Pythagoras (3-4-5), uncertainty from evaluate() (k = 2).
TEST(Practice, CaliperReadingIsItsLength) {
    const auto r = practiceReadings(caliper("M1", "x", {0, 10}, {3, 14}), model());
    ASSERT_EQ(r.size(), 1u);
    EXPECT_NEAR(r[0].value_mm, 5.0, 1e-12);
    EXPECT_NEAR(r[0].direction_deg, std::atan2(4.0, 3.0) * 180 / M_PI, 1e-9);
    const auto q = evaluate(caliper("M1", "x", {0, 10}, {3, 14}), model());
    EXPECT_NEAR(r[0].expanded_mm, 2 * q[2].uncertainty, 1e-12);
}

TEST(Practice, BadAnswerFilesNameTheKey) {
    try {
        PracticeSet::fromJson(R"({"structures":[{"label":"a","diameter_mm":-1}]})", "x.answers.json");
        FAIL();
    } catch (const InputError& e) {
        EXPECT_NE(std::string(e.what()).find("structures[0].diameter_mm"), std::string::npos) << e.what();
    }
    EXPECT_THROW(PracticeSet::fromJson(R"({"structures":[{"label":"a"}]})", "x"), InputError);
    EXPECT_THROW(PracticeSet::fromJson("{not json", "x"), InputError);
    EXPECT_THROW(PracticeSet::fromJson(R"({"structures":[]})", "x"), InputError);
}

// File names: distinct trainee names give distinct files; nothing outside [A-Za-z0-9-] survives.
TEST(Practice, LogFileNames) {
    EXPECT_EQ(practiceLogFileName("Ann B"), "Ann_20B.practice.json");
    EXPECT_NE(practiceLogFileName("Ann B"), practiceLogFileName("Ann_B"));
    EXPECT_EQ(practiceLogFileName("../x"), "_2E_2E_2Fx.practice.json");
    EXPECT_THROW(practiceLogFileName("  "), SettingError);
    EXPECT_THROW(practiceLogFileName(std::string(101, 'a')), SettingError);
}

// Attempts are appended to the trainee's log file and read back exactly; progress is the
// Bland–Altman analysis of measured − true over all results (bias = mean error).
TEST(Practice, LogRoundTripAndProgress) {
    const fs::path dir = tempDir();
    const PracticeSet s = PracticeSet::load(sample("practice_set_a.answers.json"));
    const std::string folder = (dir / "practice").string();
    PracticeLog log;
    for (double err : {0.4, -0.2, 0.1}) {
        auto r = practiceReadings(caliper("M1", "cyst A1", {-14, 14}, {-10 + err, 14}), model());
        auto r2 = practiceReadings(caliper("M2", "cyst A2", {-4, 14}, {2 + 2 * err, 14}), model());
        r.insert(r.end(), r2.begin(), r2.end());
        log = appendAttempt(folder, "Trainee Ö", scoreAttempt(s, r, std::string(64, '0'), utcNow()));
    }
    EXPECT_EQ(log.attempts.size(), 3u);
    EXPECT_EQ(loadPracticeLog(folder, "Trainee Ö"), log);
    EXPECT_FALSE(fs::exists(fs::path(folder) / (practiceLogFileName("Trainee Ö") + ".saving")));
    const PracticeProgress p = practiceProgress(log);
    EXPECT_EQ(p.ba.n, 6u);
    EXPECT_NEAR(p.ba.bias, (0.4 - 0.2 + 0.1) * 3 / 6, 1e-9);
    ASSERT_EQ(p.series.size(), 2u);
    EXPECT_EQ(p.series[0].key, "cyst A1 · diameter");
    EXPECT_NEAR(p.series[1].error_mm[0], 0.8, 1e-9);
    // Someone else's log under this trainee's file name is refused, not mixed in.
    std::ofstream(fs::path(folder) / practiceLogFileName("B"))
        << R"({"format":"umbra-practice-log","version":1,"trainee":"C","attempts":[]})";
    EXPECT_THROW(loadPracticeLog(folder, "B"), InputError);
    fs::remove_all(dir);
}
