// SPDX-License-Identifier: MIT
// Stored DICOM frames in the workstation: a caliper measures in mm on a frame calibrated by its
// Sequence of Ultrasound Regions (DICOM PS3.3 C.8.5.5) and in px, with a visible warning, on a
// frame without one; cine playback at the file's Frame Time; File → Open routes DICOM files to
// the stored-image window; Export DICOM writes the displayed frame with its grid.
// Inputs are written by pydicom (tests/app/fixtures/make_dicom.py).
#include <gtest/gtest.h>

#include <QDir>

#include <cmath>
#include <cstdlib>

#include "core/dicom_image.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/stored/stored_frame_view.h"
#include "ui/stored/stored_image_window.h"
#include "ui/viewer/cine_controls.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::StoredImageWindow;

namespace {
QString pydicomWrite(const QString& name, const std::string& kwargs) {
    const QString path = ui::test::tempDir() + "/" + name;
    const std::string fixtures = std::string(UMBRA_SOURCE_DIR) + "/tests/app/fixtures";
    const std::string cmd = "/usr/bin/python3 -B -c \"import sys; sys.path.insert(0, '" + fixtures +
                            "'); import make_dicom as m; m.write('" + path.toStdString() + "'" +
                            (kwargs.empty() ? "" : ", " + kwargs) + ")\"";
    EXPECT_EQ(std::system(cmd.c_str()), 0) << cmd;
    return path;
}
// make_dicom.py geometry: region corner (10, 8), pixel 0.2 mm across, 0.15 mm down.
constexpr double kDxMm = 0.2, kDzMm = 0.15;
}  // namespace

TEST(StoredImage, CaliperInMillimetresOnCalibratedFrame) {
    StoredImageWindow w(pydicomWrite("cal.dcm", "frames=3"));
    EXPECT_TRUE(w.warningText().isEmpty());
    w.setCaliper(80, 8, 105, 48);  // 25 px across, 40 px down
    const double d = std::hypot(25 * kDxMm, 40 * kDzMm);  // Pythagoras: 7.81 mm
    const QString t = w.readoutText();
    EXPECT_TRUE(t.contains("mm")) << t.toStdString();
    EXPECT_FALSE(t.contains("px")) << t.toStdString();
    EXPECT_TRUE(t.contains(QStringLiteral("distance %1").arg(d, 0, 'f', 1))) << t.toStdString();
    EXPECT_TRUE(t.contains(QStringLiteral("Δx %1").arg(25 * kDxMm, 0, 'f', 2))) << t.toStdString();
    // Widget <-> pixel mapping is its own inverse.
    const QPointF back = w.view()->toPixel(w.view()->toWidget({33.0, 44.0}));
    EXPECT_NEAR(back.x(), 33.0, 1e-9);
    EXPECT_NEAR(back.y(), 44.0, 1e-9);
}

TEST(StoredImage, UncalibratedFrameWarnsAndMeasuresInPixels) {
    StoredImageWindow w(pydicomWrite("nocal.dcm", "regions=False"));
    EXPECT_TRUE(w.warningText().contains(QStringLiteral("uncalibrated — pixels"))) << w.warningText().toStdString();
    w.setCaliper(0, 0, 30, 40);  // 3-4-5 triangle: 50 px
    const QString t = w.readoutText();
    EXPECT_TRUE(t.contains("distance 50")) << t.toStdString();
    EXPECT_TRUE(t.contains("px")) << t.toStdString();
    EXPECT_FALSE(t.contains("mm")) << t.toStdString();
}

