// SPDX-License-Identifier: MIT
// The distance–amplitude curve in the workstation, on the test's own capture with three point
// reflectors of different strength at 5, 9 and 13 mm. Checked: a picked point is the peak of
// the envelope before TCG inside the box (computed here independently); dB re the curve at a
// depth between two points follows the stated fit, worked out here by hand from the points
// (derived: 20 log10 a − (L1 + t (L2 − L1))); the outside-range flag and the recipe warning are
// visible (readout text, panel, finding reference); a TCG made from the curve makes the three
// echoes display equal (derived: gain = L(shallowest) − L(z)); points can be removed (undoable);
// the curve survives save and reopen; a case with the older single reference still opens.
// Only ratios of amplitudes are compared (the envelope's absolute scale is not fixed).
#include <gtest/gtest.h>

#include <QFile>
#include <QLabel>
#include <QStatusBar>
#include <QPushButton>
#include <QTableWidget>
#include <QUndoStack>

#include <algorithm>
#include <cmath>

#include "core/capture_file.h"
#include "core/distance_amplitude.h"
#include "ui/controller/case_controller.h"
#include "ui/dac/curve_panel.h"
#include "ui/main/main_window.h"
#include "ui/trace/trace_view.h"
#include "ui/viewer/image_view.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {
/// Whether a label in the window's status bar contains `text` and is shown.
bool statusShows(MainWindow& w, const QString& text) {
    for (auto* l : w.statusBar()->findChildren<QLabel*>())
        if (l->isVisibleTo(&w) && l->text().contains(text)) return true;
    return false;
}
/// Opens `path` in the window and waits for its first image.
void openAndWait(MainWindow& w, const QString& path) {
    ASSERT_TRUE(w.openPath(path));
    ASSERT_TRUE(waitUntil([&] { return w.controller()->hasImage() && !w.controller()->isBusy(); }));
}
core::Measurement box(double x0, double z0, double x1, double z1) {
    core::Measurement m;
    m.kind = core::MeasurementKind::ExtentBox;
    m.points = {{x0, z0}, {x1, z1}};
    return m;
}
const double kDepthMm[] = {5, 9, 13};
QString threeHoles() {
    const QString cap = ui::test::tempDir() + "/holes.h5";
    ui::test::writeReflectorsCapture(cap.toStdString(), {{-1.5e-3, 5e-3, 1.0}, {0.0, 9e-3, 0.6}, {1.5e-3, 13e-3, 0.4}}, 16);
    return cap;
}
/// Peak of the envelope before TCG in a depth band (independent of the controller's search).
double bandPeak(const core::Frame& f, double z0_mm, double z1_mm, size_t* iz_out = nullptr, size_t* ix_out = nullptr) {
    double best = 0;
    for (size_t iz = 0; iz < f.nz(); ++iz) {
        const double z = f.z_m[iz] * 1e3;
        if (z < z0_mm || z > z1_mm) continue;
        for (size_t ix = 0; ix < f.nx(); ++ix)
            if (f.envelope[iz * f.nx() + ix] > best) {
                best = f.envelope[iz * f.nx() + ix];
                if (iz_out) *iz_out = iz;
                if (ix_out) *ix_out = ix;
            }
    }
    return best;
}
/// Picks the three echoes with boxes across the image, ±1.5 mm about each depth.
void pickThree(ui::CaseController* ctl) {
    const auto* f = ctl->envelope();
    for (double d : kDepthMm) {
        const std::string id = ctl->addMeasurement(box(f->x_m.front() * 1e3, d - 1.5, f->x_m.back() * 1e3, d + 1.5));
        QString why;
        ASSERT_TRUE(ctl->addCurvePointFrom(id, &why, "point reflectors (test)")) << why.toStdString();
    }
}
}  // namespace

