// SPDX-License-Identifier: MIT
// A working session through the main window on small synthetic captures written by the test
// (one point reflector at 10 mm depth): undo after switching captures, a refused recipe value
// leaves panel, recipe and image in agreement, a cancelled top-view run leaves no progress
// behind and can be finished, the zoom survives a re-beamform, and a drawing tool drags an
// existing handle instead of drawing over it; the gain curve is edited as a table. These check the workstation's own behaviour
// (the documented contract of undo, the recipe panel and the view), not an outside value.
#include <gtest/gtest.h>

#include <QAction>
#include <QApplication>
#include <QDoubleSpinBox>
#include <QLabel>
#include <QMouseEvent>
#include <QProgressBar>
#include <QTableWidget>
#include <QPushButton>
#include <QToolButton>
#include <QUndoStack>

#include <cmath>

#include "core/measurement.h"
#include "ui/controller/case_controller.h"
#include "ui/findings/findings_pane.h"
#include "ui/main/main_window.h"
#include "ui/recipe/gain_curve_editor.h"
#include "ui/recipe/recipe_panel.h"
#include "ui/viewer/image_view.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::CaseController;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {

MainWindow::Options quiet() { return ui::test::quietOptions(); }

QString makeCapture(const QString& dir, const char* name, size_t frames, size_t elements = 8) {
    const QString p = dir + "/" + name;
    ui::test::writePointCapture(p.toStdString(), elements, frames);
    return p;
}

bool idle(const CaseController* ctl) { return ctl->hasImage() && !ctl->isBusy() && !ctl->isTopViewRunning(); }

/// Writes a point capture of `frames` frames into a fresh folder, opens it in `w` and waits
/// until nothing is running.
bool openNew(MainWindow& w, size_t frames = 1) {
    const QString a = makeCapture(ui::test::tempDir(), "a.h5", frames);
    return w.openPath(a) && waitUntil([&] { return idle(w.controller()); });
}

core::Measurement caliper(double x0, double z0, double x1, double z1) {
    core::Measurement m;
    m.kind = core::MeasurementKind::Caliper;
    m.frame_index = 0;
    m.points = {{x0, z0}, {x1, z1}};
    return m;
}

void send(QWidget* w, QEvent::Type type, const QPointF& pos) {
    const Qt::MouseButtons buttons = type == QEvent::MouseButtonRelease ? Qt::NoButton : Qt::MouseButtons(Qt::LeftButton);
    QMouseEvent e(type, pos, w->mapToGlobal(pos), type == QEvent::MouseMove ? Qt::NoButton : Qt::LeftButton, buttons, Qt::NoModifier);
    QApplication::sendEvent(w, &e);
}

void drag(QWidget* w, const QPointF& a, const QPointF& b) {
    send(w, QEvent::MouseButtonPress, a);
    for (int i = 1; i <= 5; ++i) send(w, QEvent::MouseMove, a + (b - a) * (i / 5.0));
    send(w, QEvent::MouseButtonRelease, b);
}

}  // namespace

// Undo covers every edit of the case: switching the capture in the toolbar keeps the history,
// and undoing an edit made on the other capture goes back to that capture and undoes it there.
TEST(session_test, undo_history_survives_switching_captures) {
    const QString dir = ui::test::tempDir();
    const QString a = makeCapture(dir, "a.h5", 1), b = makeCapture(dir, "b.h5", 1);
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(a));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage(); }));
    ctl->addCapture(b, false);

    const std::string key = ui::findRecipeKey(ctl->recipe(), "dynamic_range");
    ASSERT_FALSE(key.empty());
    const double dr_before = ctl->recipe().number(key);
    ctl->addMeasurement(caliper(-1, 9, 1, 11));
    ctl->editRecipeValue(key, std::to_string(dr_before + 12));
    ASSERT_EQ(ctl->measurements().size(), 1u);

    ctl->setActiveCapture(1);  // what the capture box in the toolbar does
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage(); }));
    EXPECT_EQ(ctl->activeCapture(), 1u);
    EXPECT_EQ(ctl->measurements().size(), 0u);
    EXPECT_DOUBLE_EQ(ctl->recipe().number(key), dr_before);  // each capture keeps its own recipe
    ASSERT_TRUE(ctl->undoStack()->canUndo()) << "switching captures wiped the undo history";

    // Undo the recipe edit: back on capture 0, with its dynamic range restored.
    ctl->undoStack()->undo();
    EXPECT_EQ(ctl->activeCapture(), 0u);
    EXPECT_DOUBLE_EQ(ctl->recipe().number(key), dr_before);
    ASSERT_EQ(ctl->measurements().size(), 1u);
    // Undo the caliper, then redo both.
    ctl->undoStack()->undo();
    EXPECT_EQ(ctl->measurements().size(), 0u);
    ctl->setActiveCapture(1);
    ctl->undoStack()->redo();
    EXPECT_EQ(ctl->activeCapture(), 0u);
    EXPECT_EQ(ctl->measurements().size(), 1u);
    ctl->undoStack()->redo();
    EXPECT_DOUBLE_EQ(ctl->recipe().number(key), dr_before + 12);
    // Capture 1 never saw any of it.
    const auto doc = ctl->document();
    EXPECT_TRUE(doc.captures.at(1).measurements.empty());
}

