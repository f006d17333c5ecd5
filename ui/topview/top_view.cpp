// SPDX-License-Identifier: MIT
#include "ui/topview/top_view.h"

#include <QMouseEvent>
#include <QPainter>
#include <QPushButton>

#include <algorithm>
#include <cmath>

#include "core/uncertainty.h"
#include "ui/controller/case_controller.h"
#include "ui/viewer/scene_painter.h"

namespace umbra::ui {

TopView::TopView(CaseController* controller, QWidget* parent) : QWidget(parent), ctl_(controller) {
    setMinimumSize(200, 140);
    setCursor(Qt::PointingHandCursor);
    setToolTip(tr("Peak amplitude over the depth gate for every frame: x across, scan position down. "
                  "Click or drag to pick a frame."));
    finish_ = new QPushButton(tr("Finish top view"), this);
    finish_->setObjectName(QStringLiteral("finishTopView"));
    finish_->setToolTip(tr("Beamform the frames the top view still lacks (the run was stopped)"));
    finish_->setCursor(Qt::ArrowCursor);
    finish_->hide();
    connect(finish_, &QPushButton::clicked, ctl_, &CaseController::finishTopView);
    connect(ctl_, &CaseController::topViewChanged, this, &TopView::updateFinishButton);
    connect(ctl_, &CaseController::captureChanged, this, &TopView::updateFinishButton);
    connect(ctl_, &CaseController::busyChanged, this, &TopView::updateFinishButton);
    connect(ctl_, &CaseController::topViewChanged, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::frameChanged, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::captureChanged, this, qOverload<>(&QWidget::update));
}

QRectF TopView::plotRect() const { return QRectF(rect()).adjusted(54, 24, -12, -26); }

void TopView::updateFinishButton() {
    const bool show = ctl_->topViewIncomplete() && !ctl_->isBusy();
    if (show) {
        finish_->adjustSize();
        finish_->move(width() - finish_->width() - 8, 2);
    }
    finish_->setVisible(show);
}

void TopView::resizeEvent(QResizeEvent*) { updateFinishButton(); }

long TopView::frameAt(double y) const {
    const size_t n = ctl_->frameCount();
    const QRectF r = plotRect();
    if (n == 0 || y < r.top() || y > r.bottom()) return -1;
    return std::clamp<long>(static_cast<long>((y - r.top()) / r.height() * static_cast<double>(n)), 0, static_cast<long>(n) - 1);
}

void TopView::paintEvent(QPaintEvent*) {
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing);
    p.fillRect(rect(), QColor(21, 23, 28));
    const QColor axis(200, 204, 212);
    QFont f = p.font();
    f.setPointSizeF(8);
    p.setFont(f);
    p.setPen(axis);
    const QImage& img = ctl_->topViewImage();
    const core::Frame* fr = ctl_->envelope();
    if (!ctl_->isEncodedScan()) {
        p.drawText(rect().adjusted(12, 12, -12, -12), Qt::AlignCenter | Qt::TextWordWrap,
                   tr("The top view needs an encoded scan (a capture with scan positions for more than one frame)."));
        return;
    }
    if (!ctl_->topViewFits()) {
        p.drawText(rect().adjusted(12, 12, -12, -12), Qt::AlignCenter | Qt::TextWordWrap,
                   tr("The top view is off: every frame of this grid would not fit in memory. "
                      "Choose a coarser pixel step or a smaller region in the recipe."));
        return;
    }
    const size_t n = ctl_->frameCount();
    const bool stopped = ctl_->topViewIncomplete();
    const double right = finish_->isVisible() ? finish_->x() - 6 : width() - 8;
    p.drawText(QRectF(8, 2, right - 8, 18), Qt::AlignLeft | Qt::AlignVCenter,
               (stopped ? tr("Peak, depth %1–%2 mm · %3 of %4 frames (stopped)") : tr("Peak, depth %1–%2 mm · %3 of %4 frames · right-drag measures"))
                   .arg(ctl_->topViewGateMm().first, 0, 'f', 1)
                   .arg(ctl_->topViewGateMm().second, 0, 'f', 1)
                   .arg(ctl_->topViewFramesDone())
                   .arg(n));
    const QRectF r = plotRect();
    if (img.isNull() || !fr) {
        p.drawText(r, Qt::AlignCenter, tr("Beamforming frames…"));
        return;
    }
    p.drawImage(r, img);
    p.drawRect(r);
    // x axis along the bottom.
    const double x0 = fr->x_m.front() * 1e3, x1 = fr->x_m.back() * 1e3;
    const double sx = niceStep(x1 - x0, std::max(2, static_cast<int>(r.width() / 70)));
    const QString x_title = tr("x, mm");
    const double title_left = r.right() - p.fontMetrics().horizontalAdvance(x_title) - 6;
    for (double x = std::ceil(x0 / sx) * sx; x <= x1 + 1e-9; x += sx) {
        const double px = r.left() + (x - x0) / (x1 - x0) * r.width();
        p.drawLine(QPointF(px, r.bottom()), QPointF(px, r.bottom() + 4));
        const QString label = QString::number(x, 'g', 5);
        // A tick label that would run into the axis title is left out (the tick stays).
        if (px + p.fontMetrics().horizontalAdvance(label) / 2.0 >= title_left) continue;
        p.drawText(QRectF(px - 25, r.bottom() + 5, 50, 14), Qt::AlignCenter, label);
    }
    p.drawText(QRectF(r.right() - 80, r.bottom() + 5, 80, 14), Qt::AlignRight, x_title);
    // Scan position down the left side.
    const auto& h = ctl_->header();
    const auto& pos = h.scan->position_m;
    const double y0 = pos.front() * 1e3, y1 = pos[std::min(pos.size(), n) - 1] * 1e3;
    const double sy = niceStep(std::abs(y1 - y0), std::max(2, static_cast<int>(r.height() / 40)));
    const double rowh = r.height() / static_cast<double>(n);
    for (size_t i = 0; i < n && i < pos.size(); ++i) {
        const double y = pos[i] * 1e3;
        if (std::abs(std::remainder(y, sy)) > 1e-6) continue;
        const double py = r.top() + (static_cast<double>(i) + 0.5) * rowh;
        p.drawLine(QPointF(r.left() - 4, py), QPointF(r.left(), py));
        p.drawText(QRectF(r.left() - 50, py - 7, 44, 14), Qt::AlignRight | Qt::AlignVCenter, QString::number(y, 'g', 5));
    }
    p.save();
    p.translate(10, r.center().y());
    p.rotate(-90);
    p.drawText(QRectF(-70, -8, 140, 16), Qt::AlignCenter, tr("scan position y, mm"));
    p.restore();
    // Current frame.
    const double cy = r.top() + (static_cast<double>(ctl_->currentFrame()) + 0.5) * rowh;
    p.setPen(QPen(QColor(255, 255, 255, 220), 1.5));
    p.setBrush(Qt::NoBrush);
    p.drawRect(QRectF(r.left(), cy - rowh / 2, r.width(), rowh));
    // Measuring line.
    if (meas_a_ && meas_b_) {
        const QColor mc(120, 220, 255);
        p.setPen(QPen(mc, 1.5));
        const QPointF a = toPx(*meas_a_), b = toPx(*meas_b_);
        p.drawLine(a, b);
        p.setPen(QPen(mc, 0.8, Qt::DashLine));
        p.drawRect(QRectF(a, b).normalized());
        const QString t = measureText();
        QFontMetricsF fm(p.font());
        QRectF box = fm.boundingRect(QRectF(0, 0, 420, 200), Qt::TextWordWrap, t).adjusted(-4, -2, 4, 2);
        box.moveTopLeft(QPointF(std::min(std::max(a.x(), b.x()) + 8, r.right() - box.width()), std::max(r.top(), std::min(a.y(), b.y()))));
        p.setPen(Qt::NoPen);
        p.setBrush(QColor(10, 12, 16, 210));
        p.drawRoundedRect(box, 3, 3);
        p.setPen(mc);
        p.drawText(box, Qt::AlignCenter | Qt::TextWordWrap, t);
    }
}

