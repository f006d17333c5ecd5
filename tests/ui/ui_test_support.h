// SPDX-License-Identifier: MIT
#pragma once
// Helpers for the workstation tests: a tiny synthetic capture written with core::CaptureWriter
// (independent of the demo samples) and a way to wait for the controller's worker.
#include <QString>

#include "ui/main/main_window.h"

#include <functional>
#include <string>
#include <vector>

#include "ui/main/main_window.h"

namespace umbra::ui::test {

/// Writes a full-matrix capture: `elements` elements at 0.6 mm pitch, 5 MHz, 1540 m/s, one point
/// reflector at x = 0, depth 10 mm, `frames` frames (scan positions 0, 1, 2 ... mm when
/// frames > 1). Float32 traces, 25 MHz sampling, labelled synthetic in /provenance.
void writePointCapture(const std::string& path, size_t elements = 8, size_t frames = 1);

/// One point reflector: lateral position and depth (m), echo amplitude (relative).
struct TestReflector {
    double x_m = 0, z_m = 0, amplitude = 1;
};
/// As writePointCapture with the given reflectors instead of the one at 10 mm, one frame, and
/// enough samples to reach 3 mm below the deepest.
void writeReflectorsCapture(const std::string& path, const std::vector<TestReflector>& reflectors, size_t elements = 8);

/// Window options for tests: no modal dialogs, autosave recovery ignored, autosave rarely.
MainWindowOptions quietOptions();

/// Processes events until `done()` or `timeout_ms` passes. Returns done().
bool waitUntil(const std::function<bool()>& done, int timeout_ms = 20000);

/// A fresh temporary folder for one test (removed at process exit).
QString tempDir();

}  // namespace umbra::ui::test
