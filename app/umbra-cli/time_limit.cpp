// SPDX-License-Identifier: MIT
#include "time_limit.h"

#include <unistd.h>

#include <atomic>
#include <chrono>
#include <cstdio>
#include <sstream>
#include <thread>

namespace umbra::cli {
namespace {
std::atomic<bool> g_reached{false};
std::string g_message;
}  // namespace

void startTimeLimit(double seconds, const std::string& command) {
    std::ostringstream os;
    os << "umbra-cli " << command << ": stopped: the time limit of " << seconds << " s (--timeout) was reached";
    g_message = os.str();
    std::thread([seconds] {
        std::this_thread::sleep_for(std::chrono::duration<double>(seconds));
        g_reached = true;
        std::this_thread::sleep_for(std::chrono::duration<double>(kTimeLimitGraceSeconds));
        // The work did not reach a check in time: end the process here (no destructors run in
        // other threads; outputs in progress stay under their temporary names).
        const std::string m = g_message + " (work did not stop by itself within " +
                              std::to_string(int(kTimeLimitGraceSeconds)) + " s more; ended)\n";
        ssize_t n = write(2, m.data(), m.size());
        (void)n;
        _exit(kTimeLimitExitCode);
    }).detach();
}

bool timeLimitReached() { return g_reached.load(std::memory_order_relaxed); }

std::string timeLimitMessage() { return g_message; }

}  // namespace umbra::cli
