// SPDX-License-Identifier: MIT
// Workstation behaviour through the main window and its controller, on a tiny synthetic
// capture written by the test (one point reflector at 10 mm depth): recipe panel <-> recipe,
// undo/redo, display-only edits without re-beamforming, case save/load round trip, auto-save
// recovery, a moved capture reported and relocated.
#include <gtest/gtest.h>

#include <QCheckBox>
#include <QComboBox>
#include <QDateTime>
#include <QDir>
#include <QDoubleSpinBox>
#include <QFile>
#include <QFileInfo>
#include <QSpinBox>
#include <QStandardPaths>
#include <QUndoStack>

#include <fstream>

#include "core/case_file.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/recipe/recipe_panel.h"
#include "ui/viewer/image_view.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::CaseController;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {

MainWindow::Options quiet(MainWindow::Recovery r = MainWindow::Recovery::Ignore) {
    MainWindow::Options o;
    o.interactive = false;
    o.recovery = r;
    o.autosave_seconds = 3600;
    return o;
}

QString makeCapture(const QString& dir, const char* name, size_t frames) {
    const QString p = dir + "/" + name;
    ui::test::writePointCapture(p.toStdString(), 8, frames);
    return p;
}

/// Opens and waits until the current frame's image is there.
bool openAndWait(MainWindow& w, const QString& path) {
    if (!w.openPath(path)) return false;
    return waitUntil([&] { return w.controller()->hasImage() || !w.controller()->captureProblem().isEmpty(); });
}

/// A display-only real parameter (dynamic range of the log compression), from the declarations.
std::string displayKey(const core::Recipe& r) { return ui::findRecipeKey(r, "dynamic_range"); }

/// A reconstruction parameter of kind Real (the receive f-number), from the declarations.
std::string beamformKey(const core::Recipe& r) {
    for (const auto& st : r.stages())
        for (const auto& p : st.params)
            if (!p.display_only && p.kind == core::ParamKind::Real && p.name.find("f_number") != std::string::npos)
                return st.name + "." + p.name;
    return {};
}

core::Measurement caliper(size_t frame, double x0, double z0, double x1, double z1) {
    core::Measurement m;
    m.kind = core::MeasurementKind::Caliper;
    m.frame_index = frame;
    m.points = {{x0, z0}, {x1, z1}};
    return m;
}

}  // namespace

// Setting a recipe panel editor changes the controller's recipe; loading a recipe (a whole-
// recipe edit, as File -> Load recipe does) updates the editors.
TEST(workstation_test, recipe_panel_and_recipe_stay_in_sync) {
    MainWindow w(quiet());
    auto* ctl = w.controller();
    const std::string key = displayKey(ctl->recipe());
    ASSERT_FALSE(key.empty()) << "no dynamic range parameter declared";
    auto* spin = qobject_cast<QDoubleSpinBox*>(w.recipePanel()->editorFor(key));
    ASSERT_NE(spin, nullptr);
    const core::ParamSpec spec = ctl->recipe().spec(key);  // a copy: the recipe is replaced below
    const double target = spec.min + 0.5 * (spec.max - spec.min);
    spin->setValue(target);
    EXPECT_NEAR(ctl->recipe().number(key), spin->value(), 1e-9);
    EXPECT_NEAR(spin->value(), target, std::pow(10.0, -spin->decimals()));

    // Every editor kind follows a loaded recipe.
    core::Recipe r = ctl->recipe();
    const double other = spec.min + 0.25 * (spec.max - spec.min);
    r.setNumber(key, other);
    std::string choice_key, choice_value;
    for (const auto& st : r.stages())
        for (const auto& p : st.params)
            if (p.kind == core::ParamKind::Choice && p.choices.size() > 1 && choice_key.empty()) {
                choice_key = st.name + "." + p.name;
                choice_value = p.choices[1] == r.text(choice_key) ? p.choices[0] : p.choices[1];
            }
    ASSERT_FALSE(choice_key.empty());
    r.setText(choice_key, choice_value);
    ctl->editRecipe(r, "Load recipe");
    EXPECT_NEAR(spin->value(), other, std::pow(10.0, -spin->decimals()));
    auto* combo = qobject_cast<QComboBox*>(w.recipePanel()->editorFor(choice_key));
    ASSERT_NE(combo, nullptr);
    EXPECT_EQ(combo->currentData().toString().toStdString(), choice_value);
    // Undo brings both back.
    ctl->undoStack()->undo();
    EXPECT_NEAR(spin->value(), target, std::pow(10.0, -spin->decimals()));
    EXPECT_NE(combo->currentData().toString().toStdString(), choice_value);
}

