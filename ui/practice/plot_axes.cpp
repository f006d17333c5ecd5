// SPDX-License-Identifier: MIT
#include "ui/practice/plot_axes.h"

#include <algorithm>
#include <cmath>

namespace umbra::ui {

std::vector<double> AxisRange::ticks() const {
    std::vector<double> t;
    for (double v = lo; v <= hi + step * 1e-6; v += step) t.push_back(std::abs(v) < step * 1e-9 ? 0.0 : v);
    return t;
}

AxisRange niceRange(double lo, double hi, int ticks) {
    if (!std::isfinite(lo) || !std::isfinite(hi)) lo = 0, hi = 1;
    if (hi < lo) std::swap(lo, hi);
    if (hi - lo < 1e-9) {
        const double pad = std::max(0.5, std::abs(lo) * 0.1);
        lo -= pad;
        hi += pad;
    }
    const double raw = (hi - lo) / std::max(1, ticks);
    const double mag = std::pow(10.0, std::floor(std::log10(raw)));
    double step = mag;
    for (double m : {1.0, 2.0, 5.0, 10.0})
        if (m * mag >= raw) {
            step = m * mag;
            break;
        }
    return {std::floor(lo / step) * step, std::ceil(hi / step) * step, step};
}

void drawAxes(QPainter& p, const QRectF& plot, const AxisRange& x, const AxisRange& y, const QString& x_title,
              const QString& y_title) {
    const QFontMetrics fm = p.fontMetrics();
    p.setPen(QColor(200, 200, 200));
    for (double v : y.ticks()) p.drawLine(QPointF(plot.left(), mapY(plot, y, v)), QPointF(plot.right(), mapY(plot, y, v)));
    p.setPen(QPen(Qt::black, 1));
    p.setBrush(Qt::NoBrush);
    p.drawRect(plot);
    auto label = [](double v, double step) {
        const int decimals = std::max(0, static_cast<int>(-std::floor(std::log10(step) + 1e-9)));
        return QString::number(v, 'f', decimals);
    };
    for (double v : x.ticks()) {
        const double px = mapX(plot, x, v);
        p.drawLine(QPointF(px, plot.bottom()), QPointF(px, plot.bottom() + 4));
        const QString s = label(v, x.step);
        p.drawText(QPointF(px - fm.horizontalAdvance(s) / 2.0, plot.bottom() + 6 + fm.ascent()), s);
    }
    for (double v : y.ticks()) {
        const double py = mapY(plot, y, v);
        p.drawLine(QPointF(plot.left() - 4, py), QPointF(plot.left(), py));
        const QString s = label(v, y.step);
        p.drawText(QPointF(plot.left() - 7 - fm.horizontalAdvance(s), py + fm.ascent() / 2.0 - 1), s);
    }
    p.drawText(QRectF(plot.left(), plot.bottom() + 8 + fm.height(), plot.width(), fm.height() + 4), Qt::AlignHCenter, x_title);
    p.save();
    p.translate(12, plot.center().y());
    p.rotate(-90);
    p.drawText(QRectF(-plot.height() / 2, -fm.ascent(), plot.height(), fm.height() + 4), Qt::AlignHCenter, y_title);
    p.restore();
}

}  // namespace umbra::ui
