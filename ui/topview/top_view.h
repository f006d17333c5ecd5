// SPDX-License-Identifier: MIT
#pragma once
// The top view of an encoded scan: peak amplitude over depth, x across, scan position down.
// Frames appear as the background beamforming finishes them; clicking picks the frame. After a
// cancelled run a button finishes the missing frames.
#include <QWidget>

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

private:
    QRectF plotRect() const;
    /// Frame whose row is at widget y, or -1.
    long frameAt(double y) const;
    /// "Finish top view" shows while frames are missing and nothing beamforms them.
    void updateFinishButton();
    CaseController* ctl_;
    QPushButton* finish_ = nullptr;
};

}  // namespace umbra::ui
