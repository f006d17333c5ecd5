// SPDX-License-Identifier: MIT
// Report header fields of the case file (docs/case-file.md): round trip, older files without
// them, wrong types named; and the findings table (RFC 4180 quoting rules, section 2).
#include <gtest/gtest.h>

#include <string>

#include "core/case_file.h"
#include "core/error.h"
#include "core/findings_table.h"

using namespace umbra::core;

namespace {

const char* kOld = R"({"format": "umbracase", "version": 1, "title": "old", "active_capture": 0, "captures": [], "findings": []})";

}  // namespace

TEST(ReportHeader, RoundTripOfEveryField) {
    CaseDocument d;
    d.title = "t";
    d.header = {"Weld W-12", "Yard 2", "2026-12-02", "A. B. (level 2)", "C. D. (level 3)", "P-17 rev. C", "Table 4, class 2"};
    const CaseDocument back = caseFromJson(caseToJson(d), "mem.umbracase");
    EXPECT_EQ(back.header, d.header);
    EXPECT_NE(caseToJson(d).find("\"report_header\""), std::string::npos);
}

TEST(ReportHeader, OlderCaseLoadsWithEmptyHeaderAndIsWrittenWithoutIt) {
    const CaseDocument d = caseFromJson(kOld, "old.umbracase");
    EXPECT_TRUE(d.header.empty());
    // An empty header adds nothing to the file (older readers see the file they know).
    EXPECT_EQ(caseToJson(d).find("report_header"), std::string::npos);
}

TEST(ReportHeader, WrongTypeIsNamed) {
    const std::string bad =
        R"({"format": "umbracase", "version": 1, "report_header": {"examiner": 3}, "active_capture": 0, "captures": []})";
    try {
        caseFromJson(bad, "bad.umbracase");
        FAIL() << "accepted a number as examiner";
    } catch (const InputError& e) {
        const std::string w = e.what();
        EXPECT_NE(w.find("bad.umbracase"), std::string::npos) << w;
        EXPECT_NE(w.find("report_header.examiner"), std::string::npos) << w;
    }
}

// RFC 4180, section 2, rules 5-7: fields holding commas, double quotes or line breaks are
// enclosed in double quotes; a double quote inside is escaped by another double quote.
TEST(FindingsTable, CsvFieldQuoting) {
    EXPECT_EQ(csvField("plain"), "plain");
    EXPECT_EQ(csvField("a,b"), "\"a,b\"");
    EXPECT_EQ(csvField("say \"hi\""), "\"say \"\"hi\"\"\"");
    EXPECT_EQ(csvField("two\nlines"), "\"two\nlines\"");
    EXPECT_EQ(csvField("cr\rhere"), "\"cr\rhere\"");
}

TEST(FindingsTable, OneRowPerFindingWithLevelsApart) {
    CaseDocument d;
    CaseCapture c;
    c.path = "/data/cap.h5";
    c.sha256 = std::string(64, 'a');
    c.measurements.push_back({"M1", MeasurementKind::ExtentBox, {{1, 2}, {3, 4}}, "box", 2});
    d.captures.push_back(c);
    Finding f;
    f.id = "F1";
    f.number = 1;
    f.indication.location = "here";
    f.indication.length_mm = 4.1;
    f.indication.measurement_ids = {"M1"};
    f.indication.description = "seen";
    f.interpretation = Interpretation::NonRelevant;
    f.interpretation_reason = "geometry";
    d.findings.push_back(f);
    const std::string csv = findingsCsv(d, "c.umbracase");
    // Header + one row, CRLF after each (RFC 4180 rule 1-3).
    size_t lines = 0;
    for (size_t i = csv.find("\r\n"); i != std::string::npos; i = csv.find("\r\n", i + 2)) ++lines;
    EXPECT_EQ(lines, 2u);
    EXPECT_NE(csv.find(",4.1,"), std::string::npos) << csv;  // shortest text of the recorded number
    EXPECT_NE(csv.find("non-relevant"), std::string::npos);
    EXPECT_NE(csv.find("not applicable"), std::string::npos);  // no evaluation of a non-relevant indication
    EXPECT_NE(csv.find("M1 (extent box, frame 3"), std::string::npos) << csv;
}