std::optional<QPointF> TopView::toMm(QPointF px) const {
    const core::Frame* fr = ctl_->envelope();
    const QRectF r = plotRect();
    const long f = frameAt(px.y());
    if (!fr || f < 0 || !ctl_->header().scan || size_t(f) >= ctl_->header().scan->position_m.size()) return std::nullopt;
    const double x0 = fr->x_m.front() * 1e3, x1 = fr->x_m.back() * 1e3;
    const double x = x0 + std::clamp((px.x() - r.left()) / r.width(), 0.0, 1.0) * (x1 - x0);
    return QPointF(x, ctl_->header().scan->position_m[size_t(f)] * 1e3);
}

QPointF TopView::toPx(QPointF mm) const {
    const core::Frame* fr = ctl_->envelope();
    const QRectF r = plotRect();
    if (!fr || !ctl_->header().scan) return r.topLeft();
    const double x0 = fr->x_m.front() * 1e3, x1 = fr->x_m.back() * 1e3;
    const auto& pos = ctl_->header().scan->position_m;
    size_t best = 0;
    for (size_t i = 0; i < pos.size(); ++i)
        if (std::abs(pos[i] * 1e3 - mm.y()) < std::abs(pos[best] * 1e3 - mm.y())) best = i;
    const double rowh = r.height() / static_cast<double>(std::max<size_t>(1, ctl_->frameCount()));
    return QPointF(r.left() + (mm.x() - x0) / (x1 - x0) * r.width(), r.top() + (static_cast<double>(best) + 0.5) * rowh);
}

