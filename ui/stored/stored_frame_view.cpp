// SPDX-License-Identifier: MIT
#include "ui/stored/stored_frame_view.h"

#include <QMouseEvent>
#include <QPainter>
#include <QPainterPath>

#include <algorithm>
#include <cmath>

namespace umbra::ui {

StoredFrameView::StoredFrameView(QWidget* parent) : QWidget(parent) {
    setMouseTracking(true);
    setMinimumSize(320, 240);
    setAutoFillBackground(true);
    QPalette p = palette();
    p.setColor(QPalette::Window, QColor(24, 24, 28));
    setPalette(p);
    setCursor(Qt::CrossCursor);
}

void StoredFrameView::setImage(const core::DicomImage* img) {
    img_ = img;
    caliper_.reset();
    frame_ = 1;  // force a rebuild
    setFrame(0);
}

void StoredFrameView::setFrame(size_t f) {
    if (!img_ || f >= img_->frames) {
        frame_image_ = QImage();
        update();
        return;
    }
    if (f == frame_ && !frame_image_.isNull()) return;
    frame_ = f;
    QImage q(int(img_->columns), int(img_->rows), QImage::Format_RGB888);
    for (size_t r = 0; r < img_->rows; ++r) {
        uchar* line = q.scanLine(int(r));
        for (size_t c = 0; c < img_->columns; ++c) img_->rgb(f, r, c, line + 3 * c);
    }
    frame_image_ = q;
    update();
}

void StoredFrameView::setCaliper(std::optional<std::pair<QPointF, QPointF>> ends) {
    caliper_ = ends;
    update();
    emit caliperChanged();
}

// The frame drawn as large as fits with square physical pixels (calibrated: the pixel's aspect
// dz/dx; uncalibrated: square screen pixels), leaving margins for the scales.
QRectF StoredFrameView::imageRect() const {
    if (!img_) return {};
    const double aspect = img_->calibration ? img_->calibration->dz_m / img_->calibration->dx_m : 1.0;
    const double w = double(img_->columns), h = double(img_->rows) * aspect;
    const QRectF area = QRectF(rect()).adjusted(56, 34, -16, -16);
    const double s = std::min(area.width() / w, area.height() / h);
    return {area.left() + (area.width() - w * s) / 2, area.top() + (area.height() - h * s) / 2, w * s, h * s};
}

QPointF StoredFrameView::toWidget(QPointF px) const {
    const QRectF r = imageRect();
    if (!img_ || r.isEmpty()) return {};
    // Pixel centre c sits at (c + 0.5) pixel widths from the left edge.
    return {r.left() + (px.x() + 0.5) * r.width() / double(img_->columns), r.top() + (px.y() + 0.5) * r.height() / double(img_->rows)};
}

QPointF StoredFrameView::toPixel(QPointF w) const {
    const QRectF r = imageRect();
    if (!img_ || r.isEmpty()) return {};
    return {(w.x() - r.left()) * double(img_->columns) / r.width() - 0.5, (w.y() - r.top()) * double(img_->rows) / r.height() - 0.5};
}

namespace {
// A tick step of 1, 2 or 5 times a power of ten giving at least `min_px` screen pixels per step.
double niceStep(double units_per_screen_px, double min_px) {
    const double raw = units_per_screen_px * min_px;
    const double p = std::pow(10.0, std::floor(std::log10(raw)));
    for (double m : {1.0, 2.0, 5.0, 10.0})
        if (m * p >= raw) return m * p;
    return 10 * p;
}
}  // namespace

void StoredFrameView::paintEvent(QPaintEvent*) {
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing);
    if (!img_ || frame_image_.isNull()) {
        p.setPen(Qt::lightGray);
        p.drawText(rect(), Qt::AlignCenter, tr("No stored image"));
        return;
    }
    const QRectF r = imageRect();
    p.drawImage(r, frame_image_);
    QFont f = font();
    f.setPointSizeF(std::max(7.0, f.pointSizeF() - 1));
    p.setFont(f);
    // Scales along the calibrated region (mm) or the whole frame (px).
    const auto& cal = img_->calibration;
    const double c0 = cal ? double(cal->col0) : 0, r0 = cal ? double(cal->row0) : 0;
    const double nc = cal ? double(cal->cols) : double(img_->columns), nr = cal ? double(cal->rows) : double(img_->rows);
    const double ux = cal ? cal->dx_m * 1e3 : 1.0, uz = cal ? cal->dz_m * 1e3 : 1.0;  // units per pixel
    const double x_first = cal ? cal->x0_m * 1e3 : 0, z_first = cal ? cal->z0_m * 1e3 : 0;
    const QString unit = cal ? QStringLiteral("mm") : QStringLiteral("px");
    const QPointF tl = toWidget({c0 - 0.5, r0 - 0.5}), br = toWidget({c0 + nc - 0.5, r0 + nr - 0.5});
    if (cal) {
        p.setPen(QPen(QColor(90, 170, 255), 1, Qt::DashLine));
        p.setBrush(Qt::NoBrush);
        p.drawRect(QRectF(tl, br));
    }
    p.setPen(QColor(220, 220, 220));
    const double spx_x = r.width() / double(img_->columns), spx_z = r.height() / double(img_->rows);
    const double step_x = niceStep(ux / spx_x, 60), step_z = niceStep(uz / spx_z, 40);
    const double x_last = x_first + (nc - 1) * ux, z_last = z_first + (nr - 1) * uz;
    for (double v = std::ceil(x_first / step_x) * step_x; v <= x_last + 1e-9; v += step_x) {
        const double wx = toWidget({c0 + (v - x_first) / ux, 0}).x();
        p.drawLine(QPointF(wx, tl.y() - 6), QPointF(wx, tl.y()));
        p.drawText(QRectF(wx - 30, tl.y() - 24, 60, 16), Qt::AlignCenter, QString::number(v, 'g', 6));
    }
    for (double v = std::ceil(z_first / step_z) * step_z; v <= z_last + 1e-9; v += step_z) {
        const double wz = toWidget({0, r0 + (v - z_first) / uz}).y();
        p.drawLine(QPointF(tl.x() - 6, wz), QPointF(tl.x(), wz));
        p.drawText(QRectF(tl.x() - 54, wz - 8, 46, 16), Qt::AlignRight | Qt::AlignVCenter, QString::number(v, 'g', 6));
    }
    p.drawText(QRectF(tl.x() - 54, tl.y() - 24, 50, 16), Qt::AlignRight | Qt::AlignVCenter,
               cal ? tr("mm") : tr("px"));
    Q_UNUSED(unit);
    if (caliper_) {
        const QPointF a = toWidget(caliper_->first), b = toWidget(caliper_->second);
        p.setPen(QPen(QColor(255, 214, 0), 1.6));
        p.drawLine(a, b);
        for (QPointF e : {a, b}) {
            p.drawLine(e + QPointF(-6, 0), e + QPointF(6, 0));
            p.drawLine(e + QPointF(0, -6), e + QPointF(0, 6));
        }
    }
}

void StoredFrameView::mousePressEvent(QMouseEvent* e) {
    if (!img_ || e->button() != Qt::LeftButton) return;
    const QPointF px = toPixel(e->position());
    dragging_ = true;
    caliper_ = std::make_pair(px, px);
    update();
}

void StoredFrameView::mouseMoveEvent(QMouseEvent* e) {
    if (!img_) return;
    const QPointF px = toPixel(e->position());
    emit cursorAt(px);
    if (dragging_ && caliper_) {
        caliper_->second = px;
        update();
        emit caliperChanged();
    }
}

void StoredFrameView::mouseReleaseEvent(QMouseEvent* e) {
    if (!dragging_ || e->button() != Qt::LeftButton) return;
    dragging_ = false;
    if (caliper_) caliper_->second = toPixel(e->position());
    update();
    emit caliperChanged();
}

}  // namespace umbra::ui
