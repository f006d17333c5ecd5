// SPDX-License-Identifier: MIT
#pragma once
// Helpers for the workstation tests: a tiny synthetic capture written with core::CaptureWriter
// (independent of the demo samples) and a way to wait for the controller's worker.
#include <QString>

#include "ui/main/main_window.h"

#include <functional>
#include <string>

namespace umbra::ui::test {

/// Options of a workstation for tests: not interactive, no recovery, no autosave.
MainWindow::Options quietOptions();

/// Writes a full-matrix capture: `elements` elements at 0.6 mm pitch, 5 MHz, 1540 m/s, one point
/// reflector at x = 0, depth 10 mm, `frames` frames (scan positions 0, 1, 2 ... mm when
/// frames > 1). Float32 traces, 25 MHz sampling, labelled synthetic in /provenance.
void writePointCapture(const std::string& path, size_t elements = 8, size_t frames = 1);

/// Processes events until `done()` or `timeout_ms` passes. Returns done().
bool waitUntil(const std::function<bool()>& done, int timeout_ms = 20000);

/// A fresh temporary folder for one test (removed at process exit).
QString tempDir();

}  // namespace umbra::ui::test
