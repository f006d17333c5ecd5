// SPDX-License-Identifier: MIT
// The findings pane keeps indication, interpretation and evaluation apart and opens each level
// only when the one before is complete (ASTM E1316 terms); every user edit is reported with the
// new document. Driven with QTest key and mouse events on the offscreen platform.
#include <QComboBox>
#include <QGroupBox>
#include <QLabel>
#include <QLineEdit>
#include <QListWidget>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QSpinBox>
#include <QTest>

#include <gtest/gtest.h>

#include "ui/findings/findings_pane.h"

using namespace umbra;
using umbra::ui::FindingsPane;

namespace {

template <class T>
T* child(QWidget& w, const char* name) {
    T* c = w.findChild<T*>(QString::fromLatin1(name));
    EXPECT_NE(c, nullptr) << name;
    return c;
}

struct Recorder {
    int count = 0;
    core::CaseDocument last;
    explicit Recorder(FindingsPane& p) {
        QObject::connect(&p, &FindingsPane::edited, [this](const core::CaseDocument& d) {
            ++count;
            last = d;
        });
    }
};

void chooseByText(QComboBox* box, const QString& text) {
    const int i = box->findText(text);
    ASSERT_GE(i, 0) << text.toStdString();
    box->setCurrentIndex(i);  // what a user's pick does: currentIndexChanged
}

}  // namespace

TEST(findings_pane_test, caution_is_always_shown) {
    FindingsPane pane;
    pane.show();
    auto* caution = child<QLabel>(pane, "caution");
    EXPECT_TRUE(caution->isVisible());
    EXPECT_EQ(caution->text(), FindingsPane::cautionText());
    EXPECT_TRUE(caution->text().contains("does not decide"));
    // Not inside the scrolling part: adding findings cannot push it out of view.
    EXPECT_EQ(caution->parentWidget(), &pane);
}

TEST(findings_pane_test, interpretation_locked_until_indication_described) {
    FindingsPane pane;
    pane.show();
    QTest::mouseClick(child<QPushButton>(pane, "addFinding"), Qt::LeftButton);
    ASSERT_EQ(pane.findings().size(), 1u);
    auto* fields = child<QWidget>(pane, "interpretationFields");
    auto* lock = child<QLabel>(pane, "interpretationLock");
    EXPECT_FALSE(fields->isEnabled());
    EXPECT_TRUE(lock->isVisible());
    EXPECT_TRUE(lock->text().contains("describe"));

    QTest::keyClicks(child<QLineEdit>(pane, "location"), "frame 3, x = 2.4 mm");
    EXPECT_FALSE(fields->isEnabled());  // description still empty
    QTest::keyClicks(child<QPlainTextEdit>(pane, "description"), "Planar reflector, 4 mm long.");
    EXPECT_TRUE(fields->isEnabled());
    EXPECT_FALSE(lock->isVisible());

    // Removing the description locks it again.
    child<QPlainTextEdit>(pane, "description")->clear();
    EXPECT_FALSE(fields->isEnabled());
}

TEST(findings_pane_test, evaluation_locked_until_interpreted_relevant) {
    FindingsPane pane;
    pane.show();
    pane.addFinding();
    QTest::keyClicks(child<QLineEdit>(pane, "location"), "frame 1, x = 0 mm");
    QTest::keyClicks(child<QPlainTextEdit>(pane, "description"), "Echo at 30 mm depth.");
    auto* fields = child<QWidget>(pane, "evaluationFields");
    auto* lock = child<QLabel>(pane, "evaluationLock");
    auto* cls = child<QComboBox>(pane, "interpretationClass");
    EXPECT_FALSE(fields->isEnabled());
    EXPECT_TRUE(lock->text().contains("interpret"));

    chooseByText(cls, "false (artifact)");
    EXPECT_FALSE(fields->isEnabled());
    EXPECT_TRUE(lock->text().contains("Not applicable"));
    chooseByText(cls, "non-relevant");
    EXPECT_FALSE(fields->isEnabled());
    chooseByText(cls, "relevant");
    // An interpretation is complete with its reason: evaluation stays locked until one is given.
    EXPECT_FALSE(fields->isEnabled());
    EXPECT_TRUE(lock->text().contains("reason")) << lock->text().toStdString();
    QTest::keyClicks(child<QLineEdit>(pane, "interpretationReason"), "echo from both sides of the weld");
    EXPECT_TRUE(fields->isEnabled());
    EXPECT_FALSE(lock->isVisible());
    EXPECT_EQ(pane.findings()[0].interpretation, core::Interpretation::Relevant);
}

