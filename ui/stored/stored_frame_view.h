// SPDX-License-Identifier: MIT
#pragma once
// Shows one frame of a stored image (DICOM ultrasound) with its calibrated region outlined, mm
// (or px) scales along the region, and one caliper placed by dragging. Coordinates handed out
// are pixel coordinates of the stored frame (column, row; pixel centres at whole numbers).
#include <QImage>
#include <QPointF>
#include <QWidget>

#include <optional>

#include "core/dicom_image.h"

namespace umbra::ui {

class StoredFrameView : public QWidget {
    Q_OBJECT
public:
    explicit StoredFrameView(QWidget* parent = nullptr);
    /// The image shown (not owned; must outlive the view or be replaced); shows frame 0.
    void setImage(const core::DicomImage* img);
    void setFrame(size_t f);
    size_t frame() const { return frame_; }
    /// Caliper ends in pixel coordinates (column, row); nullopt: none.
    void setCaliper(std::optional<std::pair<QPointF, QPointF>> ends);
    std::optional<std::pair<QPointF, QPointF>> caliper() const { return caliper_; }
    /// Widget position of a pixel coordinate and back.
    QPointF toWidget(QPointF px) const;
    QPointF toPixel(QPointF w) const;
    QSize sizeHint() const override { return {900, 640}; }

signals:
    void caliperChanged();
    void cursorAt(QPointF px);

protected:
    void paintEvent(QPaintEvent*) override;
    void mousePressEvent(QMouseEvent*) override;
    void mouseMoveEvent(QMouseEvent*) override;
    void mouseReleaseEvent(QMouseEvent*) override;

private:
    QRectF imageRect() const;
    const core::DicomImage* img_ = nullptr;
    QImage frame_image_;
    size_t frame_ = 0;
    std::optional<std::pair<QPointF, QPointF>> caliper_;
    bool dragging_ = false;
};

}  // namespace umbra::ui