// A pixel step the capture cannot be reconstructed with (over the grid's pixel limit) is refused
// in the recipe panel: the recipe, the field and the image all keep the old step, and a note
// says why. A step with more decimals than the spin-box step (0.013 mm) is kept as typed.
TEST(session_test, refused_recipe_value_leaves_panel_recipe_and_image_in_agreement) {
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(openNew(w));
    // A wide region: 400 mm x 100 mm at 0.02 mm is 100 Mpx, over the 16 Mpx limit.
    for (const auto& [k, v] : {std::pair{"grid.step_mm", "0.5"}, {"grid.x_min_mm", "-200"}, {"grid.x_max_mm", "200"},
                               {"grid.z_max_mm", "100"}, {"grid.z_min_mm", "1"}})
        ctl->editRecipeValue(k, v);
    ASSERT_TRUE(waitUntil([&] { return idle(ctl); }));
    const double step_before = ctl->recipe().number("grid.step_mm");
    const double px_before = (ctl->envelope()->x_m[1] - ctl->envelope()->x_m[0]) * 1e3;
    EXPECT_NEAR(px_before, 0.5, 1e-9);
    const long runs_before = ctl->beamformRuns();

    auto* spin = qobject_cast<QDoubleSpinBox*>(w.recipePanel()->editorFor("grid.step_mm"));
    ASSERT_NE(spin, nullptr);
    spin->setValue(0.02);
    EXPECT_DOUBLE_EQ(ctl->recipe().number("grid.step_mm"), step_before) << "a refused step reached the recipe";
    EXPECT_DOUBLE_EQ(spin->value(), step_before) << "the field shows a step that is not in use";
    QLabel* note = nullptr;
    for (auto* l : w.recipePanel()->findChildren<QLabel*>())
        if (l->text().contains("Mpx")) note = l;
    ASSERT_NE(note, nullptr) << "no note says why the step was refused";
    EXPECT_FALSE(note->isHidden());
    QApplication::processEvents();
    EXPECT_EQ(ctl->beamformRuns(), runs_before);
    EXPECT_NEAR((ctl->envelope()->x_m[1] - ctl->envelope()->x_m[0]) * 1e3, px_before, 1e-9);

    // 0.013 mm is kept as 0.013 mm (not rounded to the field's step of 0.01 mm).
    ctl->editRecipeValue("grid.x_min_mm", "-3");
    ctl->editRecipeValue("grid.x_max_mm", "3");
    ctl->editRecipeValue("grid.z_max_mm", "12");
    spin->setValue(0.013);
    EXPECT_NEAR(ctl->recipe().number("grid.step_mm"), 0.013, 1e-12);
    EXPECT_TRUE(spin->text().startsWith("0.013")) << spin->text().toStdString();
    ASSERT_TRUE(waitUntil([&] { return idle(ctl); }));
    EXPECT_NEAR((ctl->envelope()->x_m[1] - ctl->envelope()->x_m[0]) * 1e3, 0.013, 1e-9);
}

