// SPDX-License-Identifier: MIT
// Recipe: parsing, range checks, JSON round trip, and SettingError messages that name the
// key. The stages below are test declarations (not the reconstruction's), covering each
// ParamKind; the expected values follow from the declarations (worked by hand).
#include <gtest/gtest.h>

#include <functional>
#include <nlohmann/json.hpp>

#include "core/error.h"
#include "core/parameters.h"

using namespace umbra::core;

namespace {

ParamSpec param(std::string name, std::string unit, ParamKind kind, double lo, double hi, double def) {
    ParamSpec p;
    p.name = std::move(name);
    p.label = p.name;
    p.description = "test parameter";
    p.unit = std::move(unit);
    p.kind = kind;
    p.min = lo;
    p.max = hi;
    p.default_number = def;
    return p;
}

std::vector<StageSpec> testStages() {
    ParamSpec fnum = param("f_number", "", ParamKind::Real, 0.5, 10.0, 1.5);
    ParamSpec taps = param("taps", "", ParamKind::Integer, 1, 255, 31);
    ParamSpec win = param("window", "", ParamKind::Choice, 0, 0, 0);
    win.choices = {"rect", "hann", "tukey"};
    win.default_text = "hann";
    ParamSpec env = param("envelope", "", ParamKind::Flag, 0, 1, 1);
    ParamSpec range = param("dynamic_range_db", "dB", ParamKind::Real, 10, 120, 60);
    range.display_only = true;
    ParamSpec curve = param("curve", "", ParamKind::Text, 0, 0, 0);
    curve.default_text = "0:0";
    return {StageSpec{"das", "Delay-and-sum", "", {fnum, taps, win, env}},
            StageSpec{"display", "Display", "", {range, curve}}};
}

std::string settingErrorOf(const std::function<void()>& f) {
    try {
        f();
    } catch (const SettingError& e) {
        return e.what();
    }
    return "";
}

TEST(Recipe, DefaultsFromDeclarations) {
    Recipe r(testStages());
    EXPECT_EQ(r.number("das.f_number"), 1.5);
    EXPECT_EQ(r.integer("das.taps"), 31);
    EXPECT_EQ(r.text("das.window"), "hann");
    EXPECT_TRUE(r.flag("das.envelope"));
    EXPECT_EQ(r.number("display.dynamic_range_db"), 60);
    EXPECT_EQ(r.text("display.curve"), "0:0");
    EXPECT_TRUE(r.has("das.taps"));
    EXPECT_FALSE(r.has("das.tap"));
}

TEST(Recipe, ParsesEachKind) {
    Recipe r(testStages());
    r.set("das.f_number", "2.25");
    r.set("das.taps", "63");
    r.set("das.window", "tukey");
    r.set("das.envelope", "off");
    r.applyAssignment("display.curve=10:3,20:6");
    r.applyAssignment("display.dynamic_range_db=40");
    EXPECT_EQ(r.number("das.f_number"), 2.25);
    EXPECT_EQ(r.integer("das.taps"), 63);
    EXPECT_EQ(r.text("das.window"), "tukey");
    EXPECT_FALSE(r.flag("das.envelope"));
    EXPECT_EQ(r.text("display.curve"), "10:3,20:6");
    EXPECT_EQ(r.number("display.dynamic_range_db"), 40);
    EXPECT_EQ(r.valueText("das.f_number"), "2.25");
    // Bounds are inclusive.
    r.set("das.f_number", "0.5");
    r.set("das.f_number", "10");
    EXPECT_EQ(r.number("das.f_number"), 10);
}

TEST(Recipe, BadValuesNameTheKey) {
    Recipe r(testStages());
    struct Bad { std::string key, value, fragment; };
    const std::vector<Bad> bad = {
        {"das.f_number", "0.49", "out of range"},
        {"das.f_number", "10.01", "out of range"},
        {"das.f_number", "nan", "not finite"},
        {"das.f_number", "inf", "not finite"},
        {"das.f_number", "2.0mm", "not a number"},
        {"das.f_number", "", "not a number"},
        {"das.taps", "2.5", "not a whole number"},
        {"das.taps", "0", "out of range"},
        {"das.window", "gauss", "not allowed"},
        {"das.envelope", "maybe", "not on/off"},
    };
    for (auto& b : bad) {
        const std::string msg = settingErrorOf([&] { r.set(b.key, b.value); });
        EXPECT_NE(msg.find("'" + b.key + "'"), std::string::npos) << b.key << "=" << b.value << ": " << msg;
        EXPECT_NE(msg.find(b.fragment), std::string::npos) << b.key << "=" << b.value << ": " << msg;
    }
    // Unknown keys list the known ones.
    const std::string unknown = settingErrorOf([&] { r.set("das.fnumber", "2"); });
    EXPECT_NE(unknown.find("'das.fnumber'"), std::string::npos) << unknown;
    EXPECT_NE(unknown.find("das.f_number"), std::string::npos) << unknown;
    EXPECT_NE(settingErrorOf([&] { r.applyAssignment("das.f_number"); }).find("stage.param=value"), std::string::npos);
    EXPECT_NE(settingErrorOf([&] { (void)r.number("das.window"); }).find("'das.window'"), std::string::npos);
    EXPECT_NE(settingErrorOf([&] { (void)r.text("das.taps"); }).find("'das.taps'"), std::string::npos);
    // A refused value leaves the old one.
    EXPECT_EQ(r.number("das.f_number"), 1.5);
}

TEST(Recipe, JsonRoundTrip) {
    Recipe a(testStages());
    a.set("das.f_number", "3.125");
    a.set("das.taps", "7");
    a.set("das.window", "rect");
    a.set("das.envelope", "0");
    a.set("display.curve", "5:1");
    const std::string js = a.toJson();
    // Types in the JSON follow the declarations.
    auto j = nlohmann::json::parse(js);
    EXPECT_TRUE(j["das"]["f_number"].is_number_float());
    EXPECT_TRUE(j["das"]["taps"].is_number_integer());
    EXPECT_TRUE(j["das"]["envelope"].is_boolean());
    EXPECT_TRUE(j["das"]["window"].is_string());
    Recipe b(testStages());
    EXPECT_FALSE(a == b);
    b.mergeJson(js, "saved.json");
    EXPECT_TRUE(a == b);
    EXPECT_EQ(b.toJson(), js);
}

TEST(Recipe, MergeJsonIsAllOrNothingAndNamesSourceAndKey) {
    Recipe r(testStages());
    const std::string msg = settingErrorOf([&] {
        r.mergeJson(R"({"das": {"taps": 9, "f_number": 99}})", "weld.recipe.json");
    });
    EXPECT_NE(msg.find("weld.recipe.json"), std::string::npos) << msg;
    EXPECT_NE(msg.find("'das.f_number'"), std::string::npos) << msg;
    EXPECT_EQ(r.integer("das.taps"), 31) << "partial merge applied";
    const std::string bad_json = settingErrorOf([&] { r.mergeJson("{not json", "x.json"); });
    EXPECT_NE(bad_json.find("x.json: not valid JSON"), std::string::npos) << bad_json;
    EXPECT_NE(bad_json.find("line 1, column"), std::string::npos) << "the position is named: " << bad_json;
    EXPECT_EQ(bad_json.find("[json.exception"), std::string::npos) << "the parser's internal tag is not for users: " << bad_json;
    EXPECT_NE(settingErrorOf([&] { r.mergeJson("[1,2]", "x.json"); }).find("x.json"), std::string::npos);
    EXPECT_NE(settingErrorOf([&] { r.mergeJson(R"({"das": 3})", "x.json"); }).find("'das'"), std::string::npos);
    EXPECT_NE(settingErrorOf([&] { r.mergeJson(R"({"das": {"taps": [1]}})", "x.json"); }).find("'das.taps'"), std::string::npos);
    EXPECT_NE(settingErrorOf([&] { r.mergeJson(R"({"das": {"nope": 1}})", "x.json"); }).find("'das.nope'"), std::string::npos);
}

TEST(Recipe, DisplayOnlyDifference) {
    Recipe a(testStages()), b(testStages());
    b.set("display.dynamic_range_db", "40");
    EXPECT_TRUE(a.differsOnlyInDisplay(b));
    b.set("das.taps", "5");
    EXPECT_FALSE(a.differsOnlyInDisplay(b));
}

}  // namespace
