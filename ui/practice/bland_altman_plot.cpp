// SPDX-License-Identifier: MIT
#include "ui/practice/bland_altman_plot.h"

#include <QPainter>

#include <algorithm>
#include <cmath>

#include "core/uncertainty.h"
#include "ui/practice/plot_axes.h"

namespace umbra::ui {

BlandAltmanPlot::BlandAltmanPlot(QWidget* parent) : QWidget(parent) {
    setAutoFillBackground(true);
    QPalette pal = palette();
    pal.setColor(QPalette::Window, Qt::white);
    pal.setColor(QPalette::WindowText, Qt::black);
    setPalette(pal);
}

void BlandAltmanPlot::setData(const core::BlandAltmanResult& r, const QString& x_title, const QString& y_title,
                              const QString& unit) {
    ba_ = r;
    x_title_ = x_title;
    y_title_ = y_title;
    unit_ = unit;
    update();
}

void BlandAltmanPlot::paintEvent(QPaintEvent*) {
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing);
    p.fillRect(rect(), Qt::white);
    const QFontMetrics fm = p.fontMetrics();
    const QRectF plot(QPointF(58, 12), QPointF(width() - 150.0, height() - 2.5 * fm.height() - 14));
    if (ba_.n == 0 || plot.width() < 40 || plot.height() < 40) {
        p.setPen(Qt::black);
        p.drawText(rect(), Qt::AlignCenter, tr("No pairs yet"));
        return;
    }
    double xlo = *std::min_element(ba_.means.begin(), ba_.means.end());
    double xhi = *std::max_element(ba_.means.begin(), ba_.means.end());
    double ylo = std::min({0.0, ba_.loa_low, *std::min_element(ba_.differences.begin(), ba_.differences.end())});
    double yhi = std::max({0.0, ba_.loa_high, *std::max_element(ba_.differences.begin(), ba_.differences.end())});
    const double ypad = 0.08 * std::max(1e-6, yhi - ylo);
    const AxisRange xr = niceRange(xlo, xhi), yr = niceRange(ylo - ypad, yhi + ypad);
    drawAxes(p, plot, xr, yr, x_title_, y_title_);
    p.setClipRect(plot);
    p.setPen(QPen(QColor(120, 120, 120), 1, Qt::DotLine));
    p.drawLine(QPointF(plot.left(), mapY(plot, yr, 0)), QPointF(plot.right(), mapY(plot, yr, 0)));
    const QColor bias_c(20, 90, 170), loa_c(190, 80, 30);
    p.setPen(QPen(bias_c, 2));
    p.drawLine(QPointF(plot.left(), mapY(plot, yr, ba_.bias)), QPointF(plot.right(), mapY(plot, yr, ba_.bias)));
    p.setPen(QPen(loa_c, 1.5, Qt::DashLine));
    for (double v : {ba_.loa_low, ba_.loa_high}) p.drawLine(QPointF(plot.left(), mapY(plot, yr, v)), QPointF(plot.right(), mapY(plot, yr, v)));
    p.setPen(QPen(Qt::black, 1));
    p.setBrush(QColor(40, 40, 40, 150));
    for (size_t i = 0; i < ba_.n; ++i)
        p.drawEllipse(QPointF(mapX(plot, xr, ba_.means[i]), mapY(plot, yr, ba_.differences[i])), 3.5, 3.5);
    p.setClipping(false);
    // Line labels on the right, each value rounded to its 95 % interval.
    auto text = [&](double v, double half) {
        if (!(half > 0)) return QString::number(v, 'g', 3) + " " + unit_;
        const auto rr = core::roundToUncertainty(v, half);
        return QString::fromStdString(rr.value_text + " ± " + rr.uncertainty_text) + " " + unit_;
    };
    auto side = [&](double v, const QColor& c, const QString& what, const QString& val) {
        p.setPen(c);
        const double y = std::clamp(mapY(plot, yr, v), plot.top() + fm.height(), plot.bottom());
        p.drawText(QPointF(plot.right() + 6, y - 2), what);
        p.drawText(QPointF(plot.right() + 6, y - 2 + fm.height()), val);
    };
    side(ba_.loa_high, loa_c, tr("upper limit"), text(ba_.loa_high, ba_.loa_ci_half));
    side(ba_.bias, bias_c, tr("bias"), text(ba_.bias, ba_.bias_ci_half));
    side(ba_.loa_low, loa_c, tr("lower limit"), text(ba_.loa_low, ba_.loa_ci_half));
    p.setPen(Qt::darkGray);
    p.drawText(QPointF(plot.right() + 6, plot.bottom() + fm.height() * 2.4),
               tr("n = %1; ± = 95 % CI").arg(ba_.n));
}

}  // namespace umbra::ui
