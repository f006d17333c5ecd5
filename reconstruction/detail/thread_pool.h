// SPDX-License-Identifier: MIT
#pragma once
// A minimal persistent worker pool: run(count, fn) calls fn(worker, i) for every i in
// [0, count), the calling thread taking part as worker 0. Items are handed out dynamically;
// callers make results independent of which worker ran an item (determinism).
#include <atomic>
#include <condition_variable>
#include <exception>
#include <functional>
#include <mutex>
#include <thread>
#include <vector>

namespace umbra::recon::detail {

class ThreadPool {
public:
    /// `workers` >= 1 in total, the caller included.
    explicit ThreadPool(int workers) {
        for (int w = 1; w < workers; ++w) threads_.emplace_back([this, w] { loop(w); });
    }
    ~ThreadPool() {
        {
            std::lock_guard<std::mutex> lk(m_);
            quit_ = true;
        }
        cv_.notify_all();
        for (auto& t : threads_) t.join();
    }
    ThreadPool(const ThreadPool&) = delete;
    ThreadPool& operator=(const ThreadPool&) = delete;
    int size() const { return int(threads_.size()) + 1; }

    /// Runs fn(worker, i) for i in [0, count). `on_caller` (optional) runs on the calling thread
    /// after each of its items with the number of items finished so far; returning true stops
    /// handing out further items. Rethrows the first exception of any item.
    void run(size_t count, const std::function<void(int, size_t)>& fn, const std::function<bool(size_t)>& on_caller = {}) {
        {
            std::lock_guard<std::mutex> lk(m_);
            fn_ = &fn;
            on_caller_ = on_caller ? &on_caller : nullptr;
            count_ = count;
            next_.store(0);
            done_.store(0);
            stop_.store(false);
            error_ = nullptr;
            busy_ = int(threads_.size());
            ++generation_;
        }
        cv_.notify_all();
        work(0);
        while (true) {  // caller: its own share, reporting progress
            if (on_caller && on_caller(done_.load())) stop_.store(true);
            std::unique_lock<std::mutex> lk(m_);
            if (busy_ == 0) break;
            done_cv_.wait_for(lk, std::chrono::milliseconds(50));
        }
        if (on_caller) on_caller(done_.load());
        fn_ = nullptr;
        on_caller_ = nullptr;
        if (error_) std::rethrow_exception(error_);
    }

private:
    void work(int w) {
        while (!stop_.load(std::memory_order_relaxed)) {
            const size_t i = next_.fetch_add(1);
            if (i >= count_) break;
            try {
                (*fn_)(w, i);
            } catch (...) {
                std::lock_guard<std::mutex> lk(m_);
                if (!error_) error_ = std::current_exception();
                stop_.store(true);
            }
            const size_t d = done_.fetch_add(1) + 1;
            if (w == 0 && on_caller_ && (*on_caller_)(d)) stop_.store(true);
        }
    }
    void loop(int w) {
        size_t seen = 0;
        while (true) {
            {
                std::unique_lock<std::mutex> lk(m_);
                cv_.wait(lk, [&] { return quit_ || generation_ != seen; });
                if (quit_) return;
                seen = generation_;
            }
            work(w);
            {
                std::lock_guard<std::mutex> lk(m_);
                --busy_;
            }
            done_cv_.notify_all();
        }
    }

    std::vector<std::thread> threads_;
    std::mutex m_;
    std::condition_variable cv_, done_cv_;
    const std::function<void(int, size_t)>* fn_ = nullptr;
    const std::function<bool(size_t)>* on_caller_ = nullptr;
    size_t count_ = 0;
    std::atomic<size_t> next_{0}, done_{0};
    std::atomic<bool> stop_{false};
    std::exception_ptr error_;
    int busy_ = 0;
    size_t generation_ = 0;
    bool quit_ = false;
};

}  // namespace umbra::recon::detail
