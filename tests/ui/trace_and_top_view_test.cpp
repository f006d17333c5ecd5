// SPDX-License-Identifier: MIT
// The raw RF trace read through the controller, and the top view of an encoded scan (every
// frame beamformed in the background; a click picks the frame).
#include <gtest/gtest.h>

#include <QApplication>
#include <QMouseEvent>

#include <algorithm>
#include <cmath>

#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui/topview/top_view.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::test::waitUntil;

namespace {
ui::MainWindowOptions quiet() {
    ui::MainWindowOptions o;
    o.interactive = false;
    return o;
}
}  // namespace

// The echo of the point reflector in the trace of transmit 0 / receive 7 arrives at the
// round-trip time (|tx - p| + |p - rx|) / c (straight-ray geometry), within one sample.
TEST(trace_and_top_view_test, rf_trace_peaks_at_the_round_trip_time) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/one.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    ui::MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    const auto& h = ctl->header();
    const std::vector<float> rf = ctl->rfTrace(0, 7);
    ASSERT_EQ(rf.size(), h.samples);
    size_t k = 0;
    for (size_t i = 1; i < rf.size(); ++i)
        if (std::abs(rf[i]) > std::abs(rf[k])) k = i;
    const auto& t = h.array.element_position_m[0];
    const auto& r = h.array.element_position_m[7];
    const double z = 10e-3, c = h.medium.speed_of_sound_m_s;
    const double tau = (std::hypot(t[0], z) + std::hypot(r[0], z)) / c;
    EXPECT_NEAR(static_cast<double>(k) / h.receive.sampling_frequency_hz, tau, 1.0 / h.receive.sampling_frequency_hz);
    EXPECT_TRUE(ctl->rfTrace(99, 0).empty());  // out of range: nothing, no crash
}

// Three frames at scan positions 0, 1, 2 mm; the echo is strongest in the middle frame
// (amplitude exp(-((f-1)/2)^2), i.e. -2.2 dB at the sides). The top view fills every row and
// its middle row is the brightest; clicking the third row shows frame 3.
TEST(trace_and_top_view_test, top_view_covers_every_frame_and_click_picks_one) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/scan.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 3);
    ui::MainWindow w(quiet());
    w.resize(1400, 900);
    w.show();
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(ctl->isEncodedScan());
    ASSERT_TRUE(waitUntil([&] { return ctl->topViewFramesDone() == 3 && !ctl->topViewImage().isNull(); }));
    const QImage& top = ctl->topViewImage();
    ASSERT_EQ(top.height(), 3);
    int bright[3] = {0, 0, 0};
    for (int y = 0; y < 3; ++y)
        for (int x = 0; x < top.width(); ++x) bright[y] = std::max(bright[y], qGray(top.pixel(x, y)));
    EXPECT_GT(bright[1], bright[0]);
    EXPECT_GT(bright[1], bright[2]);

    auto* tv = w.findChild<ui::TopView*>();
    ASSERT_NE(tv, nullptr);
    QApplication::processEvents();
    ASSERT_GT(tv->height(), 60);
    // Row 3 of 3 lies in the lower third of the plot (plot rect: 24 px top, 26 px bottom margins).
    const double top_px = 24, bottom_px = tv->height() - 26;
    const QPointF at(tv->width() / 2.0, top_px + (bottom_px - top_px) * (2.5 / 3.0));
    QMouseEvent press(QEvent::MouseButtonPress, at, tv->mapToGlobal(at), Qt::LeftButton, Qt::LeftButton, Qt::NoModifier);
    QApplication::sendEvent(tv, &press);
    EXPECT_EQ(ctl->currentFrame(), 2u);
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && ctl->envelope()->frame_index == 2; }));
}