// A display-only edit re-maps the stored envelope (no Reconstructor run, image changes);
// a reconstruction edit runs the beamformer again. Undo/redo of a recipe edit.
TEST(workstation_test, display_only_edit_does_not_rebeamform_and_recipe_edit_undoes) {
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "one.h5", 1);
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(openAndWait(w, cap));
    ASSERT_TRUE(ctl->hasImage());
    const long runs = ctl->beamformRuns();
    EXPECT_EQ(runs, 1);
    const QImage before = ctl->image();
    const std::string dkey = displayKey(ctl->recipe());
    const double dr0 = ctl->recipe().number(dkey);
    ctl->editRecipeValue(dkey, std::to_string(dr0 / 2));
    EXPECT_EQ(ctl->beamformRuns(), runs);  // no re-beamforming
    EXPECT_NE(ctl->image(), before);       // but the picture changed
    EXPECT_NEAR(ctl->recipe().number(dkey), dr0 / 2, 1e-9);
    // Undo / redo of that edit.
    ctl->undoStack()->undo();
    EXPECT_NEAR(ctl->recipe().number(dkey), dr0, 1e-9);
    EXPECT_EQ(ctl->image(), before);
    ctl->undoStack()->redo();
    EXPECT_NEAR(ctl->recipe().number(dkey), dr0 / 2, 1e-9);
    EXPECT_EQ(ctl->beamformRuns(), runs);

    const std::string bkey = beamformKey(ctl->recipe());
    ASSERT_FALSE(bkey.empty());
    const core::ParamSpec spec = ctl->recipe().spec(bkey);
    const double f = std::min(spec.max, ctl->recipe().number(bkey) + 0.5);
    ctl->editRecipeValue(bkey, std::to_string(f));
    ASSERT_TRUE(waitUntil([&] { return ctl->beamformRuns() > runs && !ctl->isBusy(); }));
    EXPECT_EQ(ctl->beamformRuns(), runs + 1);
}

// Measurement add and move are undoable; the moved points come back on undo and go again on redo.
TEST(workstation_test, measurement_move_undo_redo) {
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "one.h5", 1);
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(openAndWait(w, cap));
    const std::string id = ctl->addMeasurement(caliper(0, -1, 9, 1, 11));
    ASSERT_NE(ctl->measurement(id), nullptr);
    const auto original = ctl->measurement(id)->points;
    const std::vector<core::PointMm> moved{{-2, 8}, {2, 12}};
    ctl->moveMeasurement(id, moved);
    EXPECT_EQ(ctl->measurement(id)->points, moved);
    ctl->undoStack()->undo();
    EXPECT_EQ(ctl->measurement(id)->points, original);
    ctl->undoStack()->redo();
    EXPECT_EQ(ctl->measurement(id)->points, moved);
    ctl->undoStack()->undo();
    ctl->undoStack()->undo();  // the add
    EXPECT_EQ(ctl->measurement(id), nullptr);
    EXPECT_TRUE(ctl->measurements().empty());
}