void TopView::setMeasureLine(QPointF a, QPointF b) {
    meas_a_ = a;
    meas_b_ = b;
    update();
}

QString TopView::measureText() const {
    if (!meas_a_ || !meas_b_) return {};
    const auto m = ctl_->topViewMeasure(meas_a_->x(), meas_a_->y(), meas_b_->x(), meas_b_->y());
    if (!m) return {};
    QString t = QString::fromStdString(core::formatMeasured(m->end_to_end));
    if (m->scan_length && m->scan_length->found && m->scan_length->length) {
        t += QStringLiteral("\n") + QString::fromStdString(core::formatMeasured(*m->scan_length->length));
        for (const auto& w : m->scan_length->warnings) t += QStringLiteral("\n") + tr("warning: %1").arg(QString::fromStdString(w));
    }
    return t;
}

void TopView::mousePressEvent(QMouseEvent* e) {
    if (e->button() == Qt::RightButton || (e->button() == Qt::LeftButton && (e->modifiers() & Qt::ShiftModifier))) {
        if (const auto p = toMm(e->position())) {
            meas_a_ = meas_b_ = *p;
            measuring_ = true;
            update();
        }
        return;
    }
    const long f = frameAt(e->position().y());
    if (f >= 0 && e->button() == Qt::LeftButton) ctl_->setCurrentFrame(static_cast<size_t>(f));
}

void TopView::mouseMoveEvent(QMouseEvent* e) {
    if (measuring_) {
        if (const auto p = toMm(e->position())) meas_b_ = *p;
        update();
        return;
    }
    if (!(e->buttons() & Qt::LeftButton)) return;
    const long f = frameAt(e->position().y());
    if (f >= 0) ctl_->setCurrentFrame(static_cast<size_t>(f));
}

void TopView::mouseReleaseEvent(QMouseEvent*) { measuring_ = false; }

}  // namespace umbra::ui
