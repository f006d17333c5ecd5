// SPDX-License-Identifier: MIT
#pragma once
// A window on a stored image (DICOM ultrasound, already beamformed frames): the frame with its
// scales, a caliper measuring in mm when the Sequence of Ultrasound Regions calibrates the frame
// and in px (with a visible warning) when nothing does, and cine playback of multi-frame files.
#include <QString>
#include <QWidget>

#include <memory>

#include "core/dicom_image.h"

class QLabel;
class QSlider;

namespace umbra::ui {

class CineControls;
class StoredFrameView;

class StoredImageWindow : public QWidget {
    Q_OBJECT
public:
    /// Reads `path` (throws core::InputError naming the file and the problem).
    explicit StoredImageWindow(const QString& path, QWidget* parent = nullptr);
    ~StoredImageWindow() override;
    const core::DicomImage& image() const { return *img_; }
    StoredFrameView* view() const { return view_; }
    CineControls* cine() const { return cine_; }
    size_t currentFrame() const;
    void setCurrentFrame(size_t f);
    /// Caliper between two pixel positions (column, row) of the stored frame.
    void setCaliper(double col_a, double row_a, double col_b, double row_b);
    /// The caliper readout as shown ("" without a caliper).
    QString readoutText() const;
    /// The calibration warning as shown ("" when calibrated).
    QString warningText() const;

private:
    void updateReadout();
    void showFrame(size_t f);
    std::unique_ptr<core::DicomImage> img_;
    StoredFrameView* view_ = nullptr;
    CineControls* cine_ = nullptr;
    QSlider* slider_ = nullptr;
    QLabel* frame_label_ = nullptr;
    QLabel* warning_ = nullptr;
    QLabel* readout_ = nullptr;
    QLabel* cursor_ = nullptr;
};

}  // namespace umbra::ui