// Save a case through the main window and open it in a new window: same frame, recipe,
// measurements, findings, zoom and tool.
TEST(workstation_test, case_save_and_reopen_restores_what_was_on_screen) {
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "scan.h5", 3);
    const QString case_path = dir + "/review.umbracase";
    core::Recipe saved_recipe;
    std::vector<core::Measurement> saved_ms;
    std::vector<core::Finding> saved_fs;
    double zoom = 0;
    QPointF centre;
    {
        MainWindow w(quiet());
        auto* ctl = w.controller();
        ASSERT_TRUE(openAndWait(w, cap));
        ctl->setCurrentFrame(2);
        ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && ctl->envelope()->frame_index == 2; }));
        const std::string dkey = displayKey(ctl->recipe());
        ctl->editRecipeValue(dkey, "37");
        const std::string id = ctl->addMeasurement(caliper(2, -1.5, 9.5, 1.5, 10.5));
        ctl->addFindingFromMeasurement(id);
        w.imageView()->zoomBy(2.5);
        w.imageView()->setTool(ui::Tool::ExtentBox);
        saved_recipe = ctl->recipe();
        saved_ms = ctl->measurements();
        saved_fs = ctl->findings();
        zoom = w.imageView()->transform().zoom();
        centre = w.imageView()->transform().centreMm();
        EXPECT_TRUE(ctl->isDirty());
        ASSERT_TRUE(w.saveCaseTo(case_path));
        EXPECT_FALSE(ctl->isDirty());
    }
    MainWindow w2(quiet());
    auto* ctl = w2.controller();
    ASSERT_TRUE(openAndWait(w2, case_path));
    EXPECT_EQ(ctl->currentFrame(), 2u);
    EXPECT_EQ(ctl->envelope()->frame_index, 2u);
    EXPECT_TRUE(ctl->recipe() == saved_recipe);
    EXPECT_EQ(ctl->measurements(), saved_ms);
    EXPECT_EQ(ctl->findings(), saved_fs);
    ASSERT_EQ(ctl->findings().size(), 1u);
    EXPECT_EQ(ctl->findings()[0].indication.measurement_ids, std::vector<std::string>{saved_ms[0].id});
    EXPECT_NEAR(w2.imageView()->transform().zoom(), zoom, 1e-9);
    EXPECT_NEAR(w2.imageView()->transform().centreMm().x(), centre.x(), 1e-9);
    EXPECT_NEAR(w2.imageView()->transform().centreMm().y(), centre.y(), 1e-9);
    EXPECT_EQ(w2.imageView()->tool(), ui::Tool::ExtentBox);
    EXPECT_FALSE(ctl->isDirty());
}

// An autosave newer than the case is offered at open: with "recover" its content is loaded
// (and the case is marked modified); with "ignore" the saved case is loaded.
TEST(workstation_test, autosave_newer_than_case_is_recovered) {
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "one.h5", 1);
    const QString case_path = dir + "/c.umbracase";
    {
        MainWindow w(quiet());
        ASSERT_TRUE(openAndWait(w, cap));
        ASSERT_TRUE(w.saveCaseTo(case_path));
        w.controller()->addMeasurement(caliper(0, 0, 8, 1, 12));  // unsaved work
        w.autosaveNow();
    }
    const QString as = QString::fromStdString(core::autosavePath(case_path.toStdString()));
    ASSERT_TRUE(QFileInfo::exists(as));
    // Make the autosave clearly newer than the case (file times can be coarse).
    QFile f(as);
    ASSERT_TRUE(f.open(QIODevice::ReadWrite));
    ASSERT_TRUE(f.setFileTime(QFileInfo(case_path).lastModified().addSecs(30), QFileDevice::FileModificationTime));
    f.close();
    {
        MainWindow w(quiet(MainWindow::Recovery::Ignore));
        ASSERT_TRUE(openAndWait(w, case_path));
        EXPECT_TRUE(w.controller()->measurements().empty());
    }
    MainWindow w(quiet(MainWindow::Recovery::Recover));
    ASSERT_TRUE(openAndWait(w, case_path));
    ASSERT_EQ(w.controller()->measurements().size(), 1u);
    EXPECT_TRUE(w.controller()->isDirty());
    EXPECT_EQ(QFileInfo(w.controller()->casePath()).absoluteFilePath(), QFileInfo(case_path).absoluteFilePath());
}

