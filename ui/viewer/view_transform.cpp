// SPDX-License-Identifier: MIT
#include "ui/viewer/view_transform.h"

#include <algorithm>
#include <cmath>

namespace umbra::ui {

void ViewTransform::setViewport(const QRectF& px) { viewport_ = px; }

void ViewTransform::setExtent(double x0_mm, double x1_mm, double z0_mm, double z1_mm) {
    x0_ = x0_mm;
    x1_ = x1_mm > x0_mm ? x1_mm : x0_mm + 1e-3;
    z0_ = z0_mm;
    z1_ = z1_mm > z0_mm ? z1_mm : z0_mm + 1e-3;
}

void ViewTransform::setZoom(double zoom) { zoom_ = std::clamp(zoom, kMinZoom, kMaxZoom); }

QPointF ViewTransform::fitCentre() const {
    // Centred across; the image's top (the array face side) at the top of the viewport, so no
    // empty band of negative depth shows above it when the image is wider than the viewport.
    const double fit = std::max(std::min(viewport_.width() / (x1_ - x0_), viewport_.height() / (z1_ - z0_)), 1e-9);
    const double half_h_mm = viewport_.height() / (2 * fit);
    return QPointF((x0_ + x1_) / 2, z0_ + half_h_mm);  // = the middle when the height limits the fit
}

void ViewTransform::fit() {
    zoom_ = 1;
    centre_ = fitCentre();
}

bool ViewTransform::isFit() const {
    const QPointF d = centre_ - fitCentre();
    return zoom_ == 1 && std::abs(d.x()) + std::abs(d.y()) < 1e-9 * (1 + (x1_ - x0_) + (z1_ - z0_));
}

double ViewTransform::pixelsPerMm() const {
    const double fit = std::min(viewport_.width() / (x1_ - x0_), viewport_.height() / (z1_ - z0_));
    return std::max(fit, 1e-9) * zoom_;
}

QPointF ViewTransform::toPixel(const QPointF& mm) const {
    const double s = pixelsPerMm();
    return viewport_.center() + QPointF((mm.x() - centre_.x()) * s, (mm.y() - centre_.y()) * s);
}

QPointF ViewTransform::toMm(const QPointF& px) const {
    const double s = pixelsPerMm();
    const QPointF d = px - viewport_.center();
    return centre_ + QPointF(d.x() / s, d.y() / s);
}

QRectF ViewTransform::imageRectPx() const {
    return QRectF(toPixel(QPointF(x0_, z0_)), toPixel(QPointF(x1_, z1_)));
}

void ViewTransform::zoomAbout(const QPointF& px, double factor) {
    const QPointF before = toMm(px);
    setZoom(zoom_ * factor);
    const QPointF after = toMm(px);
    centre_ += before - after;
}

void ViewTransform::panByPixels(const QPointF& dpx) {
    const double s = pixelsPerMm();
    centre_ -= QPointF(dpx.x() / s, dpx.y() / s);
}

}  // namespace umbra::ui
