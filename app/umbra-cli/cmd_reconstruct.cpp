// SPDX-License-Identifier: MIT
// umbra-cli reconstruct: capture -> image file (linear envelope after TCG) and optional PNGs.
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/capture_file.h"
#include "core/error.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/sizing_setup.h"
#include "reconstruction/tgc_stage.h"

namespace umbra::cli {
namespace {

double parseNumber(const std::string& opt, const std::string& v) {
    const char* b = v.c_str();
    char* e = nullptr;
    double x = std::strtod(b, &e);
    if (v.empty() || e == b || *e != '\0' || !std::isfinite(x)) throw UsageError("option '" + opt + "': '" + v + "' is not a number");
    return x;
}

std::vector<std::string> split(const std::string& s, char sep) {
    std::vector<std::string> out;
    std::string item;
    std::stringstream ss(s);
    while (std::getline(ss, item, sep)) out.push_back(item);
    if (!s.empty() && s.back() == sep) out.push_back("");
    return out;
}

// "all", "N" (0-based frame index) or "A-B" (inclusive range).
std::vector<size_t> parseFrames(const std::string& v, size_t frames) {
    std::vector<size_t> out;
    if (v == "all") {
        for (size_t i = 0; i < frames; ++i) out.push_back(i);
        return out;
    }
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
    if (dash == std::string::npos) return {idx(v)};
    const size_t a = idx(v.substr(0, dash)), b = idx(v.substr(dash + 1));
    if (b < a) throw UsageError("--frames: range '" + v + "' is empty");
    for (size_t i = a; i <= b; ++i) out.push_back(i);
    return out;
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

}  // namespace

int cmdReconstruct(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"-o", "IMAGE.h5", "image file to write (required): linear envelope after time-gain compensation"},
        {"--png", "FILE", "also write an 8-bit PNG with mm axes and a colour bar; several frames: FILE_fNNN.png each"},
        {"--grid-mm", "XMIN:XMAX:ZMIN:ZMAX:STEP", "image region and pixel step in mm (0:0 = automatic region, step 0 = automatic)"},
        {"--frames", "all|N|A-B", "frames to reconstruct, 0-based (default all)"},
        {"--recipe", "FILE.json", "recipe to start from (as saved by the workstation or in the image file)"},
        {"--set", "stage.param=value", "change one setting (repeatable; applied after --recipe); see --list-settings", true},
        {"--list-settings", "", "print every setting with its range and default, then exit"},
        {"--threads", "N", "worker threads (default: all cores)"},
        {"--timings", "", "print wall time per stage and the beamforming throughput"},
    };
    const char* usage = "umbra-cli reconstruct CAPTURE -o IMAGE.h5 [--png FILE] [--grid-mm XMIN:XMAX:ZMIN:ZMAX:STEP] [--frames all|N]\n"
                        "       [--recipe FILE.json] [--set stage.param=value ...] [--threads N] [--timings]";
    try {
        Args a(argv, specs, 0, 1);
        if (a.help()) {
            std::fputs(helpText(usage,
                                "Reconstructs B-scan images from CAPTURE by delay-and-sum (total focusing method for\n"
                                "full-matrix captures, coherent compounding for plane-wave and virtual-source captures)\n"
                                "and writes the linear envelope after time-gain compensation to IMAGE.h5 with its axes,\n"
                                "the recipe used and the capture's SHA-256. Exit 2 for bad input or settings.",
                                specs)
                           .c_str(),
                       stdout);
            return 0;
        }
        core::Recipe recipe = recon::defaultRecipe();
        if (a.has("--list-settings")) {
            for (auto& st : recipe.stages())
                for (auto& p : st.params) {
                    const std::string key = st.name + "." + p.name;
                    const std::string zero = p.zero_means.empty() ? "" : " [0 = " + p.zero_means + "]";
                    std::printf("%-40s default %-12s %s%s%s\n", key.c_str(), recipe.valueText(key).c_str(), p.description.c_str(),
                                zero.c_str(), p.display_only ? " [display]" : "");
                }
            return 0;
        }
        if (a.positional().size() != 1) throw UsageError("missing argument CAPTURE (see --help)");
        const auto out = a.value("-o");
        if (!out) throw UsageError("option -o IMAGE.h5 is required");
        if (auto rf = a.value("--recipe")) {
            std::ifstream in(*rf);
            if (!in) throw core::InputError(*rf, "", "cannot open the recipe file");
            std::stringstream ss;
            ss << in.rdbuf();
            recipe.mergeJson(ss.str(), *rf);
        }
        if (auto g = a.value("--grid-mm")) {
            auto parts = split(*g, ':');
            if (parts.size() != 5) throw UsageError("--grid-mm needs XMIN:XMAX:ZMIN:ZMAX:STEP (five numbers in mm), got '" + *g + "'");
            const char* keys[5] = {"grid.x_min_mm", "grid.x_max_mm", "grid.z_min_mm", "grid.z_max_mm", "grid.step_mm"};
            for (int i = 0; i < 5; ++i) recipe.setNumber(keys[i], parseNumber("--grid-mm", parts[size_t(i)]));
        }
        for (auto& s : a.values("--set")) recipe.applyAssignment(s);
        int threads = 0;
        if (auto t = a.value("--threads")) {
            const double v = parseNumber("--threads", *t);
            if (v < 1 || v > 256 || v != std::floor(v)) throw UsageError("--threads needs a whole number from 1 to 256, got '" + *t + "'");
            threads = int(v);
        }
        const std::string path = a.positional()[0];
        // The header is checked in a child process first: a damaged file that would crash the
        // HDF5 library becomes a clear error instead.
        if (auto problems = checkCaptureIsolated(path, false); !problems.empty()) throw core::InputError(path, problems);
        core::CaptureReader cap(path);
        const auto& h = cap.header();
        const auto frames = parseFrames(a.value("--frames").value_or("all"), h.frames);
        recon::tgcParams(recipe);  // check display settings before the long part
        recon::Reconstructor rec(cap, recipe, threads);
        const auto& grid = rec.grid();

        const bool tty = isatty(2);
        recon::Progress prog;
        size_t fi = 0;
        if (tty)
            prog.progress = [&](double x) {
                const double all = (double(fi) + x) / double(frames.size());
                const int n = int(all * 40);
                std::fprintf(stderr, "\r[%s%s] %3d%%  frame %zu/%zu", std::string(size_t(n), '#').c_str(),
                             std::string(size_t(40 - n), ' ').c_str(), int(all * 100), fi + 1, frames.size());
                std::fflush(stderr);
            };

        core::ImageStack stack;
        stack.x_m = grid.xAxis();
        stack.z_m = grid.zAxis();
        stack.frames = frames.size();
        stack.recipe_json = recipe.toJson();
        stack.envelope.reserve(frames.size() * grid.nx() * grid.nz());
        // Facts the sizing tools' point-spread model needs (optional attributes, docs/capture-format.md).
        stack.acquisition = recon::acquisitionOf(h);
        if (h.scan && h.scan->position_m.size() == h.frames)
            for (size_t f : frames) stack.scan_position_m.push_back(h.scan->position_m[f]);
        std::vector<std::pair<std::string, double>> sums;
        double terms = 0, total = 0, executed = 0;
        const std::string title = (h.title.empty() ? path : h.title) + (h.isSynthetic() && h.title.find("synthetic") == std::string::npos ? " - synthetic demonstration data" : "");
        for (fi = 0; fi < frames.size(); ++fi) {
            core::Frame f = rec.run(frames[fi], prog);
            if (stack.capture_sha256.empty()) stack.capture_sha256 = f.capture_sha256.empty() ? core::fileSha256(path) : f.capture_sha256;
            core::Frame g = recon::applyTgc(f, h, recipe);
            stack.envelope.insert(stack.envelope.end(), g.envelope.begin(), g.envelope.end());
            const auto& t = rec.lastTimings();
            if (sums.empty()) sums = t.stage_seconds;
            else
                for (size_t k = 0; k < sums.size(); ++k) sums[k].second += t.stage_seconds[k].second;
            terms += t.effective_terms;
            executed += t.executed_terms;
            total += t.total_seconds;
            if (auto png = a.value("--png")) {
                const std::string p = pngPathFor(*png, frames[fi], frames.size() > 1);
                recon::writePng(p, g, recipe, title + "  (frame " + std::to_string(frames[fi]) + ")");
            }
        }
        if (tty) std::fputs("\n", stderr);
        core::writeImageFile(*out, stack);

        if (a.has("--timings")) {
            std::printf("grid            %zu x %zu pixels (x x z), step %.4f mm, amplitude fidelity %.2f dB (worst case, Gaussian PSF model)\n",
                        grid.nx(), grid.nz(), grid.step_m * 1e3, rec.amplitudeFidelityDb());
            std::printf("frames          %zu, %zu transmits x %zu receives\n", frames.size(), h.transmits(), h.receives());
            for (auto& [name, s] : sums) std::printf("%-28s %10.2f ms\n", name.c_str(), s * 1e3);
            std::printf("%-28s %10.2f ms\n", "total", total * 1e3);
            double das = 0;
            for (auto& [name, s] : sums)
                if (name == "delay-and-sum") das = s;
            std::printf("throughput      %.3g effective terms/s in delay-and-sum (pixels x transmits x receives / s); %.3g end to end\n",
                        das > 0 ? terms / das : 0.0, total > 0 ? terms / total : 0.0);
            std::printf("executed        %.3g terms evaluated (%.0f %% of effective: reciprocity and aperture skipping), %.3g terms/s\n", executed,
                        terms > 0 ? 100 * executed / terms : 0.0, das > 0 ? executed / das : 0.0);
        }
        return 0;
    } catch (const UsageError& e) {
        std::fprintf(stderr, "umbra-cli reconstruct: %s\n", e.what());
        return 2;
    } catch (const core::SettingError& e) {
        std::fprintf(stderr, "umbra-cli reconstruct: bad setting: %s\n", e.what());
        return 2;
    } catch (const core::InputError& e) {
        std::fprintf(stderr, "umbra-cli reconstruct: %s\n", e.what());
        return 2;
    }
}

}  // namespace umbra::cli
