// SPDX-License-Identifier: MIT
#pragma once
// One reconstruction job, shared by `reconstruct` and `batch`: capture -> image file written
// frame by frame (memory: one frame and one transmit block, whatever the number of frames),
// plus optional PNGs.
#include <cstddef>
#include <functional>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "core/parameters.h"

namespace umbra::cli {

/// Applies an "XMIN:XMAX:ZMIN:ZMAX:STEP" grid in mm (as --grid-mm) to the recipe. `what` names
/// the option or manifest key in the error (UsageError) when the text is not five numbers.
void applyGridMm(core::Recipe& recipe, const std::string& value, const std::string& what);

/// Contiguous run of capture frames, 0-based.
struct FrameRange {
    size_t first = 0;
    size_t count = 0;
};

/// "all", "N" (0-based frame index) or "A-B" (inclusive range) of a capture with `frames` frames.
/// Throws UsageError naming --frames.
FrameRange parseFrames(const std::string& v, size_t frames);

/// PNG path for `frame`: `base` itself for a one-frame job, else BASE_fNNN.EXT.
std::string pngPathFor(const std::string& base, size_t frame, bool several);

struct JobOptions {
    std::string capture;             ///< capture file
    std::string image;               ///< image file to write (atomically)
    std::optional<std::string> png;  ///< PNG file (several frames: one per frame, see pngPathFor)
    bool dark_png = false;           ///< PNG theme: dark surround (screens) instead of light (print)
    std::string frames = "all";      ///< as --frames
    int threads = 0;                 ///< worker threads, 0 = all cores
    /// Called while the job runs: fraction of the whole job in [0, 1], current frame position
    /// (0-based, within the range) and the number of frames.
    std::function<void(double, size_t, size_t)> progress;
};

struct JobResult {
    std::string capture_sha256;  ///< of the capture's bytes, lowercase hex
    size_t frames = 0;           ///< frames written
    size_t nx = 0, nz = 0;       ///< pixels across and down
    double step_m = 0;           ///< pixel step
    double fidelity_db = 0;      ///< amplitude fidelity of the grid (worst case)
    size_t transmits = 0, receives = 0;
    std::vector<std::pair<std::string, double>> stage_seconds;  ///< summed over frames
    double reconstruct_seconds = 0;  ///< beamforming, summed over frames
    double effective_terms = 0, executed_terms = 0;
    double output_seconds = 0;   ///< TCG, image file and PNG writing
};

/// A progress bar on stderr for a terminal: "[####    ]  40%  TEXT", redrawn at most every
/// 0.1 s (and at 100 %), cleared by done().
class TerminalBar {
public:
    explicit TerminalBar(int width = 40) : width_(width) {}
    ~TerminalBar() { done(); }
    TerminalBar(const TerminalBar&) = delete;
    TerminalBar& operator=(const TerminalBar&) = delete;
    void draw(double fraction, const std::string& text);
    void done();  ///< clears the line

private:
    int width_;
    double last_s_ = -1;
    bool drawn_ = false;
};

/// Checks the capture (header, in a child process), reconstructs the chosen frames with
/// `recipe` and writes the linear envelope after TCG to options.image one frame at a time
/// (PATH.partial, renamed when complete; PNGs are written before the rename). Throws
/// UsageError, core::SettingError or core::InputError for bad input.
JobResult reconstructToFile(const JobOptions& options, const core::Recipe& recipe);

}  // namespace umbra::cli