TEST(StoredImage, CinePlaysAtFrameTimeAndLoops) {
    StoredImageWindow w(pydicomWrite("cine.dcm", "frames=4"));
    auto* cine = w.cine();
    EXPECT_NEAR(cine->framesPerSecond(), 1000.0 / 33.3, 0.05);  // Frame Time (0018,1063) 33.3 ms; spin box has 0.1 steps
    EXPECT_TRUE(cine->rateSource().contains("33.3")) << cine->rateSource().toStdString();
    cine->play();
    EXPECT_TRUE(cine->isPlaying());
    for (int i = 0; i < 3; ++i) cine->advance();
    EXPECT_EQ(w.currentFrame(), 3u);
    cine->advance();  // loop back
    EXPECT_EQ(w.currentFrame(), 0u);
    cine->setLoop(false);
    for (int i = 0; i < 4; ++i) cine->advance();
    EXPECT_EQ(w.currentFrame(), 3u);
    EXPECT_FALSE(cine->isPlaying());  // stopped at the last frame
    // Real playback through the timer advances frames.
    cine->setLoop(true);
    cine->play();
    ASSERT_TRUE(ui::test::waitUntil([&] { return w.currentFrame() == 1u; }, 5000));
    cine->pause();
}

TEST(StoredImage, CineRateFromCineRateAndSingleFrameDisabled) {
    StoredImageWindow w(pydicomWrite("cr.dcm", "frames=2, samples=3, timing='cine_rate'"));
    EXPECT_NEAR(w.cine()->framesPerSecond(), 25.0, 1e-9);  // Cine Rate (0018,0040) 25 frames/s
    StoredImageWindow one(pydicomWrite("one.dcm", ""));
    one.cine()->play();
    EXPECT_FALSE(one.cine()->isPlaying());
}

TEST(StoredImage, MainWindowOpensDicomInItsOwnWindowAndRefusesDamaged) {
    MainWindow mw(ui::test::quietOptions());
    const QString p = pydicomWrite("open.dcm", "frames=2");
    EXPECT_TRUE(mw.openPath(p));
    EXPECT_FALSE(mw.controller()->hasCapture());  // the case is untouched
    auto* w = mw.findChild<StoredImageWindow*>();
    ASSERT_NE(w, nullptr);
    EXPECT_EQ(w->image().frames, 2u);
    QFile f(ui::test::tempDir() + "/bad.dcm");
    ASSERT_TRUE(f.open(QIODevice::WriteOnly));
    f.write(QByteArray(200, 'x'));
    f.close();
    EXPECT_FALSE(mw.openPath(f.fileName()));
}

TEST(StoredImage, ExportDicomWritesDisplayedFrameWithGrid) {
    const QString cap = ui::test::tempDir() + "/cap.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 2);
    MainWindow mw(ui::test::quietOptions());
    ASSERT_TRUE(mw.openPath(cap));
    ASSERT_TRUE(ui::test::waitUntil([&] { return mw.controller()->hasImage() && !mw.controller()->isBusy(); }));
    EXPECT_NE(mw.cine(), nullptr);
    const QString out = ui::test::tempDir() + "/frame.dcm";
    ASSERT_TRUE(mw.exportDicom(out));
    const auto d = core::readDicomFile(out.toStdString());
    const auto* env = mw.controller()->envelope();
    ASSERT_TRUE(d.calibration);
    EXPECT_EQ(d.columns, env->nx());
    EXPECT_EQ(d.rows, env->nz());
    EXPECT_NEAR(d.calibration->dx_m, env->x_m[1] - env->x_m[0], 1e-12);
    EXPECT_NEAR(d.calibration->x0_m, env->x_m[0], 1e-12);
    EXPECT_NEAR(d.calibration->z0_m, env->z_m[0], 1e-12);
    EXPECT_TRUE(d.synthetic);  // the test capture is labelled synthetic
    // The same cine controls play a multi-frame capture: each frame is beamformed, then the next.
    mw.cine()->setFrameRate(50, QStringLiteral("test"));
    mw.cine()->setLoop(false);
    mw.cine()->play();
    ASSERT_TRUE(ui::test::waitUntil([&] { return mw.controller()->currentFrame() == 1u; }));
    ASSERT_TRUE(ui::test::waitUntil([&] { return !mw.cine()->isPlaying(); }));  // paused at the last frame
    EXPECT_EQ(mw.controller()->currentFrame(), 1u);
}
