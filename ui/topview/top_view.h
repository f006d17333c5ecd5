// SPDX-License-Identifier: MIT
#pragma once
// The top view of an encoded scan: peak amplitude over depth, x across, scan position down.
// Frames appear as the background beamforming finishes them; clicking picks the frame. After a
// cancelled run a button finishes the missing frames. Dragging with the right button (or Shift +
// left) measures between two points: the end-to-end distance and the −6 dB length along the scan
// axis over the points' x range.
#include <QPointF>
#include <QWidget>

#include <optional>

class QPushButton;

namespace umbra::ui {

class CaseController;

class TopView : public QWidget {
    Q_OBJECT
public:
    explicit TopView(CaseController* controller, QWidget* parent = nullptr);

protected:
    void paintEvent(QPaintEvent*) override;
    void mousePressEvent(QMouseEvent*) override;
    void mouseMoveEvent(QMouseEvent*) override;
    void resizeEvent(QResizeEvent*) override;
    void mouseReleaseEvent(QMouseEvent*) override;

public:
    /// Sets the measuring line's ends (x, scan position y in mm); for tests and scripted use.
    void setMeasureLine(QPointF a_mm, QPointF b_mm);
    /// Readout of the measuring line ("" without one): end to end and along the scan axis.
    QString measureText() const;

private:
    /// Widget point -> (x mm, scan position mm of the nearest frame); nullopt outside the plot.
    std::optional<QPointF> toMm(QPointF px) const;
    QPointF toPx(QPointF mm) const;
    std::optional<QPointF> meas_a_, meas_b_;
    bool measuring_ = false;
    QRectF plotRect() const;
    /// Frame whose row is at widget y, or -1.
    long frameAt(double y) const;
    /// "Finish top view" shows while frames are missing and nothing beamforms them.
    void updateFinishButton();
    CaseController* ctl_;
    QPushButton* finish_ = nullptr;
};

}  // namespace umbra::ui
