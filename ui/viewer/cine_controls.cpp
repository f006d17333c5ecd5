// SPDX-License-Identifier: MIT
#include "ui/viewer/cine_controls.h"

#include <QCheckBox>
#include <QDoubleSpinBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QTimer>
#include <QToolButton>

#include <cmath>

namespace umbra::ui {

CineControls::CineControls(QWidget* parent) : QWidget(parent) {
    auto* lay = new QHBoxLayout(this);
    lay->setContentsMargins(0, 0, 0, 0);
    play_ = new QToolButton;
    play_->setText(tr("▶ Play"));
    play_->setCheckable(true);
    play_->setToolTip(tr("Play or pause the frames (Space in the stored-image window)"));
    loop_ = new QCheckBox(tr("Loop"));
    loop_->setChecked(true);
    loop_->setToolTip(tr("Start again at the first frame after the last"));
    fps_ = new QDoubleSpinBox;
    fps_->setRange(0.5, 120);
    fps_->setDecimals(1);
    fps_->setSuffix(tr(" frames/s"));
    fps_->setValue(10);
    fps_->setToolTip(tr("Playback rate"));
    source_ = new QLabel;
    source_->setStyleSheet(QStringLiteral("color: palette(mid);"));
    lay->addWidget(play_);
    lay->addWidget(loop_);
    lay->addWidget(fps_);
    lay->addWidget(source_);
    timer_ = new QTimer(this);
    connect(timer_, &QTimer::timeout, this, &CineControls::advance);
    connect(play_, &QToolButton::toggled, this, [this](bool on) {
        play_->setText(on ? tr("❚❚ Pause") : tr("▶ Play"));
        if (on) {
            updateInterval();
            timer_->start();
        } else {
            timer_->stop();
        }
        emit playingChanged(on);
    });
    connect(fps_, &QDoubleSpinBox::valueChanged, this, [this] {
        source_text_ = tr("set by hand");
        source_->setText(QStringLiteral("(%1)").arg(source_text_));
        updateInterval();
    });
    setFrameCount(0);
}

void CineControls::updateInterval() { timer_->setInterval(std::max(1, int(std::lround(1000.0 / fps_->value())))); }

void CineControls::setFrameCount(size_t n) {
    count_ = n;
    if (current_ >= n) current_ = 0;
    const bool multi = n > 1;
    if (!multi) pause();
    play_->setEnabled(multi);
    loop_->setEnabled(multi);
    fps_->setEnabled(multi);
}

void CineControls::setCurrentFrame(size_t f) { current_ = f; }

void CineControls::setFrameRate(double fps, const QString& source) {
    const QSignalBlocker block(fps_);
    fps_->setValue(std::clamp(fps, fps_->minimum(), fps_->maximum()));
    source_text_ = source;
    source_->setText(source.isEmpty() ? QString() : QStringLiteral("(%1)").arg(source));
    updateInterval();
}

bool CineControls::isPlaying() const { return play_->isChecked(); }
bool CineControls::loops() const { return loop_->isChecked(); }
void CineControls::setLoop(bool on) { loop_->setChecked(on); }
double CineControls::framesPerSecond() const { return fps_->value(); }

void CineControls::play() {
    if (count_ > 1) play_->setChecked(true);
}
void CineControls::pause() { play_->setChecked(false); }

void CineControls::advance() {
    if (count_ < 2) return;
    if (ready_ && !ready_()) return;  // the frame asked for last is not shown yet
    size_t next = current_ + 1;
    if (next >= count_) {
        if (!loops()) {
            pause();
            return;
        }
        next = 0;
    }
    current_ = next;
    emit frameRequested(qulonglong(next));
}

}  // namespace umbra::ui
