// SPDX-License-Identifier: MIT
#pragma once
// `--timeout SECONDS` for long work (reconstruct, batch, simulate). When the time is up, work
// that checks timeLimitReached() (between transmit blocks, frames and captures) stops with
// core::Cancelled and main() reports it (exit 124, as the `timeout` utility). Work that does not
// get to a check within kTimeLimitGraceSeconds more is ended by a watchdog thread with the same
// message and exit code; only outputs already finished are left (files are written under a
// temporary name and renamed when complete).
#include <string>

namespace umbra::cli {

inline constexpr int kTimeLimitExitCode = 124;
inline constexpr double kTimeLimitGraceSeconds = 5;

/// Starts the clock (once per process). `seconds` > 0.
void startTimeLimit(double seconds, const std::string& command);
/// True once the time limit has passed.
bool timeLimitReached();
/// The message printed when the limit ends the work, e.g.
/// "umbra-cli reconstruct: stopped: the time limit of 60 s (--timeout) was reached".
std::string timeLimitMessage();

}  // namespace umbra::cli
