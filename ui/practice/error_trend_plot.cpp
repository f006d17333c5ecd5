// SPDX-License-Identifier: MIT
#include "ui/practice/error_trend_plot.h"

#include <QPainter>
#include <QPainterPath>

#include <algorithm>

#include "ui/practice/plot_axes.h"

namespace umbra::ui {

ErrorTrendPlot::ErrorTrendPlot(QWidget* parent) : QWidget(parent) {}

void ErrorTrendPlot::setSeries(const std::vector<core::PracticeProgress::Series>& series, size_t attempts) {
    series_ = series;
    attempts_ = attempts;
    update();
}

void ErrorTrendPlot::paintEvent(QPaintEvent*) {
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing);
    p.fillRect(rect(), Qt::white);
    const QFontMetrics fm = p.fontMetrics();
    const QRectF plot(QPointF(58, 12), QPointF(width() - 170.0, height() - 2.5 * fm.height() - 14));
    if (series_.empty() || plot.width() < 40 || plot.height() < 40) {
        p.setPen(Qt::black);
        p.drawText(rect(), Qt::AlignCenter, tr("No attempts yet"));
        return;
    }
    double lo = 0, hi = 0;
    for (const auto& s : series_)
        for (double e : s.error_mm) lo = std::min(lo, e), hi = std::max(hi, e);
    const double pad = 0.08 * std::max(1e-6, hi - lo);
    const AxisRange xr = niceRange(0.5, std::max<double>(1.5, static_cast<double>(attempts_) + 0.5), std::min<int>(8, static_cast<int>(attempts_) + 1));
    const AxisRange yr = niceRange(lo - pad, hi + pad);
    drawAxes(p, plot, xr, yr, tr("attempt"), tr("error, measured − true (mm)"));
    p.setPen(QPen(QColor(120, 120, 120), 1, Qt::DotLine));
    p.drawLine(QPointF(plot.left(), mapY(plot, yr, 0)), QPointF(plot.right(), mapY(plot, yr, 0)));
    static const QColor colours[] = {QColor(31, 119, 180), QColor(214, 39, 40), QColor(44, 160, 44), QColor(148, 103, 189),
                                     QColor(140, 86, 75),  QColor(227, 119, 194), QColor(127, 127, 127), QColor(188, 189, 34),
                                     QColor(23, 190, 207), QColor(255, 127, 14)};
    for (size_t k = 0; k < series_.size(); ++k) {
        const auto& s = series_[k];
        const QColor c = colours[k % 10];
        QPainterPath path;
        for (size_t i = 0; i < s.attempt.size(); ++i) {
            const QPointF pt(mapX(plot, xr, static_cast<double>(s.attempt[i])), mapY(plot, yr, s.error_mm[i]));
            if (i == 0) path.moveTo(pt);
            else path.lineTo(pt);
        }
        p.setPen(QPen(c, 1.5));
        p.setBrush(Qt::NoBrush);
        p.drawPath(path);
        p.setBrush(c);
        for (size_t i = 0; i < s.attempt.size(); ++i)
            p.drawEllipse(QPointF(mapX(plot, xr, static_cast<double>(s.attempt[i])), mapY(plot, yr, s.error_mm[i])), 3, 3);
        const double ly = plot.top() + 4 + static_cast<double>(k) * (fm.height() + 2);
        p.fillRect(QRectF(plot.right() + 8, ly + 3, 12, 8), c);
        p.setPen(Qt::black);
        p.drawText(QPointF(plot.right() + 24, ly + fm.ascent()), fm.elidedText(QString::fromStdString(s.key), Qt::ElideRight, 140));
    }
}

}  // namespace umbra::ui
