// SPDX-License-Identifier: MIT
#pragma once
// Cine playback of a multi-frame image or capture: play / pause, loop, frame rate. It asks for
// frames (frameRequested); the owner shows them and keeps it told of the current frame. With a
// ready check, playback waits until the frame asked for is on screen (a capture's frames are
// beamformed on demand), so it never runs ahead of the display.
#include <QString>
#include <QWidget>

#include <functional>

class QCheckBox;
class QDoubleSpinBox;
class QLabel;
class QTimer;
class QToolButton;

namespace umbra::ui {

class CineControls : public QWidget {
    Q_OBJECT
public:
    explicit CineControls(QWidget* parent = nullptr);
    /// Number of frames; fewer than 2 disables the controls (and stops playback).
    void setFrameCount(size_t n);
    /// Current frame as shown by the owner (emits nothing).
    void setCurrentFrame(size_t f);
    /// Playback rate, frames per second, and where it comes from ("Frame Time 33.3 ms", "default").
    void setFrameRate(double fps, const QString& source);
    /// Playback advances only when `ready()` is true (e.g. the frame is displayed).
    void setReadyCheck(std::function<bool()> ready) { ready_ = std::move(ready); }
    bool isPlaying() const;
    bool loops() const;
    void setLoop(bool on);
    double framesPerSecond() const;
    QString rateSource() const { return source_text_; }
    void play();
    void pause();
    /// One playback step (what the timer does): the next frame, or frame 0 after the last when
    /// looping, or a pause at the last frame otherwise.
    void advance();

signals:
    void frameRequested(qulonglong frame);
    void playingChanged(bool playing);

private:
    void updateInterval();
    QToolButton* play_ = nullptr;
    QCheckBox* loop_ = nullptr;
    QDoubleSpinBox* fps_ = nullptr;
    QLabel* source_ = nullptr;
    QTimer* timer_ = nullptr;
    std::function<bool()> ready_;
    QString source_text_;
    size_t count_ = 0, current_ = 0;
};

}  // namespace umbra::ui
