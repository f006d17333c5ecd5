// SPDX-License-Identifier: MIT
// The weld overlay in the workstation: entered through the controller as an undoable edit,
// refused when invalid, drawn over the image (and hidden on request), saved with the case and
// back after loading it; calibration lines (speed of sound, element health) in the technique
// block, undoable.
#include <gtest/gtest.h>

#include <QImage>
#include <QUndoStack>

#include <cmath>

#include "core/error.h"
#include "reconstruction/simulate/scene.h"
#include "reconstruction/simulate/simulator.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/viewer/image_view.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {

core::WeldGeometry testWeld() {
    core::WeldGeometry w;
    w.shape = core::WeldShape::V;
    w.thickness_mm = 8;  // the test capture's image reaches below 8 mm
    w.centre_x_mm = 0.5;
    w.bevel_angle_deg = 30;
    w.root_gap_mm = 1;
    return w;
}

// Brightness of the widget grab at a point in mm (mean of a 3 x 3 patch).
double brightnessAt(const QImage& img, const ui::ImageView& v, double x_mm, double z_mm) {
    const QPointF p = v.transform().toPixel(QPointF(x_mm, z_mm)) * img.devicePixelRatio();
    double sum = 0;
    for (int dy = -1; dy <= 1; ++dy)
        for (int dx = -1; dx <= 1; ++dx) {
            const QColor c = img.pixelColor(int(std::lround(p.x())) + dx, int(std::lround(p.y())) + dy);
            sum += (c.red() + c.green() + c.blue()) / 3.0;
        }
    return sum / 9;
}

// A 16-element full matrix on a 10 mm steel plate (5920 m/s) with its back wall, plus
// `extra_reflectors` (JSON members after the back wall), simulated into the test folder.
QString simulatePlate(const QString& name, const std::string& extra_reflectors, int seed) {
    const QString cap = ui::test::tempDir() + "/" + name + ".h5";
    const std::string scene = R"J({"title": "plate (synthetic)", "scenario": "ui_calibration", "seed": )J" + std::to_string(seed) + R"J(,
      "array": {"elements": 16, "pitch_mm": 0.6, "element_width_mm": 0.5, "centre_frequency_mhz": 5, "fractional_bandwidth": 0.6},
      "transmit": {"kind": "single_element"}, "sampling": {"frequency_mhz": 50, "samples": 500},
      "medium": {"speed_m_s": 5920, "thickness_mm": 10},
      "reflectors": {"back_wall": {"depth_mm": 10})J" + extra_reflectors + R"J(}, "noise": {"snr_db": 40, "reference": "peak"}})J";
    recon::sim::simulateToFile(recon::sim::parseScene(scene, name.toStdString()), cap.toStdString());
    return cap;
}

}  // namespace

TEST(weld_overlay_test, entered_drawn_undone_and_saved_with_the_case) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    const QString case_path = dir + "/weld.umbracase";
    {
        MainWindow w(ui::test::quietOptions());
        w.resize(1200, 800);
        auto* ctl = w.controller();
        ASSERT_TRUE(w.openPath(cap));
        ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
        EXPECT_FALSE(ctl->weld().has_value());
        EXPECT_TRUE(w.imageView()->scene().weld.empty());

        // An invalid geometry is refused naming the field; nothing changes.
        core::WeldGeometry bad = testWeld();
        bad.root_face_mm = 9;
        try {
            ctl->editWeld(bad, "Enter the weld geometry");
            FAIL();
        } catch (const core::SettingError& e) {
            EXPECT_NE(std::string(e.what()).find("weld.root_face_mm"), std::string::npos);
        }
        EXPECT_FALSE(ctl->weld().has_value());
        const int undo_before = ctl->undoStack()->count();

        ctl->editWeld(testWeld(), "Enter the weld geometry");
        ASSERT_TRUE(ctl->weld().has_value());
        EXPECT_EQ(ctl->undoStack()->count(), undo_before + 1);
        EXPECT_TRUE(ctl->techniqueText().contains("Weld: single V, plate 8 mm"));
        // Direct, first and second skip of faces, cap, root and the plate boundary.
        EXPECT_EQ(w.imageView()->scene().weld.size(), 15u);

        // Drawn: the back wall line (z = 8 mm) is bright on the dark image away from the point
        // reflector, and gone when the overlay is hidden.
        w.show();
        ASSERT_TRUE(waitUntil([&] { return w.imageView()->isVisible(); }));
        w.imageView()->fitToWindow();
        const QImage on = w.imageView()->grab().toImage();
        w.imageView()->setWeldVisible(false);
        const QImage off = w.imageView()->grab().toImage();
        w.imageView()->setWeldVisible(true);
        const double x_probe = -1.5;  // between the point reflector (x = 0) and the image edge
        EXPECT_GT(brightnessAt(on, *w.imageView(), x_probe, 8.0), brightnessAt(off, *w.imageView(), x_probe, 8.0) + 40);
        on.save("/tmp/umbra_weld_overlay_test.png");

        ctl->undoStack()->undo();
        EXPECT_FALSE(ctl->weld().has_value());
        ctl->undoStack()->redo();
        ASSERT_TRUE(ctl->weld().has_value());
        EXPECT_TRUE(*ctl->weld() == testWeld());
        ctl->saveCase(case_path);
    }
    // A new window opens the case: the geometry is back, drawn, and in the technique block.
    MainWindow w2(ui::test::quietOptions());
    auto* ctl2 = w2.controller();
    ASSERT_TRUE(w2.openPath(case_path));
    ASSERT_TRUE(ctl2->weld().has_value());
    EXPECT_TRUE(*ctl2->weld() == testWeld());
    ASSERT_TRUE(waitUntil([&] { return ctl2->hasImage() && !ctl2->isBusy(); }));
    EXPECT_EQ(w2.imageView()->scene().weld.size(), 15u);
    EXPECT_TRUE(ctl2->techniqueText().contains("Weld: single V"));
    // Removing the overlay is one undoable edit too.
    ctl2->editWeld(std::nullopt, "Remove the weld overlay");
    EXPECT_TRUE(w2.imageView()->scene().weld.empty());
    ctl2->undoStack()->undo();
    EXPECT_EQ(w2.imageView()->scene().weld.size(), 15u);
}

