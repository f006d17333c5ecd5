// SPDX-License-Identifier: MIT
// Coverage contours and the warning for a measurement outside the view's −6 dB coverage, on the
// test's own point capture: the controller's map equals recon::coverageMap on the same region,
// contour end points lie on the −6 dB level (linear interpolation along cell edges, as the
// bilinear map reads there), and only a measurement below −6 dB is warned about in its budget
// and in the finding made from it.
#include <gtest/gtest.h>

#include <cmath>

#include "reconstruction/coverage.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/viewer/image_view.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

TEST(coverage_warning_test, contours_and_warning_outside_minus_6_db) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    MainWindow w(ui::test::quietOptions());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    // Made off the GUI thread: nothing at first, the map once coverageReady has been emitted.
    bool ready = false;
    QObject::connect(ctl, &ui::CaseController::coverageReady, [&] { ready = true; });
    EXPECT_EQ(ctl->coverageIfReady(), nullptr);
    ASSERT_TRUE(waitUntil([&] { return ready; }));
    const recon::CoverageMap* c = ctl->coverageIfReady();
    ASSERT_NE(c, nullptr);
    EXPECT_EQ(ctl->coverage(), c) << "the waiting call returns the same map";
    EXPECT_EQ(c->mode, "L-L");
    // Independent: the same map from recon::coverageMap over the same grid.
    recon::Grid g;
    g.x_min_m = c->x_m.front();
    g.x_max_m = c->x_m.back();
    g.z_min_m = c->z_m.front();
    g.z_max_m = c->z_m.back();
    g.step_m = c->x_m[1] - c->x_m[0];
    const auto ref = recon::coverageMap(ctl->header(), "L-L", g, {}, &ctl->recipe());
    ASSERT_EQ(ref.db.size(), c->db.size());
    const size_t ix = c->x_m.size() / 3, iz = c->z_m.size() / 2;
    EXPECT_NEAR(*ctl->coverageDbAt(c->x_m[ix] * 1e3, c->z_m[iz] * 1e3), ref.at(iz, ix), 1e-4);

    // Lowest and highest pixels of the map.
    size_t lo = 0, hi = 0;
    for (size_t i = 0; i < c->db.size(); ++i) {
        if (c->db[i] < c->db[lo]) lo = i;
        if (c->db[i] > c->db[hi]) hi = i;
    }
    ASSERT_LT(c->db[lo], -6.0f) << "the test capture's map must reach below -6 dB";
    auto marker = [&](size_t i) {
        core::Measurement m;
        m.kind = core::MeasurementKind::DepthMarker;
        m.frame_index = 0;
        m.points = {{c->x_m[i % c->x_m.size()] * 1e3, c->z_m[i / c->x_m.size()] * 1e3}};
        return ctl->addMeasurement(m);
    };
    const std::string weak = marker(lo), strong = marker(hi);
    ASSERT_TRUE(ctl->coverageDbAt(ctl->measurement(weak)->points[0].x_mm, ctl->measurement(weak)->points[0].z_mm).has_value());
    EXPECT_TRUE(ctl->coverageWarning(*ctl->measurement(weak)).startsWith("Outside the −6 dB coverage of view L-L"));
    EXPECT_TRUE(ctl->coverageWarning(*ctl->measurement(strong)).isEmpty());
    EXPECT_TRUE(ctl->budgetText(weak).contains("Outside the −6 dB coverage"));
    EXPECT_FALSE(ctl->budgetText(strong).contains("Outside the −6 dB coverage"));
    const std::string f = ctl->addFindingFromMeasurement(weak);
    bool warned = false;
    for (const auto& x : ctl->findings())
        if (x.id == f) warned = x.indication.description.find("Outside the −6 dB coverage") != std::string::npos;
    EXPECT_TRUE(warned);

    // Contours: off by default; on, two levels, the −6 dB segments' ends at −6 dB.
    EXPECT_TRUE(w.imageView()->scene().coverage.empty());
    w.imageView()->setCoverageVisible(true);
    const auto sc = w.imageView()->scene();
    ASSERT_EQ(sc.coverage.size(), 2u);
    EXPECT_DOUBLE_EQ(sc.coverage[0].first, -6.0);
    ASSERT_FALSE(sc.coverage[0].second.empty());
    for (const auto& l : sc.coverage[0].second)
        for (const QPointF& q : {l.p1(), l.p2()}) {
            const auto v = ctl->coverageDbAt(q.x(), q.y());
            ASSERT_TRUE(v.has_value()) << q.x() << ", " << q.y();
            EXPECT_NEAR(*v, -6.0, 0.01);
        }
}