TEST(findings_pane_test, every_edit_reports_the_new_document) {
    FindingsPane pane;
    pane.show();
    Recorder rec(pane);
    QTest::keyClicks(child<QPlainTextEdit>(pane, "background"), "Repair check");
    EXPECT_EQ(rec.last.background, "Repair check");
    const int after_background = rec.count;
    EXPECT_GE(after_background, 1);

    pane.addFinding();
    EXPECT_EQ(rec.count, after_background + 1);
    ASSERT_EQ(rec.last.findings.size(), 1u);
    EXPECT_EQ(rec.last.findings[0].id, "F1");
    EXPECT_EQ(rec.last.findings[0].number, 1);

    QTest::keyClicks(child<QLineEdit>(pane, "location"), "frame 2");
    QTest::keyClicks(child<QLineEdit>(pane, "peakDb"), "-6.5");
    QTest::keyClicks(child<QLineEdit>(pane, "depth"), "12.25");
    QTest::keyClicks(child<QLineEdit>(pane, "reference"), "SDH 2.5 mm");
    QTest::keyClicks(child<QLineEdit>(pane, "links"), "M1, M4");
    QTest::keyClicks(child<QPlainTextEdit>(pane, "description"), "Round reflector.");
    child<QSpinBox>(pane, "frame")->setValue(5);
    chooseByText(child<QComboBox>(pane, "interpretationClass"), "relevant");
    QTest::keyClicks(child<QLineEdit>(pane, "interpretationReason"), "seen from two sides");
    chooseByText(child<QComboBox>(pane, "evaluationOutcome"), "refer for review");
    QTest::keyClicks(child<QLineEdit>(pane, "criterion"), "procedure clause 7");
    QTest::keyClicks(child<QPlainTextEdit>(pane, "priorComparison"), "none");

    const core::Finding& f = rec.last.findings.at(0);
    EXPECT_EQ(f.indication.location, "frame 2");
    EXPECT_EQ(f.indication.peak_db, -6.5);
    EXPECT_EQ(f.indication.depth_mm, 12.25);
    EXPECT_FALSE(f.indication.x_mm.has_value());
    EXPECT_EQ(f.indication.reference, "SDH 2.5 mm");
    EXPECT_EQ(f.indication.measurement_ids, (std::vector<std::string>{"M1", "M4"}));
    EXPECT_EQ(f.indication.description, "Round reflector.");
    EXPECT_EQ(f.indication.frame_index, 4u);  // shown 1-based
    EXPECT_EQ(f.interpretation, core::Interpretation::Relevant);
    EXPECT_EQ(f.interpretation_reason, "seen from two sides");
    EXPECT_EQ(f.evaluation, core::Evaluation::ReferForReview);
    EXPECT_EQ(f.criterion, "procedure clause 7");
    EXPECT_EQ(rec.last.prior_comparison, "none");
    EXPECT_EQ(rec.last.background, "Repair check");
    EXPECT_TRUE(rec.last == pane.document());

    // Clearing a number makes it "not measured" again.
    child<QLineEdit>(pane, "peakDb")->selectAll();
    QTest::keyClick(child<QLineEdit>(pane, "peakDb"), Qt::Key_Backspace);
    EXPECT_FALSE(rec.last.findings[0].indication.peak_db.has_value());

    // Removing the finding is an edit too.
    QTest::mouseClick(child<QPushButton>(pane, "removeFinding"), Qt::LeftButton);
    EXPECT_TRUE(rec.last.findings.empty());
}

