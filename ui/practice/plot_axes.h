// SPDX-License-Identifier: MIT
#pragma once
// Axes shared by the practice and agreement plots: "nice" tick steps (1, 2, 5 × 10^k) and a frame
// with tick labels and titles, drawn with QPainter.
#include <QPainter>
#include <QRectF>
#include <QString>

#include <vector>

namespace umbra::ui {

/// Range [lo, hi] widened to whole multiples of a 1-2-5 step giving about `ticks` intervals.
struct AxisRange {
    double lo = 0, hi = 1, step = 0.2;
    std::vector<double> ticks() const;
};
AxisRange niceRange(double lo, double hi, int ticks = 5);

/// Draws the frame of `plot`, tick marks and labels of both axes and the titles; returns nothing.
void drawAxes(QPainter& p, const QRectF& plot, const AxisRange& x, const AxisRange& y, const QString& x_title,
              const QString& y_title);

/// Maps a value to a pixel coordinate inside `plot`.
inline double mapX(const QRectF& plot, const AxisRange& x, double v) { return plot.left() + (v - x.lo) / (x.hi - x.lo) * plot.width(); }
inline double mapY(const QRectF& plot, const AxisRange& y, double v) { return plot.bottom() - (v - y.lo) / (y.hi - y.lo) * plot.height(); }

}  // namespace umbra::ui
