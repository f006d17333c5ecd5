// SPDX-License-Identifier: MIT
#include "ui/stored/stored_image_window.h"

#include <QFileInfo>
#include <QHBoxLayout>
#include <QKeyEvent>
#include <QLabel>
#include <QShortcut>
#include <QSlider>
#include <QVBoxLayout>

#include <cmath>

#include "core/stored_caliper.h"
#include "core/uncertainty.h"
#include "ui/stored/stored_frame_view.h"
#include "ui/viewer/cine_controls.h"

namespace umbra::ui {

StoredImageWindow::StoredImageWindow(const QString& path, QWidget* parent) : QWidget(parent, Qt::Window) {
    img_ = std::make_unique<core::DicomImage>(core::readDicomFile(path.toStdString()));
    const auto& im = *img_;
    setAttribute(Qt::WA_DeleteOnClose);
    setWindowTitle(tr("%1 — stored frames%2 — Umbra").arg(QFileInfo(path).fileName(), im.synthetic ? tr(" (synthetic)") : QString()));
    auto* lay = new QVBoxLayout(this);

    auto* info = new QLabel;
    QString facts = tr("<b>%1</b> — %2 frame(s), %3 × %4 px, %5")
                        .arg(QFileInfo(path).fileName().toHtmlEscaped())
                        .arg(im.frames)
                        .arg(im.columns)
                        .arg(im.rows)
                        .arg(QString::fromStdString(im.photometric));
    if (!im.description.empty()) facts += QStringLiteral(" — ") + QString::fromStdString(im.description).toHtmlEscaped();
    if (im.synthetic) facts += tr(" — <b>synthetic data</b>");
    info->setText(facts);
    lay->addWidget(info);
    warning_ = new QLabel;
    warning_->setWordWrap(true);
    if (!im.calibration) {
        warning_->setText(tr("⚠ uncalibrated — pixels: %1. Distances are in px, not mm.")
                              .arg(QString::fromStdString(im.calibration_note)));
        warning_->setStyleSheet(QStringLiteral("background: #7a1f1f; color: white; padding: 4px; font-weight: bold;"));
    } else {
        const auto& c = *im.calibration;
        warning_->setText(tr("Calibrated from ultrasound region %1: pixel %2 × %3 mm (x × depth); dashed outline.")
                              .arg(c.region_index + 1)
                              .arg(c.dx_m * 1e3, 0, 'g', 4)
                              .arg(c.dz_m * 1e3, 0, 'g', 4));
    }
    lay->addWidget(warning_);

    view_ = new StoredFrameView;
    view_->setImage(img_.get());
    lay->addWidget(view_, 1);

    auto* row = new QHBoxLayout;
    row->addWidget(new QLabel(tr("Frame")));
    slider_ = new QSlider(Qt::Horizontal);
    slider_->setRange(0, int(im.frames) - 1);
    slider_->setEnabled(im.frames > 1);
    row->addWidget(slider_, 1);
    frame_label_ = new QLabel;
    frame_label_->setMinimumWidth(90);
    row->addWidget(frame_label_);
    cine_ = new CineControls;
    cine_->setFrameCount(im.frames);
    if (im.frame_time_s && *im.frame_time_s > 0)
        cine_->setFrameRate(1.0 / *im.frame_time_s, tr("from the file: %1 ms per frame").arg(*im.frame_time_s * 1e3, 0, 'g', 4));
    else
        cine_->setFrameRate(10, tr("default; the file states no frame time"));
    row->addWidget(cine_);
    lay->addLayout(row);

    readout_ = new QLabel(tr("Drag on the image to measure with the caliper."));
    readout_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    cursor_ = new QLabel;
    auto* bottom = new QHBoxLayout;
    bottom->addWidget(readout_, 1);
    bottom->addWidget(cursor_);
    lay->addLayout(bottom);
    auto* caution = new QLabel(tr("Umbra is an aid: written procedures and qualified, licensed professionals decide."));
    caution->setStyleSheet(QStringLiteral("color: palette(mid);"));
    lay->addWidget(caution);

    connect(slider_, &QSlider::valueChanged, this, [this](int v) { showFrame(size_t(v)); });
    connect(cine_, &CineControls::frameRequested, this, [this](qulonglong f) { setCurrentFrame(size_t(f)); });
    connect(view_, &StoredFrameView::caliperChanged, this, &StoredImageWindow::updateReadout);
    connect(view_, &StoredFrameView::cursorAt, this, [this](QPointF px) {
        const auto& c = img_->calibration;
        if (px.x() < -0.5 || px.y() < -0.5 || px.x() > double(img_->columns) - 0.5 || px.y() > double(img_->rows) - 0.5) {
            cursor_->clear();
            return;
        }
        if (c) {
            // Position rounded to the pixel (its own reading uncertainty).
            const auto rx = core::roundToUncertainty(c->x0_m * 1e3 + (px.x() - double(c->col0)) * c->dx_m * 1e3, c->dx_m * 1e3);
            const auto rz = core::roundToUncertainty(c->z0_m * 1e3 + (px.y() - double(c->row0)) * c->dz_m * 1e3, c->dz_m * 1e3);
            cursor_->setText(tr("x %1 mm, depth %2 mm").arg(QString::fromStdString(rx.value_text), QString::fromStdString(rz.value_text)));
        } else {
            cursor_->setText(tr("column %1 px, row %2 px").arg(std::lround(px.x())).arg(std::lround(px.y())));
        }
    });
    auto* space = new QShortcut(QKeySequence(Qt::Key_Space), this);
    connect(space, &QShortcut::activated, this, [this] { cine_->isPlaying() ? cine_->pause() : cine_->play(); });
    showFrame(0);
    resize(1100, 820);
}

StoredImageWindow::~StoredImageWindow() { view_->setImage(nullptr); }

size_t StoredImageWindow::currentFrame() const { return view_->frame(); }

void StoredImageWindow::setCurrentFrame(size_t f) {
    if (f >= img_->frames) return;
    slider_->setValue(int(f));  // → showFrame
    showFrame(f);
}

void StoredImageWindow::showFrame(size_t f) {
    view_->setFrame(f);
    cine_->setCurrentFrame(f);
    frame_label_->setText(tr("%1 / %2").arg(f + 1).arg(img_->frames));
    updateReadout();
}

void StoredImageWindow::setCaliper(double col_a, double row_a, double col_b, double row_b) {
    view_->setCaliper(std::make_pair(QPointF(col_a, row_a), QPointF(col_b, row_b)));
}

QString StoredImageWindow::warningText() const { return img_->calibration ? QString() : warning_->text(); }

QString StoredImageWindow::readoutText() const {
    const auto cal = view_->caliper();
    if (!cal) return {};
    core::PixelScale s;
    if (img_->calibration) s = {true, img_->calibration->dx_m * 1e3, img_->calibration->dz_m * 1e3};
    const auto sp = core::speedUncertaintyDefault("soft tissue");
    const auto q = core::storedCaliper(s, cal->first.x(), cal->first.y(), cal->second.x(), cal->second.y(), sp.relative);
    QStringList parts;
    for (const auto& m : q) parts << QString::fromStdString(core::formatMeasured(m));
    return tr("Caliper, frame %1: %2%3")
        .arg(currentFrame() + 1)
        .arg(parts.join(QStringLiteral("; ")))
        .arg(img_->calibration ? QString() : tr(" — uncalibrated, pixels"));
}

void StoredImageWindow::updateReadout() {
    const QString t = readoutText();
    if (!t.isEmpty()) readout_->setText(t);
}

}  // namespace umbra::ui
