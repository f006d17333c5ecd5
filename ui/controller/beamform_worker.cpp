// SPDX-License-Identifier: MIT
#include "ui/controller/beamform_worker.h"

#include <chrono>
#include <exception>

#include "core/capture_file.h"
#include "core/error.h"
#include "reconstruction/pipeline.h"

namespace umbra::ui {

BeamformWorker::BeamformWorker(QObject* parent) : QObject(parent) {
    qRegisterMetaType<FramePtr>("umbra::ui::FramePtr");
    thread_ = std::thread([this] { loop(); });
}

BeamformWorker::~BeamformWorker() {
    {
        std::lock_guard lock(mutex_);
        stop_ = true;
        cancel_ = true;
    }
    cv_.notify_all();
    if (thread_.joinable()) thread_.join();
}

void BeamformWorker::request(quint64 generation, const std::string& path, const core::Recipe& recipe, size_t frame,
                             bool all_frames, size_t frame_count, bool resume) {
    {
        std::lock_guard lock(mutex_);
        pending_ = Request{generation, path, recipe, frame, all_frames, frame_count, resume};
        cancel_ = true;  // the running job re-checks whether it is still wanted
    }
    cv_.notify_all();
}

void BeamformWorker::cancel() {
    std::lock_guard lock(mutex_);
    pending_.reset();
    cancel_ = true;
    stop_current_ = true;  // also when the thread is between two frames
}

void BeamformWorker::loop() {
    std::unique_ptr<core::CaptureReader> reader;
    std::unique_ptr<recon::Reconstructor> recon;
    std::string reader_path;
    core::Recipe recon_recipe;
    std::optional<Request> cur;
    std::set<size_t> done;
    bool cancelled_cur = false;

    for (;;) {
        size_t job = 0;
        bool background = false;
        {
            std::unique_lock lock(mutex_);
            for (;;) {
                if (stop_) return;
                if (stop_current_) {
                    cancelled_cur = true;
                    stop_current_ = false;
                }
                if (pending_) {
                    if (!cur || cur->generation != pending_->generation) done.clear();
                    else if (!pending_->resume) done.erase(pending_->frame);  // asked again: the caller no longer has it
                    cur = std::move(*pending_);
                    pending_.reset();
                    cancelled_cur = false;
                }
                cancel_ = false;
                if (cur && !cancelled_cur) {
                    if (!done.count(cur->frame)) {
                        job = cur->frame;
                        background = false;
                        break;
                    }
                    if (cur->all_frames) {
                        bool found = false;
                        for (size_t f = 0; f < cur->frame_count; ++f)
                            if (!done.count(f)) {
                                job = f;
                                found = true;
                                break;
                            }
                        if (found) {
                            background = true;
                            break;
                        }
                    }
                }
                cv_.wait(lock);
            }
        }
        const Request req = *cur;
        try {
            if (!reader || reader_path != req.path) {
                recon.reset();
                reader = std::make_unique<core::CaptureReader>(req.path);
                reader_path = req.path;
            }
            if (!recon || !(recon_recipe == req.recipe || recon_recipe.differsOnlyInDisplay(req.recipe))) {
                recon.reset();
                recon = std::make_unique<recon::Reconstructor>(*reader, req.recipe);
                recon_recipe = req.recipe;
            }
            recon::Progress prog;
            const quint64 gen = req.generation;
            // At most one progress signal per percent (the run may report per block or tile).
            auto last = std::make_shared<int>(-1);
            prog.progress = [this, gen, job, background, last](double f) {
                const int pct = static_cast<int>(f * 100);
                if (pct == *last) return;
                *last = pct;
                emit progress(gen, job, f, background);
            };
            prog.cancelled = [this] { return cancel_.load(); };
            ++runs_;
            const auto t0 = std::chrono::steady_clock::now();
            auto frame = std::make_shared<core::Frame>(recon->run(job, prog));
            const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
            done.insert(job);
            emit frameReady(gen, job, frame, secs, recon->amplitudeFidelityDb(), background);
            if (req.all_frames && done.size() >= req.frame_count) emit allFramesDone(gen);
        } catch (const core::Cancelled&) {
            // A newer request is pending (handled on the next turn) or the run was cancelled.
            std::lock_guard lock(mutex_);
            if (!pending_) {
                cancelled_cur = true;
                emit cancelled(req.generation);
            }
        } catch (const std::exception& e) {
            {
                std::lock_guard lock(mutex_);
                cancelled_cur = true;
            }
            recon.reset();
            emit failed(req.generation, QString::fromStdString(e.what()));
        }
    }
}

}  // namespace umbra::ui