TEST(findings_pane_test, findings_edited_names_the_edit) {
    FindingsPane pane;
    QStringList whats;
    QObject::connect(&pane, &FindingsPane::findingsEdited,
                     [&](const std::vector<core::Finding>&, const QString& what) { whats << what; });
    pane.addFinding();
    QTest::keyClicks(child<QLineEdit>(pane, "location"), "x");
    ASSERT_EQ(whats.size(), 2);
    EXPECT_EQ(whats[0], "Add finding 1");
    EXPECT_EQ(whats[1], "Edit location");
}

TEST(findings_pane_test, hedging_word_is_flagged_quietly) {
    FindingsPane pane;
    pane.show();
    pane.addFinding();
    auto* note = child<QLabel>(pane, "hedgeNote");
    auto* desc = child<QPlainTextEdit>(pane, "description");
    EXPECT_FALSE(note->isVisible());
    QTest::keyClicks(desc, "Possible crack at the root");
    EXPECT_TRUE(note->isVisible());
    EXPECT_EQ(note->text(), "Describe what is seen: 'possible' is a hedge.");
    desc->clear();
    QTest::keyClicks(desc, "Linear reflector 6 mm long at the root");
    EXPECT_FALSE(note->isVisible());
    // The hedge does not block anything: it is advice, not a lock.
    QTest::keyClicks(child<QLineEdit>(pane, "location"), "frame 1");
    EXPECT_TRUE(child<QWidget>(pane, "interpretationFields")->isEnabled());
    // A hedge in the interpretation's reason is pointed out as well.
    QTest::keyClicks(child<QLineEdit>(pane, "interpretationReason"), "probably lack of fusion");
    EXPECT_TRUE(note->isVisible());
    EXPECT_TRUE(note->text().contains("'probably'")) << note->text().toStdString();
    child<QLineEdit>(pane, "interpretationReason")->clear();
    QTest::keyClicks(child<QLineEdit>(pane, "interpretationReason"), "echo from both sides of the weld");
    EXPECT_FALSE(note->isVisible());
}

TEST(findings_pane_test, set_document_shows_it_without_reporting_an_edit) {
    core::CaseDocument d;
    d.background = "Ordered after a leak test (synthetic).";
    d.technique = "FMC, 64 elements, 5 MHz";
    d.pertinent_negatives = {"no root indications", "no transverse reflectors"};
    d.prior_comparison = "first examination";
    core::Finding f;
    f.id = "F7";
    f.number = 3;
    f.indication.location = "frame 4, x = 1.0 mm";
    f.indication.description = "Planar reflector.";
    f.indication.x_mm = 1.0;
    f.interpretation = core::Interpretation::NonRelevant;
    f.interpretation_reason = "geometry (root bead)";
    d.findings = {f};

    FindingsPane pane;
    pane.show();
    Recorder rec(pane);
    pane.setDocument(d);
    EXPECT_EQ(rec.count, 0);
    EXPECT_TRUE(pane.document() == d);
    EXPECT_EQ(child<QPlainTextEdit>(pane, "technique")->toPlainText(), "FMC, 64 elements, 5 MHz");
    EXPECT_TRUE(child<QPlainTextEdit>(pane, "technique")->isReadOnly());
    EXPECT_EQ(child<QListWidget>(pane, "negatives")->count(), 2);
    auto* list = child<QListWidget>(pane, "findingList");
    ASSERT_EQ(list->count(), 1);
    EXPECT_TRUE(list->item(0)->text().contains("#3"));
    EXPECT_TRUE(list->item(0)->text().contains("non-relevant"));

    pane.selectFinding("F7");
    EXPECT_EQ(pane.selectedFindingId(), "F7");
    EXPECT_EQ(child<QLineEdit>(pane, "x")->text(), "1");
    EXPECT_EQ(child<QComboBox>(pane, "interpretationClass")->currentText(), "non-relevant");
    EXPECT_TRUE(child<QWidget>(pane, "interpretationFields")->isEnabled());
    EXPECT_FALSE(child<QWidget>(pane, "evaluationFields")->isEnabled());
    EXPECT_EQ(rec.count, 0);

    // An undo that changes another field leaves the text being typed (and its cursor) alone.
    auto* desc = child<QPlainTextEdit>(pane, "description");
    desc->moveCursor(QTextCursor::End);
    QTest::keyClicks(desc, " 3 mm");
    const int cursor = desc->textCursor().position();
    auto fs = pane.findings();
    fs[0].interpretation_reason = "changed by undo";
    pane.setFindings(fs);
    EXPECT_EQ(desc->textCursor().position(), cursor);
    EXPECT_EQ(child<QLineEdit>(pane, "interpretationReason")->text(), "changed by undo");
}