// Stopping the background run of the top view hides the progress (no bar left at its last
// percentage) and offers to finish the missing frames, which then completes the top view.
TEST(session_test, cancelled_top_view_leaves_no_progress_and_can_be_finished) {
    MainWindow w(quiet());
    w.show();
    auto* ctl = w.controller();
    ASSERT_TRUE(openNew(w, 21));
    // A fine grid so each frame takes a moment and the run is still going when it is stopped.
    ctl->editRecipeValue("grid.step_mm", "0.01");
    // Stop on the first progress report of a background (top view) frame.
    bool stopped = false;
    QObject::connect(ctl, &CaseController::progressChanged, &w, [&](double, const QString& what) {
        if (!stopped && what.contains("top view")) {
            stopped = true;
            ctl->cancelReconstruction();
        }
    });
    ASSERT_TRUE(waitUntil([&] { return stopped; }));
    // Reports already queued by the worker arrive after the stop.
    waitUntil([] { return false; }, 400);
    auto* bar = w.findChild<QProgressBar*>();
    ASSERT_NE(bar, nullptr);
    EXPECT_TRUE(bar->isHidden()) << "progress left at " << bar->value() << " %";
    EXPECT_FALSE(ctl->isTopViewRunning());
    ASSERT_LT(ctl->topViewFramesDone(), ctl->frameCount());
    EXPECT_TRUE(ctl->topViewIncomplete());
    QPushButton* finish = w.findChild<QPushButton*>("finishTopView");
    ASSERT_NE(finish, nullptr);
    EXPECT_FALSE(finish->isHidden());

    const long runs_before = ctl->beamformRuns();
    const size_t done_before = ctl->topViewFramesDone();
    finish->click();
    EXPECT_TRUE(ctl->isTopViewRunning());
    ASSERT_TRUE(waitUntil([&] { return ctl->topViewFramesDone() == ctl->frameCount() && !ctl->isTopViewRunning(); }, 120000));
    // Only the missing frames were beamformed.
    EXPECT_EQ(ctl->beamformRuns() - runs_before, static_cast<long>(ctl->frameCount() - done_before));
    waitUntil([] { return false; }, 200);
    EXPECT_TRUE(bar->isHidden());
    EXPECT_FALSE(ctl->topViewIncomplete());
    EXPECT_TRUE(finish->isHidden());
}

// A re-beamform with another pixel step replaces the image (its extent moves by part of a
// pixel) but keeps the zoom (pixels per mm) and the centre the user chose.
TEST(session_test, zoom_and_centre_survive_a_rebeamform) {
    MainWindow w(quiet());
    w.show();
    auto* ctl = w.controller();
    ASSERT_TRUE(openNew(w));
    ui::ImageView* v = w.imageView();
    QApplication::processEvents();
    v->zoomBy(3.0);
    const QPointF c0 = v->transform().centreMm();
    // Pan: the select tool dragged over the image where there is no measurement.
    const QPointF from = v->transform().toPixel(c0);
    drag(v, from, from + QPointF(40, 25));
    const double scale = v->transform().pixelsPerMm();
    const QPointF centre = v->transform().centreMm();
    ASSERT_GT(std::abs(centre.x() - c0.x()), 0.1) << "the pan did not move the view";
    const QRectF extent_before = v->transform().extentMm();

    const auto* before = ctl->envelope();
    ctl->editRecipeValue("grid.step_mm", "0.07");
    ASSERT_TRUE(waitUntil([&] { return idle(ctl) && ctl->envelope() != before; }));
    QApplication::processEvents();
    ASSERT_NE(v->transform().extentMm(), extent_before) << "the test needs an image with another extent";
    EXPECT_NEAR(v->transform().pixelsPerMm(), scale, 1e-9 * scale);
    EXPECT_NEAR(v->transform().centreMm().x(), centre.x(), 1e-9);
    EXPECT_NEAR(v->transform().centreMm().y(), centre.y(), 1e-9);
    EXPECT_FALSE(v->transform().isFit());

    // At "fit" the view fits the new image again.
    v->fitToWindow();
    before = ctl->envelope();
    ctl->editRecipeValue("grid.step_mm", "0.05");
    ASSERT_TRUE(waitUntil([&] { return idle(ctl) && ctl->envelope() != before; }));
    QApplication::processEvents();
    EXPECT_TRUE(v->transform().isFit());
}