TEST(distance_amplitude_curve_test, picking_points_db_re_curve_and_warnings) {
    MainWindow w(ui::test::quietOptions());
    auto* ctl = w.controller();
    ASSERT_NO_FATAL_FAILURE(openAndWait(w, threeHoles()));
    EXPECT_EQ(ctl->amplitudeUnit(), "dB re frame peak");
    ASSERT_NO_FATAL_FAILURE(pickThree(ctl));
    ASSERT_TRUE(ctl->curve().has_value());
    const auto& c = *ctl->curve();
    ASSERT_EQ(c.points.size(), 3u);
    EXPECT_EQ(c.basis, core::AmplitudeBasis::BeforeTcg);
    EXPECT_FALSE(c.recipe_fingerprint.empty());
    const core::Frame& f = *ctl->envelope();
    for (size_t i = 0; i < 3; ++i) {
        // Each point is the peak of the envelope before TCG in its box, at its reflector's depth.
        EXPECT_FLOAT_EQ(float(c.points[i].amplitude), float(bandPeak(f, kDepthMm[i] - 1.5, kDepthMm[i] + 1.5)));
        EXPECT_NEAR(c.points[i].depth_m * 1e3, kDepthMm[i], 0.5);
    }
    EXPECT_EQ(ctl->amplitudeUnit(), "dB re DAC (point reflectors (test))");
    EXPECT_TRUE(ctl->curveWarning().isEmpty());
    // The panel lists them.
    EXPECT_EQ(w.curvePanel()->table()->rowCount(), 3);

    // dB re the curve at a pixel between the first two points, worked out here by hand from the
    // points: L(z) = L1 + t (L2 − L1), t = (z − z1)/(z2 − z1), L = 20 log10 amplitude.
    const double z1 = c.points[0].depth_m, z2 = c.points[1].depth_m;
    size_t iz = 0;
    while (f.z_m[iz] < 0.5 * (z1 + z2)) ++iz;
    const size_t ix = f.nx() / 2;
    const double t = (f.z_m[iz] - z1) / (z2 - z1);
    const double l1 = 20 * std::log10(c.points[0].amplitude), l2 = 20 * std::log10(c.points[1].amplitude);
    const double a = f.envelope[iz * f.nx() + ix];
    ASSERT_GT(a, 0.0);
    const auto r = ctl->dbReCurveAtMm(f.x_m[ix] * 1e3, f.z_m[iz] * 1e3);
    ASSERT_TRUE(r);
    EXPECT_NEAR(r->db, 20 * std::log10(a) - (l1 + t * (l2 - l1)), 1e-4);
    EXPECT_FALSE(r->outside);
    // At the second reflector's peak the echo is on the curve: 0 dB.
    size_t pz = 0, px = 0;
    bandPeak(f, kDepthMm[1] - 1.5, kDepthMm[1] + 1.5, &pz, &px);
    EXPECT_NEAR(ctl->dbReCurveAt(px, pz)->db, 0.0, 1e-4);
    // The trace view at that column shows the same dB re curve and draws the curve over it.
    w.traceView()->setCursor(f.x_m[px] * 1e3, f.z_m[pz] * 1e3);
    const auto* plot = w.traceView()->plot();
    ASSERT_EQ(plot->traceDb().size(), f.nz());
    EXPECT_NEAR(plot->traceDb()[pz], 0.0, 1e-4);
    EXPECT_NEAR(plot->curve().covered_from_mm, c.points.front().depth_m * 1e3, 1e-9);
    EXPECT_NEAR(plot->curve().covered_to_mm, c.points.back().depth_m * 1e3, 1e-9);
    // Off: dB re the shallowest point, the curve drawn as its fall (L(z) − L1) below 0 dB.
    w.traceView()->setReCurve(false);
    EXPECT_NEAR(plot->traceDb()[pz], l2 - l1, 1e-3);
    EXPECT_NEAR(plot->curve().db[pz], l2 - l1, 1e-3);
    w.traceView()->setReCurve(true);

    // A finding from a box around the second echo: its peak re the curve, naming the curve.
    const std::string mid = ctl->addMeasurement(box(-3, kDepthMm[1] - 1, 3, kDepthMm[1] + 1));
    ctl->addFindingFromMeasurement(mid);
    ASSERT_TRUE(ctl->findings().back().indication.peak_db.has_value());
    EXPECT_NEAR(*ctl->findings().back().indication.peak_db, 0.0, 0.5);
    EXPECT_NE(ctl->findings().back().indication.reference.find("distance–amplitude curve (point reflectors (test))"), std::string::npos);
    EXPECT_EQ(ctl->findings().back().indication.reference.find("outside"), std::string::npos);

    // Outside the depth range: flagged in the reading and in a finding's reference.
    const double deep_mm = c.points.back().depth_m * 1e3 + 1.5;
    const auto out = ctl->dbReCurveAtMm(0, deep_mm);
    ASSERT_TRUE(out);
    EXPECT_TRUE(out->outside);
    EXPECT_TRUE(ctl->outsideText().contains("outside the curve's depth range"));
    // The cursor readout says it: inside the range plain dB re DAC, below it flagged.
    emit w.imageView()->cursorMoved(QPointF(f.x_m[px] * 1e3, f.z_m[pz] * 1e3), true);
    EXPECT_TRUE(statusShows(w, "dB re DAC (point reflectors (test))"));
    EXPECT_FALSE(statusShows(w, "outside the curve"));
    emit w.imageView()->cursorMoved(QPointF(0, deep_mm), true);
    EXPECT_TRUE(statusShows(w, "outside the curve's depth range"));
    const std::string deep = ctl->addMeasurement(box(-3, deep_mm - 0.3, 3, deep_mm + 0.3));
    ctl->addFindingFromMeasurement(deep);
    EXPECT_NE(ctl->findings().back().indication.reference.find("outside the curve's depth range"), std::string::npos);

    // A display setting (gain) or the TCG keeps amplitudes comparable (the curve is read before
    // TCG); a reconstruction setting does not: the warning names it, the panel shows it, a new
    // finding says so and a new point is refused.
    core::Recipe rc = ctl->recipe();
    rc.setNumber(ui::findRecipeKey(rc, "gain_db"), 6);
    rc.setText("tgc.mode", "off");
    ctl->applyRecipe(rc);
    EXPECT_TRUE(ctl->curveWarning().isEmpty());
    EXPECT_FALSE(w.curvePanel()->warningLabel()->isVisibleTo(w.curvePanel()));
    std::string fkey;
    for (const auto& st : rc.stages())
        for (const auto& p : st.params)
            if (!p.display_only && p.name == "f_number") fkey = st.name + "." + p.name;
    ASSERT_FALSE(fkey.empty());
    rc.setNumber(fkey, rc.number(fkey) + 0.5);
    ctl->applyRecipe(rc);
    EXPECT_TRUE(ctl->curveWarning().contains(QString::fromStdString(fkey))) << ctl->curveWarning().toStdString();
    EXPECT_TRUE(w.curvePanel()->warningLabel()->isVisibleTo(w.curvePanel()));
    EXPECT_TRUE(w.curvePanel()->warningLabel()->text().contains(QString::fromStdString(fkey)));
    EXPECT_TRUE(statusShows(w, "Amplitudes not comparable with the distance–amplitude curve"));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    ctl->addFindingFromMeasurement(mid);
    EXPECT_NE(ctl->findings().back().indication.reference.find("not comparable"), std::string::npos);
    QString why;
    EXPECT_FALSE(ctl->addCurvePointFrom(mid, &why));
    EXPECT_TRUE(why.contains(QString::fromStdString(fkey))) << why.toStdString();
    EXPECT_EQ(ctl->curve()->points.size(), 3u);
}