// A moved capture is reported naming its path; measurements and findings are kept; a
// different file is refused (hash check); the right file relocates and the image comes back.
TEST(workstation_test, moved_capture_is_reported_and_relocatable) {
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "orig.h5", 1);
    const QString case_path = dir + "/m.umbracase";
    {
        MainWindow w(quiet());
        ASSERT_TRUE(openAndWait(w, cap));
        const std::string id = w.controller()->addMeasurement(caliper(0, -1, 10, 1, 10));
        w.controller()->addFindingFromMeasurement(id);
        ASSERT_TRUE(w.saveCaseTo(case_path));
    }
    QDir().mkpath(dir + "/moved");
    const QString moved = dir + "/moved/orig.h5";
    ASSERT_TRUE(QFile::rename(cap, moved));
    const QString other = makeCapture(dir, "other.h5", 2);  // a different capture

    MainWindow w(quiet());
    auto* ctl = w.controller();
    std::vector<QString> offered{other, moved};
    size_t asked = 0;
    w.relocationProvider = [&] { return asked < offered.size() ? offered[asked++] : QString(); };
    ASSERT_TRUE(w.openPath(case_path));
    // The first offer (a different capture) was refused: still missing, problem names the path.
    EXPECT_EQ(asked, 1u);
    EXPECT_FALSE(ctl->hasCapture());
    EXPECT_TRUE(ctl->captureProblem().contains(QFileInfo(cap).absoluteFilePath())) << ctl->captureProblem().toStdString();
    EXPECT_TRUE(ctl->captureProblem().contains("missing"));
    EXPECT_EQ(ctl->measurements().size(), 1u);
    EXPECT_EQ(ctl->findings().size(), 1u);
    // Saving now keeps everything (nothing is lost while the capture is missing).
    const core::CaseDocument doc = ctl->document();
    EXPECT_EQ(doc.captures.at(0).measurements.size(), 1u);
    // Second offer: the moved original.
    w.offerRelocation();
    EXPECT_EQ(asked, 2u);
    EXPECT_TRUE(ctl->captureProblem().isEmpty()) << ctl->captureProblem().toStdString();
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage(); }));
    EXPECT_EQ(QFileInfo(ctl->capturePath()).absoluteFilePath(), QFileInfo(moved).absoluteFilePath());
    EXPECT_EQ(ctl->measurements().size(), 1u);
    EXPECT_TRUE(ctl->isDirty());
}

// The exported PNG has the requested width and is not blank.
TEST(workstation_test, export_writes_png_at_the_chosen_width) {
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "one.h5", 1);
    MainWindow w(quiet());
    w.resize(1200, 800);
    ASSERT_TRUE(openAndWait(w, cap));
    w.controller()->addMeasurement(caliper(0, -1, 10, 1, 10));
    const QString png = dir + "/out.png";
    ASSERT_TRUE(w.exportImage(png, 1800));
    QImage img(png);
    ASSERT_FALSE(img.isNull());
    EXPECT_NEAR(img.width(), 1800, 3);  // visible image part plus axis and colour-bar margins
    EXPECT_GT(img.height(), 200);
}

// Two reconstruction edits in quick succession: the newer request supersedes the older one and
// the frame finally shown was made with the newest recipe (the frame records its recipe).
TEST(workstation_test, newer_beamforming_request_supersedes_older) {
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "one.h5", 1);
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(openAndWait(w, cap));
    const std::string bkey = beamformKey(ctl->recipe());
    ASSERT_FALSE(bkey.empty());
    const core::ParamSpec spec = ctl->recipe().spec(bkey);
    const double v1 = std::min(spec.max, 1.5), v2 = std::min(spec.max, 2.5);
    ctl->editRecipeValue(bkey, std::to_string(v1));
    ctl->editRecipeValue(bkey, std::to_string(v2));
    ASSERT_TRUE(waitUntil([&] { return !ctl->isBusy(); }));
    ASSERT_TRUE(ctl->hasImage());
    core::Recipe used = ctl->recipe();
    used.mergeJson(ctl->envelope()->recipe_json, "frame recipe");
    EXPECT_NEAR(used.number(bkey), v2, 1e-9);
    EXPECT_LE(ctl->beamformRuns(), 3);  // the first run, at most the superseded one, the last
}

// An untitled case (a capture opened, never saved) is auto-saved to the application's data
// folder and can be recovered as an untitled, modified case with its measurements.
TEST(workstation_test, untitled_case_autosave_is_recoverable) {
    QStandardPaths::setTestModeEnabled(true);  // keep the user's own folders out of it
    QFile::remove(CaseController::untitledAutosavePath());
    const QString dir = ui::test::tempDir();
    const QString cap = makeCapture(dir, "one.h5", 1);
    {
        MainWindow w(quiet());
        ASSERT_TRUE(openAndWait(w, cap));
        w.controller()->addMeasurement(caliper(0, -1, 9, 1, 11));
        w.autosaveNow();
    }
    ASSERT_TRUE(QFileInfo::exists(CaseController::untitledAutosavePath()));
    MainWindow w(quiet());
    w.controller()->recoverUntitled();
    ASSERT_TRUE(waitUntil([&] { return w.controller()->hasImage(); }));
    EXPECT_EQ(w.controller()->measurements().size(), 1u);
    EXPECT_TRUE(w.controller()->casePath().isEmpty());
    EXPECT_TRUE(w.controller()->isDirty());
    QFile::remove(CaseController::untitledAutosavePath());
}
