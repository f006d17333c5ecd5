// SPDX-License-Identifier: MIT
// Workstation sizing tools: image sizing through the controller (core/sizing.h), the
// resolution-limited flag on a point reflector (its −6 dB extents are the point-spread widths),
// the budget view text (JCGM 100:2008 components), tip sizing offered by a kind change, findings
// pre-filled with numbers rounded to their expanded uncertainty (GUM 7.2.6), findings marked
// out of date when their measurement changes, and the top view's end-to-end distance
// (geometry: √(Δx² + Δy²)).
#include <gtest/gtest.h>

#include <QUndoStack>

#include <cmath>

#include "core/sizing.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {
/// A workstation with the synthetic point capture (`frames` frames) open and its image ready.
struct Open {
    MainWindow w{ui::test::quietOptions()};
    ui::CaseController* ctl = w.controller();
    explicit Open(size_t frames) {
        const QString cap = ui::test::tempDir() + QStringLiteral("/point_%1.h5").arg(frames);
        ui::test::writePointCapture(cap.toStdString(), 8, frames);
        EXPECT_TRUE(w.openPath(cap));
        EXPECT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    }
};
core::Measurement make(core::MeasurementKind k, std::vector<core::PointMm> pts) {
    core::Measurement m;
    m.kind = k;
    m.points = std::move(pts);
    return m;
}
}  // namespace

TEST(sizing_tools_test, point_is_resolution_limited_budget_listed_and_finding_rounded) {
    Open o(1);
    auto* ctl = o.ctl;
    const std::string id = ctl->addMeasurement(make(core::MeasurementKind::DropSizing, {{-3, 7}, {3, 13}}));
    const auto s = ctl->sizing(*ctl->measurement(id));
    ASSERT_TRUE(s && s->found);
    EXPECT_TRUE(s->resolution_limited);
    const auto q = ctl->quantities(*ctl->measurement(id));
    ASSERT_FALSE(q.empty());
    EXPECT_TRUE(q[0].upper_bound);
    EXPECT_EQ(core::formatQuantity(q[0]).rfind("≤ ", 0), 0u) << core::formatQuantity(q[0]);
    // Budget view: components by name, k = 2, the caution.
    const QString b = ctl->budgetText(id);
    EXPECT_TRUE(b.contains("resolution (edge placement)")) << b.toStdString();
    EXPECT_TRUE(b.contains("speed of sound"));
    EXPECT_TRUE(b.contains("k = 2"));
    EXPECT_TRUE(b.contains("resolution-limited"));
    // Finding pre-fill: rounded to the expanded uncertainty (no 11-digit numbers).
    ctl->addFindingFromMeasurement(id);
    const auto& ind = ctl->findings().back().indication;
    ASSERT_TRUE(ind.x_mm.has_value());
    const double Ux = 2 * q[2].uncertainty;
    EXPECT_EQ(*ind.x_mm, std::stod(core::roundToUncertainty(q[2].value, Ux).value_text));
    // Tip sizing offered by a kind change: one echo gives no tip pair; undo restores the box.
    ctl->changeSizingKind(id, core::MeasurementKind::TipSizing);
    EXPECT_EQ(ctl->measurement(id)->kind, core::MeasurementKind::TipSizing);
    const auto t = ctl->sizing(*ctl->measurement(id));
    ASSERT_TRUE(t.has_value());
    EXPECT_FALSE(t->found);
    ctl->undoStack()->undo();
    EXPECT_EQ(ctl->measurement(id)->kind, core::MeasurementKind::DropSizing);
    // The case's speed-of-sound uncertainty enters the budget (1540 m/s: soft tissue by default).
    EXPECT_EQ(ctl->speedUncertainty().first, "soft tissue");
    ctl->setSpeedUncertainty("water", 0.02);
    EXPECT_EQ(ctl->speedUncertainty(), (std::pair<std::string, double>{"water", 0.02}));
    EXPECT_TRUE(ctl->budgetText(id).contains("set for this case"));
    ctl->undoStack()->undo();
    EXPECT_EQ(ctl->speedUncertainty().first, "soft tissue");
}

TEST(sizing_tools_test, finding_marked_out_of_date_until_accepted) {
    Open o(1);
    auto* ctl = o.ctl;
    const std::string id = ctl->addMeasurement(make(core::MeasurementKind::Caliper, {{-2, 8}, {2, 8}}));
    const std::string fid = ctl->addFindingFromMeasurement(id);
    EXPECT_TRUE(ctl->outOfDateFindings().empty());
    ctl->moveMeasurement(id, {{-2, 8}, {3, 9}});
    ASSERT_EQ(ctl->outOfDateFindings().size(), 1u);
    EXPECT_EQ(ctl->outOfDateFindings()[0], fid);
    ctl->acceptMeasuredValues(fid);
    EXPECT_TRUE(ctl->outOfDateFindings().empty());
}

TEST(sizing_tools_test, top_view_end_to_end_distance) {
    Open o(5);
    auto* ctl = o.ctl;
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy() && ctl->topViewFramesDone() == 5; }, 60000));
    ASSERT_TRUE(waitUntil([&] { return ctl->topViewMeasure(-1, 0, 1, 4).has_value(); }));
    const auto m = ctl->topViewMeasure(-1.0, 0.0, 2.0, 4.0);
    ASSERT_TRUE(m.has_value());
    EXPECT_NEAR(m->end_to_end.value, 5.0, 1e-12);  // 3-4-5
    EXPECT_GT(m->end_to_end.budget.combined(), 0.0);
    ASSERT_TRUE(m->scan_length.has_value());
    EXPECT_TRUE(m->scan_length->found);  // the point is in every frame: the edges are open
    EXPECT_FALSE(m->scan_length->warnings.empty());
}
