// SPDX-License-Identifier: MIT
// JSON text checked before parsing (grammar of RFC 8259): valid texts from the RFC's own examples
// pass; deep nesting, too many values, out-of-range numbers and syntax errors are refused with the
// file, the key path and plain words (line and column), never a crash.
#include <gtest/gtest.h>

#include <string>

#include "core/error.h"
#include "core/json_guard.h"

using umbra::core::checkJsonText;
using umbra::core::InputError;

namespace {
std::string errorOf(const std::string& text, umbra::core::JsonLimits lim = {}) {
    try {
        checkJsonText(text, "f.json", lim);
    } catch (const InputError& e) {
        EXPECT_EQ(e.file(), "f.json");
        return e.what();
    }
    return "";
}
bool has(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }
}  // namespace

// RFC 8259 section 13 examples (an object and an array of objects), plus scalars at the top level.
TEST(json_guard_test, rfc8259_examples_pass) {
    EXPECT_EQ(errorOf(R"({"Image": {"Width": 800, "Height": 600, "Title": "View from 15th Floor",
        "Thumbnail": {"Url": "http://www.example.com/image/481989943", "Height": 125, "Width": 100},
        "Animated" : false, "IDs": [116, 943, 234, 38793]}})"),
              "");
    EXPECT_EQ(errorOf(R"([{"precision": "zip", "Latitude": 37.7668, "Longitude": -122.3959, "Address": "", "City": "SAN FRANCISCO",
        "State": "CA", "Zip": "94107", "Country": "US"}, {"precision": "zip", "Latitude": 37.371991, "Longitude": -122.026020,
        "Address": "", "City": "SUNNYVALE", "State": "CA", "Zip": "94085", "Country": "US"}])"),
              "");
    EXPECT_EQ(errorOf("\"Hello world!\""), "");
    EXPECT_EQ(errorOf("42"), "");
    EXPECT_EQ(errorOf("true"), "");
    EXPECT_EQ(errorOf(R"({"s": "esc \" \\ \/ \b \f \n \r \t \u00e9", "n": -0.5e-3, "tiny": 1e-400})"), "");
}

TEST(json_guard_test, deep_nesting_is_refused_without_recursion) {
    const std::string deep = std::string(100000, '[') + std::string(100000, ']');
    const auto e = errorOf(deep);
    EXPECT_TRUE(has(e, "nested deeper than 256")) << e.substr(0, 200);
    EXPECT_EQ(errorOf(std::string(256, '[') + std::string(256, ']')), "");
}

TEST(json_guard_test, out_of_range_number_names_its_key) {
    const auto e = errorOf(R"({"array": {"pitch_mm": 0.6, "points": [1, 2, -1e999]}})");
    EXPECT_TRUE(has(e, "array.points[2]")) << e;
    EXPECT_TRUE(has(e, "number -1e999 is out of range")) << e;
}

TEST(json_guard_test, too_many_values_are_refused) {
    std::string many = "[";
    for (int i = 0; i < 1000; ++i) many += "\"\",";
    many += "\"\"]";
    umbra::core::JsonLimits lim;
    lim.max_values = 500;
    EXPECT_TRUE(has(errorOf(many, lim), "more than 500 values"));
    EXPECT_EQ(errorOf(many), "");
}

TEST(json_guard_test, syntax_errors_in_plain_words_with_line_and_column) {
    auto e = errorOf("{\n  \"a\": 1,\n  \"b\" 2\n}");
    EXPECT_TRUE(has(e, "expected ':' after the key")) << e;
    EXPECT_TRUE(has(e, "line 3")) << e;
    EXPECT_FALSE(has(e, "json.exception")) << e;
    EXPECT_TRUE(has(errorOf("{\"a\": [1, 2}"), "expected ',' or ']'"));
    EXPECT_TRUE(has(errorOf("{\"a\": \"open"), "not closed"));
    EXPECT_TRUE(has(errorOf(""), "ends where a value was expected"));
    EXPECT_TRUE(has(errorOf("{} x"), "after the end"));
    EXPECT_TRUE(has(errorOf("[01]"), "expected ',' or ']'"));
    EXPECT_TRUE(has(errorOf("[1.]"), "digits expected"));
    EXPECT_TRUE(has(errorOf("[nul]"), "unexpected character"));
}

#if !defined(__SANITIZE_ADDRESS__)
#include <malloc.h>

#include <nlohmann/json.hpp>

// The memory estimate bounds what the JSON library really allocates (glibc's mallinfo2 count of
// bytes in use, which includes the allocator's per-chunk overhead) from above, and is not more
// than four times it: shapes of empty strings, long strings, numbers and objects.
TEST(json_guard_test, memory_estimate_bounds_the_parsed_tree) {
    auto shaped = [](const std::string& item, int n) {
        std::string t = "[";
        for (int i = 0; i < n; ++i) t += (i ? "," : "") + item;
        return t + "]";
    };
    for (const std::string& text : {shaped("\"\"", 200000), shaped("\"" + std::string(100, 'a') + "\"", 50000),
                                    shaped("12345.678", 200000), shaped(R"({"key_one": 1, "another_key": "v"})", 50000)}) {
        const size_t before = mallinfo2().uordblks;
        size_t actual = 0;
        {
            auto j = nlohmann::json::parse(text);
            actual = mallinfo2().uordblks - before;
        }
        umbra::core::JsonLimits lim;
        lim.max_memory_bytes = actual - 1;
        EXPECT_NE(errorOf(text, lim), "") << "estimate below the real " << actual << " bytes: " << text.substr(0, 40);
        lim.max_memory_bytes = 4 * actual;
        EXPECT_EQ(errorOf(text, lim), "") << "estimate above 4 x " << actual << " bytes: " << text.substr(0, 40);
    }
}
#endif