TEST(distance_amplitude_curve_test, tcg_from_curve_makes_equal_echoes_display_equal) {
    MainWindow w(ui::test::quietOptions());
    auto* ctl = w.controller();
    ASSERT_NO_FATAL_FAILURE(openAndWait(w, threeHoles()));
    // One point is not enough for a TCG.
    {
        const auto* f = ctl->envelope();
        const std::string id = ctl->addMeasurement(box(f->x_m.front() * 1e3, 3.5, f->x_m.back() * 1e3, 6.5));
        ASSERT_TRUE(ctl->addCurvePointFrom(id));
        QString why;
        EXPECT_FALSE(ctl->makeTcgFromCurve(&why));
        EXPECT_TRUE(why.contains("two or more depths")) << why.toStdString();
        ctl->editCurve(std::nullopt, "clear");
    }
    ASSERT_NO_FATAL_FAILURE(pickThree(ctl));
    const long runs = ctl->beamformRuns();
    QString why;
    ASSERT_TRUE(ctl->makeTcgFromCurve(&why)) << why.toStdString();
    EXPECT_EQ(ctl->recipe().text("tgc.mode"), "curve");
    EXPECT_EQ(ctl->beamformRuns(), runs);  // a display setting: no new beamforming
    EXPECT_TRUE(ctl->curveWarning().isEmpty());
    // The three echoes (reflectors of amplitude 1, 0.6 and 0.4 and different depths) now have
    // the same amplitude after TCG, within the 1e-4 dB the TCG text is rounded to.
    const core::Frame& f = *ctl->envelope();
    const auto& tgc = ctl->tgcAmplitude();
    ASSERT_EQ(tgc.size(), f.nx() * f.nz());
    double first = 0;
    for (double d : kDepthMm) {
        size_t iz = 0, ix = 0;
        bandPeak(f, d - 1.5, d + 1.5, &iz, &ix);
        const double a = tgc[iz * f.nx() + ix];
        if (first == 0) first = a;
        EXPECT_NEAR(20 * std::log10(a / first), 0.0, 1e-3) << "echo at " << d << " mm";
    }
    // Undo puts the previous TCG back.
    ctl->undoStack()->undo();
    EXPECT_NE(ctl->recipe().text("tgc.mode"), "curve");
}

