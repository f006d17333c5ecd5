// SPDX-License-Identifier: MIT
#pragma once
// Runs delay-and-sum off the GUI thread. One std::thread owns its own capture reader and
// Reconstructor; requests carry a generation number, a newer request cancels an older run,
// and results come back as queued Qt signals.
#include <QObject>
#include <QString>

#include <atomic>
#include <condition_variable>
#include <memory>
#include <mutex>
#include <optional>
#include <set>
#include <string>
#include <thread>

#include "core/frame.h"
#include "core/parameters.h"

namespace umbra::ui {

using FramePtr = std::shared_ptr<const core::Frame>;

class BeamformWorker : public QObject {
    Q_OBJECT
public:
    explicit BeamformWorker(QObject* parent = nullptr);
    ~BeamformWorker() override;  ///< cancels and joins the thread

    /// Beamform `frame` of the capture at `path` with `recipe`; with `all_frames` go on with
    /// every other frame in the background (for the top view). A request with a new
    /// `generation` discards everything done for older ones. A request with the same generation
    /// beamforms `frame` again (the caller no longer has it) unless `resume` (go on with the
    /// frames not done yet, e.g. after a cancel).
    void request(quint64 generation, const std::string& path, const core::Recipe& recipe, size_t frame,
                 bool all_frames, size_t frame_count, bool resume = false);
    /// Stops the current run (the thread stays up).
    void cancel();
    /// Number of Reconstructor::run calls started so far (for tests and timings).
    long runs() const { return runs_.load(); }

signals:
    void progress(quint64 generation, qulonglong frame, double fraction, bool background);
    void frameReady(quint64 generation, qulonglong frame, umbra::ui::FramePtr image, double seconds,
                    double fidelity_db, bool background);
    void failed(quint64 generation, QString message);
    void cancelled(quint64 generation);
    void allFramesDone(quint64 generation);

private:
    struct Request {
        quint64 generation = 0;
        std::string path;
        core::Recipe recipe;
        size_t frame = 0;
        bool all_frames = false;
        size_t frame_count = 1;
        bool resume = false;
    };
    void loop();

    std::mutex mutex_;
    std::condition_variable cv_;
    std::optional<Request> pending_;
    bool stop_ = false;
    bool stop_current_ = false;  ///< cancel(): drop the current request, run or not
    std::atomic<bool> cancel_{false};
    std::atomic<long> runs_{0};
    std::thread thread_;
};

}  // namespace umbra::ui

Q_DECLARE_METATYPE(umbra::ui::FramePtr)
