// SPDX-License-Identifier: MIT
// The views strip: the chosen views of the frame other than the large one, beamformed in the
// background and drawn small with their mode names; clicking one shows it large without a second
// beamforming run (its image is taken over), undo goes back; the choice is saved with the case;
// views the capture cannot be imaged in are refused with the missing attribute named. Truth: a
// simulated point in a 10 mm steel plate (shear 3240 m/s) must peak at its true position in the
// view taken over from the strip (within a tenth of the shear wavelength, the positioning target).
#include <gtest/gtest.h>

#include <QTest>
#include <QUndoStack>

#include <cmath>

#include "core/case_file.h"
#include "core/error.h"
#include "reconstruction/simulate/scene.h"
#include "reconstruction/simulate/simulator.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/viewer/views_strip.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {

constexpr double kPointX = 1.0e-3, kPointZ = 6.0e-3;  // m
constexpr double kShear = 3240, kF0 = 5e6;

QString writePlateCapture(const QString& dir, bool with_thickness) {
    const QString cap = dir + (with_thickness ? "/plate_views.h5" : "/plate_no_thickness.h5");
    const std::string thickness = with_thickness ? R"J(, "thickness_mm": 10)J" : "";
    const std::string modes = with_thickness ? R"J(["L-L", "T-T", "TT-T"])J" : R"J(["L-L", "T-T"])J";
    const std::string scene = R"J({"title": "steel plate with a point, views (synthetic)", "scenario": "ui_views", "seed": 5,
      "array": {"elements": 16, "pitch_mm": 0.6, "element_width_mm": 0.5, "centre_frequency_mhz": 5, "fractional_bandwidth": 0.6},
      "transmit": {"kind": "single_element"}, "sampling": {"frequency_mhz": 40, "samples": 700},
      "medium": {"speed_m_s": 5920, "shear_speed_m_s": 3240)J" + thickness + R"J(},
      "paths": {"modes": )J" + modes + R"J(},
      "reflectors": {"points": [{"position_mm": [1.0, 0, 6.0]}]}, "noise": {"snr_db": 40, "reference": "peak"}})J";
    recon::sim::simulateToFile(recon::sim::parseScene(scene, "plate"), cap.toStdString());
    return cap;
}

void setSmallRegion(ui::CaseController* ctl) {
    core::Recipe r = ctl->recipe();
    r.set("grid.x_min_mm", "-3");
    r.set("grid.x_max_mm", "5");
    r.set("grid.z_min_mm", "3");
    r.set("grid.z_max_mm", "9");
    r.set("grid.step_mm", "0.05");
    ctl->applyRecipe(r);
}

// Position of the envelope's peak within 1.5 mm of the point, m. Farther away lie the echoes of
// the other simulated paths, imaged where T-T times put them (the L-L echo near 3.3 mm depth).
std::pair<double, double> peakNearPoint(const core::Frame& f) {
    size_t best = 0;
    float top = -1;
    for (size_t i = 0; i < f.envelope.size(); ++i) {
        const double x = f.x_m[i % f.nx()], z = f.z_m[i / f.nx()];
        if (std::hypot(x - kPointX, z - kPointZ) < 1.5e-3 && f.envelope[i] > top) top = f.envelope[i], best = i;
    }
    return {f.x_m[best % f.nx()], f.z_m[best / f.nx()]};
}

}  // namespace