TEST(distance_amplitude_curve_test, remove_points_save_reopen_and_old_cases) {
    const QString cap = threeHoles();
    const QString dir = ui::test::tempDir();
    const QString case_path = dir + "/dac.umbracase";
    core::DistanceAmplitudeCurve kept;
    std::optional<core::DacReading> reading;
    {
        MainWindow w(ui::test::quietOptions());
        auto* ctl = w.controller();
        ASSERT_NO_FATAL_FAILURE(openAndWait(w, cap));
        ASSERT_NO_FATAL_FAILURE(pickThree(ctl));
        // Remove the middle point from the panel; undo brings it back.
        auto* panel = w.curvePanel();
        panel->table()->selectRow(1);
        EXPECT_TRUE(panel->removeButton()->isEnabled());
        panel->removeSelected();
        ASSERT_EQ(ctl->curve()->points.size(), 2u);
        EXPECT_EQ(panel->table()->rowCount(), 2);
        EXPECT_NEAR(ctl->curve()->points[1].depth_m * 1e3, kDepthMm[2], 0.5);
        ctl->undoStack()->undo();
        ASSERT_EQ(ctl->curve()->points.size(), 3u);
        EXPECT_EQ(panel->table()->rowCount(), 3);
        kept = *ctl->curve();
        reading = ctl->dbReCurveAtMm(0.5, 11.0);
        ASSERT_TRUE(reading);
        ASSERT_TRUE(w.saveCaseTo(case_path));
    }
    {
        MainWindow w2(ui::test::quietOptions());
        ASSERT_TRUE(w2.openPath(case_path));
        auto* ctl = w2.controller();
        ASSERT_TRUE(ctl->curve().has_value());
        EXPECT_EQ(*ctl->curve(), kept);
        EXPECT_EQ(w2.curvePanel()->table()->rowCount(), 3);
        ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
        const auto again = ctl->dbReCurveAtMm(0.5, 11.0);
        ASSERT_TRUE(again);
        EXPECT_NEAR(again->db, reading->db, 1e-9);
    }
    // A case saved with the older single amplitude reference (after TCG) opens as a one-point
    // curve: readable, flagged outside its depth, no TCG from it, and new points are refused
    // until it is cleared.
    const QString old_path = dir + "/old.umbracase";
    {
        QFile of(old_path);
        ASSERT_TRUE(of.open(QIODevice::WriteOnly));
        of.write(QStringLiteral(R"({"format": "umbracase", "version": 1, "active_capture": 0,
  "captures": [{"path": "%1", "sha256": "%2", "recipe": null, "measurements": []}],
  "amplitude_reference": {"label": "Ø2.5 mm SDH at 9 mm, reference block", "amplitude": 0.5, "capture_sha256": "",
                          "recipe": null, "frame": 0, "x_mm": 0.0, "z_mm": 9.0}})")
                     .arg(cap, QString::fromStdString(core::fileSha256(cap.toStdString())))
                     .toUtf8());
    }
    MainWindow w3(ui::test::quietOptions());
    ASSERT_TRUE(w3.openPath(old_path));
    auto* ctl = w3.controller();
    ASSERT_TRUE(ctl->curve().has_value());
    EXPECT_EQ(ctl->curve()->basis, core::AmplitudeBasis::AfterTcg);
    EXPECT_EQ(ctl->amplitudeUnit(), "dB re DAC (Ø2.5 mm SDH at 9 mm, reference block)");
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    // Read after TCG: the pixel's amplitude after TCG re 0.5.
    const core::Frame& f = *ctl->envelope();
    const size_t ix = f.nx() / 2;
    size_t iz = 0;
    while (f.z_m[iz] < 9e-3) ++iz;
    const double a = ctl->tgcAmplitude()[iz * f.nx() + ix];
    ASSERT_GT(a, 0.0);
    EXPECT_NEAR(ctl->dbReCurveAt(ix, iz)->db, 20 * std::log10(a / 0.5), 1e-4);
    EXPECT_TRUE(ctl->dbReCurveAtMm(0, 12.0)->outside);
    QString why;
    EXPECT_FALSE(ctl->makeTcgFromCurve(&why));
    const std::string id = ctl->addMeasurement(box(-3, 8, 3, 10));
    EXPECT_FALSE(ctl->addCurvePointFrom(id, &why));
    EXPECT_TRUE(why.contains("Clear")) << why.toStdString();
}
