// SPDX-License-Identifier: MIT
#pragma once
// Checking an untrusted capture before the workstation reads it. The HDF5 library can crash or
// hang on a damaged file, and the workstation is multithreaded (fork without exec is unsafe), so
// the header is read by a separate program, `umbra-cli validate --quiet --header FILE`, with a
// time limit. The checker is `umbra-cli` next to the workstation's executable.
// When the checker is missing the capture is refused (the workstation never reads an unchecked
// capture in-process): the message names where the checker was looked for.
#include <QString>

namespace umbra::ui {

/// Where the checker program is looked for: set by setCaptureCheckerPath, else
/// "<QCoreApplication::applicationDirPath()>/umbra-cli".
QString captureCheckerPath();
/// Uses `path` as the checker (tests; an installation with another layout).
void setCaptureCheckerPath(const QString& path);

/// Checks the capture at `path` in the checker process within `seconds` (header only).
/// Throws core::InputError naming the file: the checker's problems, "did not finish within N s"
/// (the checker is killed), a checker that crashed, or a checker that is missing.
void checkCaptureOutOfProcess(const QString& path, int seconds = 30);

}  // namespace umbra::ui
