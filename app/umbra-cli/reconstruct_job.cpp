// SPDX-License-Identifier: MIT
#include "reconstruct_job.h"

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <sstream>

#include "args.h"
#include "core/capture_file.h"
#include "core/error.h"
#include "core/frame.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/sizing_setup.h"
#include "reconstruction/sizing_setup.h"
#include "reconstruction/tgc_stage.h"
#include "time_limit.h"

namespace umbra::cli {
namespace {

std::vector<std::string> split(const std::string& s, char sep) {
    std::vector<std::string> out;
    std::string item;
    std::stringstream ss(s);
    while (std::getline(ss, item, sep)) out.push_back(item);
    if (!s.empty() && s.back() == sep) out.push_back("");
    return out;
}

using Clock = std::chrono::steady_clock;
double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

}  // namespace

void applyGridMm(core::Recipe& recipe, const std::string& value, const std::string& what) {
    auto parts = split(value, ':');
    if (parts.size() != 5) throw UsageError(what + " needs XMIN:XMAX:ZMIN:ZMAX:STEP (five numbers in mm), got '" + value + "'");
    const char* keys[5] = {"grid.x_min_mm", "grid.x_max_mm", "grid.z_min_mm", "grid.z_max_mm", "grid.step_mm"};
    for (int i = 0; i < 5; ++i) recipe.setNumber(keys[i], parseFiniteNumber(what, parts[size_t(i)]));
}

FrameRange parseFrames(const std::string& v, size_t frames) {
    if (v == "all") return {0, frames};
    auto idx = [&](const std::string& s) {
        size_t pos = 0;
        unsigned long long n = 0;
        try {
            if (s.empty() || s[0] == '-' || s[0] == '+') throw std::invalid_argument(s);
            n = std::stoull(s, &pos);
        } catch (const std::exception&) {
            throw UsageError("--frames: '" + v + "' is not 'all', a frame index N or a range A-B");
        }
        if (pos != s.size()) throw UsageError("--frames: '" + v + "' is not 'all', a frame index N or a range A-B");
        if (n >= frames)
            throw UsageError("--frames: frame " + s + " does not exist (the capture has " + std::to_string(frames) + " frame(s), 0-based)");
        return size_t(n);
    };
    auto dash = v.find('-');
    if (dash == std::string::npos) return {idx(v), 1};
    const size_t a = idx(v.substr(0, dash)), b = idx(v.substr(dash + 1));
    if (b < a) throw UsageError("--frames: range '" + v + "' is empty");
    return {a, b - a + 1};
}

std::string pngPathFor(const std::string& base, size_t frame, bool several) {
    if (!several) return base;
    char suffix[32];
    std::snprintf(suffix, sizeof suffix, "_f%03zu", frame);
    const auto dot = base.find_last_of('.');
    const auto slash = base.find_last_of('/');
    if (dot == std::string::npos || (slash != std::string::npos && dot < slash)) return base + suffix + ".png";
    return base.substr(0, dot) + suffix + base.substr(dot);
}

void TerminalBar::draw(double fraction, const std::string& text) {
    const double now = std::chrono::duration<double>(Clock::now().time_since_epoch()).count();
    if (drawn_ && now - last_s_ < 0.1 && fraction < 1) return;
    last_s_ = now;
    drawn_ = true;
    const double x = std::clamp(fraction, 0.0, 1.0);
    const int n = int(x * width_);
    std::fprintf(stderr, "\r\033[K[%s%s] %3d%%  %s", std::string(size_t(n), '#').c_str(), std::string(size_t(width_ - n), ' ').c_str(),
                 int(x * 100), text.c_str());
    std::fflush(stderr);
}

void TerminalBar::done() {
    if (drawn_) std::fputs("\r\033[K", stderr);
    drawn_ = false;
}

JobResult reconstructToFile(const JobOptions& o, const core::Recipe& recipe) {
    // The header is checked in a child process first: a damaged file that would crash the
    // HDF5 library becomes a clear error instead.
    if (auto problems = checkCaptureIsolated(o.capture, false); !problems.empty()) throw core::InputError(o.capture, problems);
    core::CaptureReader cap(o.capture);
    const auto& h = cap.header();
    const FrameRange frames = parseFrames(o.frames, h.frames);
    recon::tgcParams(recipe);  // check display settings before the long part
    recon::Reconstructor rec(cap, recipe, o.threads);
    const auto& grid = rec.grid();

    JobResult r;
    r.nx = grid.nx();
    r.nz = grid.nz();
    r.step_m = grid.step_m;
    r.fidelity_db = rec.amplitudeFidelityDb();
    r.transmits = h.transmits();
    r.receives = h.receives();

    size_t pos = 0;
    recon::Progress prog;
    if (o.progress) prog.progress = [&](double x) { o.progress((double(pos) + x) / double(frames.count), pos, frames.count); };
    prog.cancelled = [] { return timeLimitReached(); };  // --timeout

    const std::string title = (h.title.empty() ? o.capture : h.title) +
                              (h.isSynthetic() && h.title.find("synthetic") == std::string::npos ? " - synthetic demonstration data" : "");
    core::ImageWriter out(o.image, grid.xAxis(), grid.zAxis(), recipe.toJson());
    // Facts the sizing tools' point-spread model needs and the frames' scan positions (optional,
    // docs/capture-format.md).
    // Views other than contact L-L also record the view and the image frame.
    auto facts = recon::acquisitionOf(h);
    if (!recon::usesHomogeneousModel(h, recipe)) {
        facts.view_mode = recipe.text("delay_model.mode");
        facts.image_frame = h.medium.wedge ? "specimen" : "array";
    }
    out.setAcquisition(facts);
    if (h.scan && h.scan->position_m.size() == h.frames) {
        std::vector<double> scan;
        for (size_t k = 0; k < frames.count; ++k) scan.push_back(h.scan->position_m[frames.first + k]);
        out.setScanPositions(scan);
    }
    for (pos = 0; pos < frames.count; ++pos) {
        const size_t index = frames.first + pos;
        core::Frame f = rec.run(index, prog);
        auto t0 = Clock::now();
        if (r.capture_sha256.empty()) r.capture_sha256 = f.capture_sha256.empty() ? core::fileSha256(o.capture) : f.capture_sha256;
        const core::Frame g = recon::applyTgc(f, h, recipe);
        f = core::Frame();  // one frame in memory at a time
        out.append(g.envelope);
        if (o.png)
            recon::writePng(pngPathFor(*o.png, index, frames.count > 1), g, recipe,
                            title + "  (frame " + std::to_string(index) + (facts.view_mode.empty() ? "" : ", view " + facts.view_mode) + ")",
                            o.dark_png);
        r.output_seconds += since(t0);
        const auto& t = rec.lastTimings();
        if (r.stage_seconds.empty()) r.stage_seconds = t.stage_seconds;
        else
            for (size_t k = 0; k < r.stage_seconds.size() && k < t.stage_seconds.size(); ++k) r.stage_seconds[k].second += t.stage_seconds[k].second;
        r.effective_terms += t.effective_terms;
        r.executed_terms += t.executed_terms;
        r.reconstruct_seconds += t.total_seconds;
    }
    auto t0 = Clock::now();
    out.setCaptureSha256(r.capture_sha256);
    out.finish();
    r.output_seconds += since(t0);
    r.frames = frames.count;
    return r;
}

}  // namespace umbra::cli
