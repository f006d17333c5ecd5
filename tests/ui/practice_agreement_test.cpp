// SPDX-License-Identifier: MIT
// Practice mode, blind copy and the agreement view in the workstation. References: the answer
// file written here (true depth of the synthetic point reflector: 10 mm, ui_test_support.h),
// Bland & Altman (1986) for the progress view (bias = mean of measured − true).
#include <gtest/gtest.h>

#include <QAbstractButton>
#include <QDir>
#include <QFile>
#include <QLabel>
#include <QListWidget>
#include <QTableWidget>

#include <fstream>

#include "core/case_file.h"
#include "core/practice.h"
#include "ui/agreement/agreement_dialog.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/practice/bland_altman_plot.h"
#include "ui/practice/practice_panel.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {

QString writePracticeSet(const QString& dir) {
    const QString cap = dir + "/set_p.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    std::ofstream(dir.toStdString() + "/set_p.answers.json")
        << R"J({"scenario": "set_p", "note": "test set (synthetic)",
              "structures": [{"label": "point P1", "kind": "point reflector", "depth_mm": 10},
                             {"label": "band P2", "kind": "band", "length_mm": 4}]})J";
    return cap;
}

/// Every text a user can read in a widget tree (labels, list items, table cells).
QString visibleText(QWidget* root) {
    QString all;
    for (auto* l : root->findChildren<QLabel*>()) all += l->text() + "\n";
    for (auto* l : root->findChildren<QListWidget*>())
        for (int i = 0; i < l->count(); ++i) all += l->item(i)->text() + "\n";
    for (auto* t : root->findChildren<QTableWidget*>())
        if (t->isVisible())
            for (int r = 0; r < t->rowCount(); ++r)
                for (int c = 0; c < t->columnCount(); ++c)
                    if (t->item(r, c)) all += t->item(r, c)->text() + "\n";
    return all;
}

core::Measurement depthMarker(double z, const std::string& label) {
    core::Measurement m;
    m.kind = core::MeasurementKind::DepthMarker;
    m.points = {{0.0, z}};
    m.label = label;
    return m;
}

}  // namespace

TEST(practice_ui_test, answers_hidden_until_submit_then_scored_logged_and_locked) {
    const QString dir = ui::test::tempDir();
    const QString cap = writePracticeSet(dir);
    MainWindow w(ui::test::quietOptions());
    ASSERT_TRUE(w.startPractice(cap, "Trainee T", dir + "/logs"));
    ASSERT_TRUE(waitUntil([&] { return w.controller()->hasImage() && !w.controller()->isBusy(); }));
    ui::PracticePanel* p = w.practicePanel();
    ASSERT_TRUE(p && p->active());
    // Before submission nothing shows a true value (10 mm, 4 mm), only what to measure.
    const QString before = visibleText(p);
    EXPECT_TRUE(before.contains("point P1: depth")) << before.toStdString();
    EXPECT_FALSE(before.contains("10")) << before.toStdString();
    EXPECT_FALSE(before.contains("4 mm")) << before.toStdString();
    QString why;
    EXPECT_FALSE(p->submit(&why));  // nothing labelled yet
    EXPECT_TRUE(why.contains("Label selected")) << why.toStdString();
    // Measure, label through the panel, submit.
    const std::string id = w.controller()->addMeasurement(depthMarker(10.3, ""));
    w.controller()->setSelectedMeasurement(QString::fromStdString(id));
    ASSERT_TRUE(p->labelSelected("point P1"));
    EXPECT_EQ(w.controller()->measurement(id)->label, "point P1");
    ASSERT_TRUE(p->submit(&why)) << why.toStdString();
    ASSERT_EQ(p->lastAttempt().results.size(), 1u);
    EXPECT_NEAR(p->lastAttempt().results[0].error_mm, 0.3, 1e-9);  // 10.3 − 10 (answer file)
    EXPECT_EQ(p->resultsTable()->rowCount(), 1);
    EXPECT_TRUE(p->resultsTable()->item(0, 2)->text().contains("10 mm"));
    EXPECT_TRUE(p->summaryText().contains("synthetic"));
    EXPECT_TRUE(p->summaryText().contains("band P2"));  // not measured
    EXPECT_FALSE(p->submit(&why));                      // locked
    // The log file of this trainee holds the attempt.
    const core::PracticeLog log = core::loadPracticeLog((dir + "/logs").toStdString(), "Trainee T");
    ASSERT_EQ(log.attempts.size(), 1u);
    EXPECT_EQ(log.attempts[0].results[0], p->lastAttempt().results[0]);
    // A second attempt, then the progress view: bias over both = mean error.
    p->newAttempt();
    EXPECT_TRUE(w.controller()->measurements().empty());
    w.controller()->addMeasurement(depthMarker(9.9, "point P1"));
    ASSERT_TRUE(p->submit(&why)) << why.toStdString();
    QWidget* dlg = p->showProgress(false);
    auto* plot = dlg->findChild<ui::BlandAltmanPlot*>("practiceBlandAltman");
    ASSERT_TRUE(plot);
    EXPECT_EQ(plot->data().n, 2u);
    EXPECT_NEAR(plot->data().bias, (0.3 - 0.1) / 2, 1e-9);
    dlg->close();
    // Opening another capture ends practice mode and unlocks the tools.
    const QString other = dir + "/other.h5";
    ui::test::writePointCapture(other.toStdString(), 8, 1);
    ASSERT_TRUE(w.openPath(other));
    EXPECT_FALSE(p->active());
}

