// SPDX-License-Identifier: MIT
// The image view's measurement tools driven by mouse events: a caliper drawn by press-drag-
// release lands at the mm positions under the cursor (via the view transform), a handle drag
// moves it as one undoable edit, and the cursor readout maps pixels to mm.
#include <gtest/gtest.h>

#include <QApplication>
#include <QMouseEvent>
#include <QUndoStack>

#include <cmath>

#include "core/measurement.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/viewer/image_view.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::test::waitUntil;

namespace {
void send(QWidget* w, QEvent::Type type, const QPointF& pos, Qt::MouseButton button) {
    const Qt::MouseButtons buttons = type == QEvent::MouseButtonRelease ? Qt::NoButton : Qt::MouseButtons(button);
    QMouseEvent e(type, pos, w->mapToGlobal(pos), type == QEvent::MouseMove ? Qt::NoButton : button, buttons, Qt::NoModifier);
    QApplication::sendEvent(w, &e);
}
void drag(QWidget* w, const QPointF& a, const QPointF& b) {
    send(w, QEvent::MouseButtonPress, a, Qt::LeftButton);
    for (int i = 1; i <= 5; ++i) send(w, QEvent::MouseMove, a + (b - a) * (i / 5.0), Qt::LeftButton);
    send(w, QEvent::MouseButtonRelease, b, Qt::LeftButton);
}
}  // namespace

TEST(image_view_test, caliper_drawn_and_dragged_with_the_mouse_lands_where_the_cursor_was) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/one.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    ui::MainWindowOptions o;
    o.interactive = false;
    ui::MainWindow w(o);
    w.resize(1400, 900);
    w.show();
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage(); }));
    ui::ImageView* v = w.imageView();
    QApplication::processEvents();
    const auto& vt = v->transform();
    const double tol = 1.0 / vt.pixelsPerMm();  // one screen pixel, mm

    v->setTool(ui::Tool::Caliper);
    const QPointF a = vt.toPixel(QPointF(-1.0, 9.0)), b = vt.toPixel(QPointF(1.0, 12.0));
    drag(v, a, b);
    ASSERT_EQ(ctl->measurements().size(), 1u);
    const core::Measurement m = ctl->measurements()[0];
    EXPECT_EQ(m.kind, core::MeasurementKind::Caliper);
    ASSERT_EQ(m.points.size(), 2u);
    EXPECT_NEAR(m.points[0].x_mm, -1.0, tol);
    EXPECT_NEAR(m.points[0].z_mm, 9.0, tol);
    EXPECT_NEAR(m.points[1].x_mm, 1.0, tol);
    EXPECT_NEAR(m.points[1].z_mm, 12.0, tol);
    // Distance of a 2 mm by 3 mm caliper is sqrt(13) mm (Pythagoras).
    const auto q = core::evaluate(m, ctl->uncertaintyModel());
    bool found = false;
    for (const auto& x : q)
        if (x.name == "distance") {
            found = true;
            EXPECT_NEAR(x.value, std::sqrt(13.0), 2 * tol);
        }
    EXPECT_TRUE(found);

    // Select tool: drag the second handle to (2, 13) mm.
    v->setTool(ui::Tool::Select);
    drag(v, vt.toPixel(QPointF(m.points[1].x_mm, m.points[1].z_mm)), vt.toPixel(QPointF(2.0, 13.0)));
    ASSERT_EQ(ctl->measurements().size(), 1u);
    const auto& moved = ctl->measurements()[0].points;
    EXPECT_NEAR(moved[1].x_mm, 2.0, tol);
    EXPECT_NEAR(moved[1].z_mm, 13.0, tol);
    EXPECT_NEAR(moved[0].x_mm, m.points[0].x_mm, 1e-12);  // the other end stays
    ctl->undoStack()->undo();
    EXPECT_EQ(ctl->measurements()[0].points, m.points);

    // A click (no drag) with the depth marker tool makes a one-point marker at the cursor.
    v->setTool(ui::Tool::DepthMarker);
    const QPointF c = vt.toPixel(QPointF(0.5, 10.0));
    send(v, QEvent::MouseButtonPress, c, Qt::LeftButton);
    send(v, QEvent::MouseButtonRelease, c, Qt::LeftButton);
    ASSERT_EQ(ctl->measurements().size(), 2u);
    EXPECT_NEAR(ctl->measurements()[1].points.at(0).z_mm, 10.0, tol);
    // The readout at the point reflector (x = 0, depth 10 mm) is near the top of the display range.
    const auto db = v->dbAt(QPointF(0.0, 10.0));
    ASSERT_TRUE(db.has_value());
    EXPECT_GT(*db, -6.0f);
}