// Speed of sound from the back wall of a simulated 10 mm steel plate (5920 m/s) and the
// element check go into the technique block and are undoable.
TEST(weld_overlay_test, calibration_goes_into_the_technique_block) {
    const QString cap = simulatePlate("plate", "", 3);
    MainWindow w(ui::test::quietOptions());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    QString why;
    const auto c = ctl->calibrateSpeed(10, 0.02, &why);
    ASSERT_TRUE(c) << why.toStdString();
    EXPECT_LE(std::abs(c->value - 5920), c->budget.expanded());
    EXPECT_TRUE(ctl->techniqueText().contains("Speed of sound (calibrated from the back wall and its repeat)"));
    const auto flagged = ctl->checkElements(&why);
    ASSERT_TRUE(flagged);
    EXPECT_TRUE(flagged->empty());
    EXPECT_TRUE(ctl->techniqueText().contains("Elements: all 16 within 6 dB"));
    ctl->undoStack()->undo();
    EXPECT_FALSE(ctl->techniqueText().contains("Elements:"));
    EXPECT_TRUE(ctl->techniqueText().contains("Speed of sound (calibrated"));
    ctl->undoStack()->undo();
    EXPECT_FALSE(ctl->techniqueText().contains("Speed of sound (calibrated"));
    // The case file keeps them.
    ctl->undoStack()->redo();
    ctl->undoStack()->redo();
    const auto doc = ctl->document();
    EXPECT_EQ(doc.captures[0].element_health.size(), 2u);
    EXPECT_FALSE(doc.captures[0].speed_calibration.empty());
    // A capture without a back wall in the record: a clear message, nothing recorded.
    const int n = ctl->undoStack()->count();
    EXPECT_FALSE(ctl->calibrateSpeed(40, 0.02, &why));
    EXPECT_FALSE(why.isEmpty());
    EXPECT_EQ(ctl->undoStack()->count(), n);
}

// A fixed delay from a point at a known place (contact, L path) of a simulated capture: the
// simulator puts no delay in the traces, so the delay found is 0 within its uncertainty (and
// within 10 ns). Its lines join the speed's in the technique block; a new speed calibration
// keeps them, and each is one undoable edit.
TEST(weld_overlay_test, fixed_delay_from_a_known_reflector_joins_the_calibration_lines) {
    const QString cap = simulatePlate("point", R"J(, "points": [{"position_mm": [1.5, 0, 6], "amplitude": 1}])J", 5);
    MainWindow w(ui::test::quietOptions());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    QString why;
    const auto d = ctl->calibrateDelay(1.5, 6, 0, 0.02, &why);
    ASSERT_TRUE(d) << why.toStdString();
    EXPECT_LE(std::abs(d->delay.value), d->delay.budget.expanded());
    EXPECT_LT(std::abs(d->delay.value), 10e-9);
    EXPECT_TRUE(ctl->techniqueText().contains("Fixed delay (calibrated from a point reflector at x = 1.50 mm, depth 6.00 mm, L path)"))
        << ctl->techniqueText().toStdString();
    ASSERT_TRUE(ctl->calibrateSpeed(10, 0.02, &why)) << why.toStdString();
    EXPECT_TRUE(ctl->techniqueText().contains("Speed of sound (calibrated"));
    EXPECT_TRUE(ctl->techniqueText().contains("Fixed delay (calibrated"));  // kept
    // Again: the delay block is replaced, not repeated.
    ASSERT_TRUE(ctl->calibrateDelay(1.5, 6, 0, 0.02, &why));
    EXPECT_EQ(ctl->techniqueText().count("Fixed delay (calibrated"), 1);
    ctl->undoStack()->undo();
    ctl->undoStack()->undo();
    EXPECT_FALSE(ctl->techniqueText().contains("Speed of sound (calibrated"));
    EXPECT_TRUE(ctl->techniqueText().contains("Fixed delay (calibrated"));
    ctl->undoStack()->undo();
    EXPECT_FALSE(ctl->techniqueText().contains("Fixed delay (calibrated"));
    // A wrong position 5 mm away still finds the point's echo within the search, but its
    // moveout does not fit: the spread across elements says so and the uncertainty grows.
    const auto wrong = ctl->calibrateDelay(-3, 3, 0, 0.02, &why);
    ASSERT_TRUE(wrong) << why.toStdString();
    EXPECT_GT(wrong->delay.budget.expanded(), 10 * d->delay.budget.expanded());
    EXPECT_TRUE(ctl->techniqueText().contains("do not follow the moveout")) << ctl->techniqueText().toStdString();
    ctl->undoStack()->undo();
    // No echo there (beyond the record): a clear message, nothing recorded.
    const int n = ctl->undoStack()->count();
    EXPECT_FALSE(ctl->calibrateDelay(-3, 40, 0, 0.02, &why));
    EXPECT_FALSE(why.isEmpty());
    EXPECT_EQ(ctl->undoStack()->count(), n);
    // The delay removed is stated in the technique text.
    ctl->editRecipeValue("delay_model.fixed_delay_us", "0.25");
    EXPECT_TRUE(ctl->techniqueText().contains("Fixed delay removed from every trace: 0.25 µs"));
}