// With a drawing tool active, pressing on a handle of an existing measurement drags that handle
// (one measurement, moved) instead of starting a new measurement there.
TEST(session_test, drawing_tool_drags_an_existing_handle) {
    MainWindow w(quiet());
    w.resize(1400, 900);
    w.show();
    auto* ctl = w.controller();
    ASSERT_TRUE(openNew(w));
    ui::ImageView* v = w.imageView();
    QApplication::processEvents();
    const auto& vt = v->transform();
    const double tol = 1.0 / vt.pixelsPerMm();
    ctl->addMeasurement(caliper(-1.0, 9.0, 1.0, 11.0));
    ASSERT_EQ(ctl->measurements().size(), 1u);

    for (ui::Tool t : {ui::Tool::Caliper, ui::Tool::ExtentBox, ui::Tool::Ellipse, ui::Tool::DropSizing}) {
        v->setTool(t);
        const auto p = ctl->measurements()[0].points;
        const QPointF to(p[1].x_mm + 0.5, p[1].z_mm + 0.5);
        drag(v, vt.toPixel(QPointF(p[1].x_mm, p[1].z_mm)), vt.toPixel(to));
        ASSERT_EQ(ctl->measurements().size(), 1u) << "tool " << ui::toolName(t).toStdString() << " drew a new measurement";
        EXPECT_NEAR(ctl->measurements()[0].points[1].x_mm, to.x(), tol);
        EXPECT_NEAR(ctl->measurements()[0].points[1].z_mm, to.y(), tol);
        EXPECT_EQ(ctl->measurements()[0].points[0], p[0]);
    }
    // Away from any handle the tool still draws.
    v->setTool(ui::Tool::Caliper);
    drag(v, vt.toPixel(QPointF(-1.5, 5.0)), vt.toPixel(QPointF(1.5, 6.0)));
    EXPECT_EQ(ctl->measurements().size(), 2u);
}

// The TCG gain curve is edited as a table of (depth mm, gain dB) points; the recipe stores the
// text form. A curve whose depths do not increase is refused and the table shows the curve in use.
// Expected gains: linear interpolation between the points, held beyond (the stage's declared rule).
TEST(session_test, gain_curve_is_edited_as_a_table_of_points) {
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(openNew(w));
    auto* editor = qobject_cast<ui::GainCurveEditor*>(w.recipePanel()->editorFor("tgc.curve"));
    ASSERT_NE(editor, nullptr);
    QTableWidget* t = editor->table();
    ASSERT_EQ(t->rowCount(), 1);  // the default "0:0"
    ctl->editRecipeValue("tgc.mode", "curve");

    for (auto* b : editor->findChildren<QPushButton*>())
        if (b->text() == "Add point") b->click();
    ASSERT_EQ(t->rowCount(), 2);
    EXPECT_EQ(ctl->recipe().text("tgc.curve"), "0:0,5:0");
    t->item(1, 1)->setText("12");  // 12 dB at 5 mm
    EXPECT_EQ(ctl->recipe().text("tgc.curve"), "0:0,5:12");
    // Gain 12 dB x z / 5 mm between 1 and 4 mm, held at 12 dB between 8 and 12 mm: checked on the
    // TCG-corrected amplitude relative to the envelope.
    const auto* f = ctl->envelope();
    const auto& amp = ctl->tgcAmplitude();
    ASSERT_EQ(amp.size(), f->nx() * f->nz());
    int checked = 0;
    for (size_t iz = 0; iz < f->nz(); ++iz) {
        const double z_mm = f->z_m[iz] * 1e3;
        if ((z_mm < 1.0 || z_mm > 4.0) && (z_mm < 8.0 || z_mm > 12.0)) continue;
        const size_t ix = f->nx() / 2;
        const double e = f->envelope[iz * f->nx() + ix];
        if (!(e > 0)) continue;
        const double gain_db = 20 * std::log10(amp[iz * f->nx() + ix] / e);
        EXPECT_NEAR(gain_db, z_mm < 5 ? 12.0 * z_mm / 5.0 : 12.0, 1e-3) << "at " << z_mm << " mm";
        ++checked;
    }
    EXPECT_GT(checked, 10);

    // Depths that do not increase: refused, the table goes back to the curve in use.
    t->item(1, 0)->setText("0");
    EXPECT_EQ(ctl->recipe().text("tgc.curve"), "0:0,5:12");
    EXPECT_EQ(editor->curve(), "0:0,5:12");
}

// Ctrl+F (Add finding from the selected measurement) selects the new finding in the findings
// pane, so the user can describe it at once.
TEST(session_test, add_finding_selects_the_new_finding) {
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(openNew(w));
    const std::string id = ctl->addMeasurement(caliper(-1, 9, 1, 11));
    ctl->setSelectedMeasurement(QString::fromStdString(id));
    QAction* add = nullptr;
    for (auto* act : w.findChildren<QAction*>())
        if (act->shortcut() == QKeySequence(Qt::CTRL | Qt::Key_F)) add = act;
    ASSERT_NE(add, nullptr);
    add->trigger();
    ASSERT_EQ(ctl->findings().size(), 1u);
    auto* pane = w.findChild<ui::FindingsPane*>();
    ASSERT_NE(pane, nullptr);
    EXPECT_EQ(pane->selectedFindingId().toStdString(), ctl->findings()[0].id);
}
