// SPDX-License-Identifier: MIT
// The image view's mapping between widget pixels and the image plane in mm.
#include <gtest/gtest.h>

#include "ui/viewer/view_transform.h"

using umbra::ui::ViewTransform;

namespace {
ViewTransform make() {
    ViewTransform v;
    v.setViewport(QRectF(50, 30, 800, 600));
    v.setExtent(-19.2, 19.2, 0, 25);  // 38.4 mm wide, 25 mm deep
    v.fit();
    return v;
}
}  // namespace

// Round trip pixel -> mm -> pixel at several zoom and pan states (exact up to rounding).
TEST(view_transform_test, pixel_mm_round_trip_at_several_zoom_and_pan_states) {
    ViewTransform v = make();
    const QPointF probes[] = {{50, 30}, {850, 630}, {400.5, 333.25}, {-20, 900}};
    for (int state = 0; state < 6; ++state) {
        if (state == 1) v.zoomAbout(QPointF(300, 200), 3.0);
        if (state == 2) v.panByPixels(QPointF(-123.5, 77));
        if (state == 3) v.zoomAbout(QPointF(700, 500), 0.25);
        if (state == 4) v.setZoom(57.3);
        if (state == 5) v.setCentreMm(QPointF(10.0, 22.0));
        for (const QPointF& px : probes) {
            const QPointF back = v.toPixel(v.toMm(px));
            EXPECT_NEAR(back.x(), px.x(), 1e-9) << "state " << state;
            EXPECT_NEAR(back.y(), px.y(), 1e-9) << "state " << state;
        }
        const QPointF mm(3.3, 12.7);
        const QPointF again = v.toMm(v.toPixel(mm));
        EXPECT_NEAR(again.x(), mm.x(), 1e-12);
        EXPECT_NEAR(again.y(), mm.y(), 1e-12);
    }
}

// At fit the whole extent is visible and the limiting axis fills the viewport; aspect is true
// (one scale for both axes), top-aligned: 800 px / 38.4 mm = 20.83 px/mm < 600 px / 25 mm = 24 px/mm.
TEST(view_transform_test, fit_uses_one_scale_and_shows_the_whole_image) {
    ViewTransform v = make();
    EXPECT_NEAR(v.pixelsPerMm(), 800.0 / 38.4, 1e-9);
    const QRectF r = v.imageRectPx();
    EXPECT_NEAR(r.width(), 800, 1e-9);
    EXPECT_NEAR(r.height(), 25 * 800.0 / 38.4, 1e-9);
    EXPECT_NEAR(r.height() / r.width(), 25 / 38.4, 1e-12);  // true aspect ratio
    EXPECT_NEAR(r.center().x(), 450, 1e-9);
    // The image's top (depth 0, the array face) at the viewport's top: no empty band above it.
    EXPECT_NEAR(r.top(), 30, 1e-9);
    EXPECT_TRUE(v.isFit());
    v.zoomAbout(QPointF(300, 200), 2.0);
    EXPECT_FALSE(v.isFit());
    // Depth increases downwards.
    EXPECT_LT(v.toPixel(QPointF(0, 5)).y(), v.toPixel(QPointF(0, 20)).y());
}

// Zooming about the cursor keeps the image point under the cursor where it was.
TEST(view_transform_test, zoom_about_cursor_keeps_the_point_under_it) {
    ViewTransform v = make();
    const QPointF cursor(612, 141);
    const QPointF under = v.toMm(cursor);
    v.zoomAbout(cursor, 4.0);
    EXPECT_NEAR(v.zoom(), 4.0, 1e-12);
    const QPointF still = v.toMm(cursor);
    EXPECT_NEAR(still.x(), under.x(), 1e-9);
    EXPECT_NEAR(still.y(), under.y(), 1e-9);
    // Pan by (dx, dy) pixels moves every image point by exactly that on screen.
    const QPointF before = v.toPixel(QPointF(1, 1));
    v.panByPixels(QPointF(15, -40));
    const QPointF after = v.toPixel(QPointF(1, 1));
    EXPECT_NEAR(after.x() - before.x(), 15, 1e-9);
    EXPECT_NEAR(after.y() - before.y(), -40, 1e-9);
}
