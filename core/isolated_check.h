// SPDX-License-Identifier: MIT
#pragma once
// Checking an untrusted capture in a child process. The HDF5 library itself can crash, or loop
// forever, on some damaged files (corrupted object headers or heaps); run in a child, such a
// failure becomes one reported problem. The child first opens and checks the header, which takes
// milliseconds on a sound file, and reports that it got through; a header that does not get
// through within `header_seconds` is given up on (the child is killed). With `full` the child
// then reads every trace (as CaptureReader::validate does). The child dies with its parent
// (PR_SET_PDEATHSIG). Falls back to an in-process check if fork() fails. No Qt.
// fork() copies only the calling thread: call it where no other thread may hold the HDF5 lock
// (core::detail::hdf5Mutex), e.g. a command-line tool before it starts reading; a multi-threaded
// program should run `umbra-cli validate` as a separate process instead.
#include <functional>
#include <string>
#include <vector>

#include "core/error.h"

namespace umbra::core {

using ProblemCheck = std::function<std::vector<Problem>()>;

/// Runs `first` and then (if it found nothing) `rest` in a child process and returns the
/// problems they found; `first` must report within `first_seconds` or the child is killed and
/// one problem says so. A child that crashes gives one problem naming the signal. Same rules
/// as checkCaptureIsolated (single-threaded callers only; in-process when fork() fails).
std::vector<Problem> runIsolated(const ProblemCheck& first, const ProblemCheck& rest, int first_seconds);

/// Problems found in the capture at `path` (empty when it is sound), each with its HDF5 path.
std::vector<Problem> checkCaptureIsolated(const std::string& path, bool full, int header_seconds = 30);

}  // namespace umbra::core