TEST(practice_ui_test, blind_copy_and_agreement_dialog) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    MainWindow w(ui::test::quietOptions());
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(waitUntil([&] { return w.controller()->hasImage() && !w.controller()->isBusy(); }));
    const std::string id = w.controller()->addMeasurement(depthMarker(10, "first reader's marker"));
    const std::string fid = w.controller()->addFindingFromMeasurement(id);
    ASSERT_FALSE(fid.empty());
    w.controller()->setTitle("Case of the first reader");
    const QString first = dir + "/first.umbracase";
    ASSERT_TRUE(w.saveCaseTo(first));
    const QString blind = dir + "/blind.umbracase";
    ASSERT_TRUE(w.makeBlindCopy(blind));
    QFile f(blind);
    ASSERT_TRUE(f.open(QIODevice::ReadOnly));
    const QString text = QString::fromUtf8(f.readAll());
    EXPECT_FALSE(text.contains("first reader")) << text.toStdString();
    // Second reading: the blind copy opens and a reader adds the same indication.
    ASSERT_TRUE(w.openPath(blind));
    ASSERT_TRUE(waitUntil([&] { return w.controller()->hasImage() && !w.controller()->isBusy(); }));
    EXPECT_TRUE(w.controller()->findings().empty());
    const std::string id2 = w.controller()->addMeasurement(depthMarker(10.5, "second"));
    ASSERT_FALSE(w.controller()->addFindingFromMeasurement(id2).empty());
    ASSERT_TRUE(w.saveCaseTo(blind));
    ui::AgreementDialog dlg;
    ASSERT_TRUE(dlg.setCases({first, blind})) << dlg.summaryText().toStdString();
    EXPECT_EQ(dlg.result()->matched, 1u);
    EXPECT_TRUE(dlg.summaryText().contains("Found by every reader: 1")) << dlg.summaryText().toStdString();
    // Cases on other captures: a message, no result.
    const QString other = dir + "/other.h5";
    ui::test::writePointCapture(other.toStdString(), 6, 1);
    core::CaseDocument d = core::loadCase(blind.toStdString());
    d.captures[0].sha256 = std::string(64, '0');
    core::saveCase((dir + "/other.umbracase").toStdString(), d);
    EXPECT_FALSE(dlg.setCases({first, dir + "/other.umbracase"}));
    EXPECT_TRUE(dlg.summaryText().contains("SHA-256")) << dlg.summaryText().toStdString();
}
