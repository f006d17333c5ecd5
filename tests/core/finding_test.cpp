// SPDX-License-Identifier: MIT
// Findings keep indication, interpretation and evaluation apart (ASTM E1316 terms: an
// indication is interpreted as false, non-relevant or relevant; relevant indications are
// evaluated against acceptance criteria) and gate each level on the one before.
#include <gtest/gtest.h>

#include "core/finding.h"

using namespace umbra::core;

namespace {
Finding described() {
    Finding f;
    f.id = "F1";
    f.number = 1;
    f.indication.location = "frame 11 (y = 10.0 mm), x = 2.4 mm";
    f.indication.description = "Planar reflector, 4.1 mm long, 12 dB above reference.";
    return f;
}
}  // namespace

TEST(finding_test, interpretation_locked_until_location_and_description_given) {
    Finding f;
    EXPECT_FALSE(f.interpretationUnlocked());
    EXPECT_FALSE(f.interpretationLockReason().empty());
    f.indication.description = "Reflector at 12 mm depth.";
    EXPECT_FALSE(f.interpretationUnlocked());  // location still missing
    EXPECT_NE(f.interpretationLockReason().find("location"), std::string::npos);
    f.indication.location = "   \n";
    EXPECT_FALSE(f.interpretationUnlocked());  // blank does not count
    f.indication.location = "frame 3, x = 1.0 mm";
    EXPECT_TRUE(f.interpretationUnlocked());
    EXPECT_TRUE(f.interpretationLockReason().empty());
}

TEST(finding_test, evaluation_only_for_relevant_indications) {
    Finding f = described();
    EXPECT_FALSE(f.evaluationUnlocked());  // not interpreted yet
    EXPECT_NE(f.evaluationLockReason().find("interpret"), std::string::npos);
    f.interpretation = Interpretation::False;
    EXPECT_FALSE(f.evaluationUnlocked());
    EXPECT_FALSE(f.evaluationApplicable());
    EXPECT_NE(f.evaluationLockReason().find("Not applicable"), std::string::npos);
    f.interpretation = Interpretation::NonRelevant;
    EXPECT_FALSE(f.evaluationUnlocked());
    EXPECT_FALSE(f.evaluationApplicable());
    f.interpretation = Interpretation::Relevant;
    EXPECT_FALSE(f.evaluationUnlocked());  // an interpretation without a reason is not complete
    EXPECT_NE(f.evaluationLockReason().find("reason"), std::string::npos);
    f.interpretation_reason = "  ";
    EXPECT_FALSE(f.evaluationUnlocked());  // blank does not count
    f.interpretation_reason = "echo from both sides of the weld";
    EXPECT_TRUE(f.evaluationUnlocked());
    EXPECT_TRUE(f.evaluationApplicable());
    EXPECT_TRUE(f.evaluationLockReason().empty());
    // Emptying the description locks both levels again (values are kept).
    f.evaluation = Evaluation::Rejectable;
    f.indication.description.clear();
    EXPECT_FALSE(f.interpretationUnlocked());
    EXPECT_FALSE(f.evaluationUnlocked());
    EXPECT_EQ(f.evaluation, Evaluation::Rejectable);
}

// Descriptive reporting avoids hedges (common practice, no single published source).
TEST(finding_test, hedging_words_are_flagged_in_order) {
    EXPECT_EQ(hedgingWords("Possible crack, likely lack of fusion; porosity cannot be excluded."),
              (std::vector<std::string>{"possible", "likely", "cannot be excluded"}));
    EXPECT_EQ(hedgingWords("An APPARENT reflector, apparently planar."),
              (std::vector<std::string>{"apparent", "apparently"}));
    EXPECT_EQ(hedgingWords("Signal suspicious  for\na root crack, consistent with undercut."),
              (std::vector<std::string>{"suspicious for", "consistent with"}));
    EXPECT_EQ(hedgingWords("Significant reflector that may represent slag, suggestive of inclusion."),
              (std::vector<std::string>{"significant", "may represent", "suggestive of"}));
    EXPECT_EQ(hedgingWords("probably, possibly, probable, possible"),
              (std::vector<std::string>{"probably", "possibly", "probable", "possible"}));
    EXPECT_EQ(hedgingWords("It can’t be excluded."), (std::vector<std::string>{"can't be excluded"}));
}

TEST(finding_test, plain_description_is_not_flagged) {
    EXPECT_TRUE(hedgingWords("Planar reflector 4.1 mm long at 12.3 mm depth, peak +6 dB re reference; "
                             "scanning the cap side was impossible.").empty());
    EXPECT_TRUE(hedgingWords("").empty());
    EXPECT_TRUE(hedgingWords("Linear indication, 6 mm long, at the root, 14 dB above the reference.").empty());
    EXPECT_TRUE(hedgingWords("Insignia; possiblex").empty());
}

// In an interpretation's reason, the phrases that state an interpretation ("consistent with",
// "suggestive of") are its business; real hedges ("probably", "possible") are still flagged
// (common practice of descriptive reporting, no single published source).
TEST(finding_test, reason_hedges_leave_interpretive_phrases_alone) {
    EXPECT_TRUE(hedgingWordsInReason("Consistent with lack of fusion: echo from both sides, suggestive of a planar face.").empty());
    EXPECT_EQ(hedgingWordsInReason("Probably lack of fusion, consistent with the bevel angle; possible slag."),
              (std::vector<std::string>{"probably", "possible"}));
}

TEST(finding_test, hedging_note_names_the_words) {
    EXPECT_EQ(hedgingNote({"possible"}), "Describe what is seen: 'possible' is a hedge.");
    EXPECT_EQ(hedgingNote({"possible", "likely"}), "Describe what is seen: 'possible' and 'likely' are hedges.");
    EXPECT_EQ(hedgingNote({"significant"}),
              "Describe what is seen: 'significant' is for a statistical test; give the measured value instead.");
    EXPECT_EQ(hedgingNote({"possible", "significant"}),
              "Describe what is seen: 'possible' is a hedge; 'significant' is for a statistical test; "
              "give the measured value instead.");
    EXPECT_TRUE(hedgingNote({}).empty());
}

TEST(finding_test, enum_names_round_trip) {
    for (auto i : {Interpretation::Unset, Interpretation::False, Interpretation::NonRelevant,
                   Interpretation::Relevant})
        EXPECT_EQ(interpretationFromName(interpretationName(i)), i);
    for (auto e : {Evaluation::Unset, Evaluation::Acceptable, Evaluation::Rejectable, Evaluation::ReferForReview})
        EXPECT_EQ(evaluationFromName(evaluationName(e)), e);
    EXPECT_EQ(interpretationLabel(Interpretation::False), "false (artifact)");
    EXPECT_EQ(evaluationLabel(Evaluation::ReferForReview), "refer for review");
    EXPECT_FALSE(interpretationFromName("defect").has_value());
    EXPECT_FALSE(evaluationFromName("pass").has_value());
}

TEST(finding_test, next_finding_id_skips_used_numbers) {
    std::vector<Finding> fs(2);
    fs[0].id = "F2";
    fs[1].id = "F10";
    EXPECT_EQ(nextFindingId(fs), "F11");
    EXPECT_EQ(nextFindingId({}), "F1");
}