TEST(findings_pane_test, finding_from_measurement_is_prefilled_but_not_described) {
    FindingsPane pane;
    core::Measurement box{"M3", core::MeasurementKind::ExtentBox, {{-2, 10}, {2.5, 11.75}}, "", 6};
    pane.addFindingFromMeasurement(box, 0.0, "y = 6.0 mm");
    ASSERT_EQ(pane.findings().size(), 1u);
    const core::Indication& in = pane.findings()[0].indication;
    EXPECT_EQ(in.frame_index, 6u);
    EXPECT_DOUBLE_EQ(*in.x_mm, 0.25);
    EXPECT_DOUBLE_EQ(*in.depth_mm, 10.0);
    EXPECT_DOUBLE_EQ(*in.length_mm, 4.5);
    EXPECT_DOUBLE_EQ(*in.height_mm, 1.75);
    EXPECT_EQ(in.measurement_ids, (std::vector<std::string>{"M3"}));
    EXPECT_EQ(in.location, "frame 7 (y = 6.0 mm), x = 0.25 mm");
    EXPECT_TRUE(in.description.empty());
    EXPECT_FALSE(child<QWidget>(pane, "interpretationFields")->isEnabled());
    EXPECT_EQ(pane.selectedFindingId(), "F1");

    // Ellipse: bounding box of centre (0, 10) with semi-axes 5 (x) and 3 (z); surface at z = 2.
    core::Measurement e{"M4", core::MeasurementKind::Ellipse, {{0, 10}, {5, 10}, {0, 13}}, "", 0};
    pane.addFindingFromMeasurement(e, 2.0);
    const core::Indication& ie = pane.findings()[1].indication;
    EXPECT_EQ(pane.findings()[1].number, 2);
    EXPECT_DOUBLE_EQ(*ie.length_mm, 10.0);
    EXPECT_DOUBLE_EQ(*ie.height_mm, 6.0);
    EXPECT_DOUBLE_EQ(*ie.depth_mm, 5.0);  // top at z = 7, surface at 2

    // Depth marker: no extent.
    core::Measurement d{"M5", core::MeasurementKind::DepthMarker, {{1, 20}}, "", 0};
    pane.addFindingFromMeasurement(d);
    EXPECT_FALSE(pane.findings()[2].indication.length_mm.has_value());
    EXPECT_DOUBLE_EQ(*pane.findings()[2].indication.depth_mm, 20.0);
}

TEST(findings_pane_test, pertinent_negatives_are_editable) {
    FindingsPane pane;
    pane.show();
    Recorder rec(pane);
    auto* list = child<QListWidget>(pane, "negatives");
    QTest::mouseClick(child<QPushButton>(pane, "addNegative"), Qt::LeftButton);
    ASSERT_EQ(list->count(), 1);
    list->item(0)->setText("no lack of sidewall fusion");  // what committing the editor does
    EXPECT_EQ(rec.last.pertinent_negatives, (std::vector<std::string>{"no lack of sidewall fusion"}));
    list->setCurrentRow(0);
    QTest::mouseClick(child<QPushButton>(pane, "removeNegative"), Qt::LeftButton);
    EXPECT_TRUE(rec.last.pertinent_negatives.empty());
}

TEST(findings_pane_test, unknown_linked_measurement_is_pointed_out) {
    FindingsPane pane;
    pane.show();
    pane.setKnownMeasurements({"M1", "M2"});
    pane.addFinding();
    QTest::keyClicks(child<QLineEdit>(pane, "links"), "M1 M9");
    auto* note = child<QLabel>(pane, "linkNote");
    EXPECT_TRUE(note->isVisible());
    EXPECT_TRUE(note->text().contains("M9"));
    EXPECT_FALSE(note->text().contains("M1"));
}
