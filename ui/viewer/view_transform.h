// SPDX-License-Identifier: MIT
#pragma once
// Mapping between the image plane (x and depth in mm, depth increasing downwards) and widget
// pixels, with true aspect ratio (one scale for both axes), zoom about a point and pan.
#include <QPointF>
#include <QRectF>

namespace umbra::ui {

class ViewTransform {
public:
    /// Widget rectangle (pixels) the image is drawn into.
    void setViewport(const QRectF& px);
    const QRectF& viewport() const { return viewport_; }
    /// Physical extent of the image, mm: x from x0 to x1, depth from z0 (top) to z1 (bottom).
    void setExtent(double x0_mm, double x1_mm, double z0_mm, double z1_mm);
    QRectF extentMm() const { return QRectF(x0_, z0_, x1_ - x0_, z1_ - z0_); }

    /// Zoom factor relative to "whole image fits the viewport" (1 = fit).
    double zoom() const { return zoom_; }
    /// Image-plane point (mm) drawn at the viewport centre.
    QPointF centreMm() const { return centre_; }
    void setZoom(double zoom);
    void setCentreMm(const QPointF& c) { centre_ = c; }
    /// Back to "whole image fits": centred across, its top at the top of the viewport.
    void fit();
    /// True when the view is what fit() makes.
    bool isFit() const;

    /// Widget pixels per mm (same for x and depth).
    double pixelsPerMm() const;
    /// Image-plane mm (x, depth) -> widget pixels.
    QPointF toPixel(const QPointF& mm) const;
    /// Widget pixels -> image-plane mm (x, depth).
    QPointF toMm(const QPointF& px) const;
    /// The image rectangle in widget pixels.
    QRectF imageRectPx() const;

    /// Multiplies the zoom by `factor`, keeping the image point under `px` fixed on screen.
    void zoomAbout(const QPointF& px, double factor);
    /// Moves the image by `dpx` widget pixels (drag direction).
    void panByPixels(const QPointF& dpx);

    static constexpr double kMinZoom = 0.1;
    static constexpr double kMaxZoom = 200.0;

private:
    QPointF fitCentre() const;
    QRectF viewport_{0, 0, 100, 100};
    double x0_ = 0, x1_ = 1, z0_ = 0, z1_ = 1;
    double zoom_ = 1;
    QPointF centre_{0.5, 0.5};
};

}  // namespace umbra::ui