TEST(views_strip_test, strip_views_are_shown_small_and_a_click_shows_one_large_without_beamforming_again) {
    const QString dir = ui::test::tempDir();
    const QString cap = writePlateCapture(dir, true);
    MainWindow w(ui::test::quietOptions());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    setSmallRegion(ctl);
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    EXPECT_EQ(ctl->largeView(), "L-L");
    EXPECT_FALSE(w.viewsStrip()->isVisibleTo(&w)) << "no view chosen: no strip";
    const auto valid = ctl->validViews();
    for (const char* m : {"L-L", "T-T", "TT-T", "TT-TT", "LL-L"})
        EXPECT_NE(std::find(valid.begin(), valid.end(), m), valid.end()) << m;

    // Choose three views: the strip shows the two that are not large, in the chosen order.
    ctl->setChosenViews({"L-L", "T-T", "TT-T", "T-T"});
    EXPECT_EQ(ctl->chosenViews(), (std::vector<std::string>{"L-L", "T-T", "TT-T"})) << "duplicates dropped";
    EXPECT_EQ(ctl->stripViews(), (std::vector<std::string>{"T-T", "TT-T"}));
    EXPECT_TRUE(w.viewsStrip()->isVisibleTo(&w));
    ASSERT_TRUE(waitUntil([&] { return !ctl->stripTile("T-T").image.isNull() && !ctl->stripTile("TT-T").image.isNull(); }, 60000));
    EXPECT_EQ(ctl->stripRuns(), 2);
    const auto tiles = w.viewsStrip()->tiles();
    ASSERT_EQ(tiles.size(), 2u);
    EXPECT_EQ(tiles[0]->mode(), "T-T");
    EXPECT_EQ(tiles[1]->mode(), "TT-T");
    const QImage small_tt = ctl->stripTile("T-T").image;
    const QImage large_ll = ctl->image();
    EXPECT_EQ(small_tt.size(), large_ll.size()) << "strip views are beamformed on the large view's grid";
    EXPECT_NE(small_tt, large_ll) << "another view gives another image";

    // Click the T-T tile: it becomes large at once, with no second run for the frame.
    const long runs = ctl->beamformRuns();
    w.viewsStrip()->show();
    tiles[0]->resize(tiles[0]->sizeHint());
    QTest::mouseClick(tiles[0], Qt::LeftButton, {}, tiles[0]->rect().center());
    EXPECT_EQ(ctl->largeView(), "T-T");
    EXPECT_EQ(ctl->recipe().text("delay_model.mode"), "T-T");
    EXPECT_EQ(ctl->image(), small_tt) << "the strip's image is taken over";
    ASSERT_TRUE(waitUntil([&] { return !ctl->isBusy() && !ctl->isStripRunning(); }));
    EXPECT_EQ(ctl->beamformRuns(), runs) << "no beamforming run for a view the strip already holds";
    EXPECT_EQ(ctl->stripRuns(), 2) << "the old large view joins the strip as it was";
    EXPECT_EQ(ctl->stripViews(), (std::vector<std::string>{"L-L", "TT-T"}));
    EXPECT_EQ(ctl->stripTile("L-L").image, large_ll);
    // The view taken over images the point where it is (T-T: shear both ways).
    const auto [px, pz] = peakNearPoint(*ctl->envelope());
    EXPECT_NEAR(px, kPointX, kShear / kF0 / 10);
    EXPECT_NEAR(pz, kPointZ, kShear / kF0 / 10);

    // The technique names the view and the shear speed it used (the scene's 3240 m/s).
    EXPECT_TRUE(ctl->techniqueText().contains("View: T-T (transmit shear direct, receive shear direct); shear speed 3240 m/s (from the capture)"))
        << ctl->techniqueText().toStdString();
    EXPECT_TRUE(ctl->techniqueLine().contains(", view T-T, shear 3240 m/s")) << ctl->techniqueLine().toStdString();

    // Undo: L-L large again, from the strip too.
    ctl->undoStack()->undo();
    EXPECT_EQ(ctl->largeView(), "L-L");
    EXPECT_EQ(ctl->image(), large_ll);
    EXPECT_EQ(ctl->beamformRuns(), runs);
    EXPECT_FALSE(ctl->techniqueText().contains("View:")) << "contact L-L: nothing beyond the speed of sound";

    // A display-only change re-colours the strip without beamforming.
    core::Recipe r = ctl->recipe();
    r.set("log_compression.dynamic_range_db", "30");
    ctl->applyRecipe(r);
    EXPECT_NE(ctl->stripTile("T-T").image, small_tt);
    EXPECT_EQ(ctl->stripRuns(), 2);

    // Saved with the capture in the case, and back on loading it.
    const QString path = dir + "/views.umbracase";
    ctl->saveCase(path);
    EXPECT_EQ(core::loadCase(path.toStdString()).captures[0].view.views, (std::vector<std::string>{"L-L", "T-T", "TT-T"}));
    MainWindow w2(ui::test::quietOptions());
    ASSERT_TRUE(w2.openPath(path));
    EXPECT_EQ(w2.controller()->chosenViews(), (std::vector<std::string>{"L-L", "T-T", "TT-T"}));
}

TEST(views_strip_test, views_the_capture_cannot_image_are_refused_naming_what_is_missing) {
    const QString dir = ui::test::tempDir();
    const QString cap = writePlateCapture(dir, false);
    MainWindow w(ui::test::quietOptions());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    const auto valid = ctl->validViews();
    EXPECT_EQ(std::find(valid.begin(), valid.end(), "TT-T"), valid.end()) << "no thickness: no skip views offered";
    try {
        ctl->setChosenViews({"T-T", "TT-T"});
        FAIL() << "a skip view without a thickness must be refused";
    } catch (const core::SettingError& e) {
        EXPECT_NE(std::string(e.what()).find("thickness_m"), std::string::npos) << e.what();
    }
    EXPECT_TRUE(ctl->chosenViews().empty()) << "the choice is unchanged";
    EXPECT_THROW(ctl->setChosenViews({"X-Y"}), core::SettingError);
    ctl->setChosenViews({"T-T"});
    EXPECT_EQ(ctl->stripViews(), (std::vector<std::string>{"T-T"}));
    // The chooser lists exactly the valid views, the large one ticked.
    ui::ViewChooser chooser(ctl->validViews(), ctl->chosenViews(), ctl->largeView());
    EXPECT_EQ(chooser.chosen(), (std::vector<std::string>{"L-L", "T-T"}));
}
