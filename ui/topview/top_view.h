// SPDX-License-Identifier: MIT
#pragma once
// The top view of an encoded scan: peak amplitude over depth, x across, scan position down.
// Frames appear as the background beamforming finishes them; clicking picks the frame.
#include <QWidget>

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

private:
    QRectF plotRect() const;
    /// Frame whose row is at widget y, or -1.
    long frameAt(double y) const;
    CaseController* ctl_;
};

}  // namespace umbra::ui
