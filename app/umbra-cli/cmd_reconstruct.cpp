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
#include "core/error.h"
#include "reconstruction/pipeline.h"
#include "reconstruct_job.h"

namespace umbra::cli {

int cmdReconstruct(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"-o", "IMAGE.h5", "image file to write (required): linear envelope after time-gain compensation"},
        {"--png", "FILE", "also write an 8-bit PNG with mm axes and a colour bar; several frames: FILE_fNNN.png each"},
        {"--theme", "light|dark", "PNG surround: light (print, the default) or dark (screens)"},
        {"--grid-mm", "XMIN:XMAX:ZMIN:ZMAX:STEP", "image region and pixel step in mm (0:0 = automatic region, step 0 = automatic)"},
        {"--frames", "all|N|A-B", "frames to reconstruct, 0-based (default all)"},
        {"--recipe", "FILE.json", "recipe to start from (as saved by the workstation or in the image file)"},
        {"--set", "stage.param=value", "change one setting (repeatable; applied after --recipe); see --list-settings", true},
        {"--list-settings", "", "print every setting with its range and default, then exit"},
        {"--threads", "N", "worker threads (default: all cores)"},
        {"--timings", "", "print wall time per stage and the beamforming throughput"},
    };
    const char* usage = "umbra-cli reconstruct CAPTURE -o IMAGE.h5 [--png FILE] [--theme light|dark] [--grid-mm XMIN:XMAX:ZMIN:ZMAX:STEP] [--frames all|N]\n"
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
        if (auto g = a.value("--grid-mm")) applyGridMm(recipe, *g, "--grid-mm");
        for (auto& s : a.values("--set")) recipe.applyAssignment(s);
        JobOptions job;
        if (auto t = a.value("--threads")) job.threads = int(parseWholeNumber("--threads", *t, 1, 256));
        job.capture = a.positional()[0];
        job.image = *out;
        job.png = a.value("--png");
        if (auto t = a.value("--theme")) {
            if (*t != "light" && *t != "dark") throw UsageError("--theme must be light or dark (got \"" + *t + "\")");
            job.dark_png = *t == "dark";
        }
        job.frames = a.value("--frames").value_or("all");
        TerminalBar bar;
        if (isatty(2))
            job.progress = [&bar](double all, size_t pos, size_t count) {
                bar.draw(all, "frame " + std::to_string(pos + 1) + "/" + std::to_string(count));
            };
        const JobResult r = reconstructToFile(job, recipe);
        bar.done();

        if (a.has("--timings")) {
            std::printf("grid            %zu x %zu pixels (x x z), step %.4f mm, amplitude fidelity %.2f dB (worst case, Gaussian PSF model)\n",
                        r.nx, r.nz, r.step_m * 1e3, r.fidelity_db);
            std::printf("frames          %zu, %zu transmits x %zu receives\n", r.frames, r.transmits, r.receives);
            for (auto& [name, s] : r.stage_seconds) std::printf("%-28s %10.2f ms\n", name.c_str(), s * 1e3);
            std::printf("%-28s %10.2f ms\n", "total", r.reconstruct_seconds * 1e3);
            std::printf("%-28s %10.2f ms\n", "TCG + image file + PNG", r.output_seconds * 1e3);
            const double terms = r.effective_terms, executed = r.executed_terms, total = r.reconstruct_seconds;
            double das = 0;
            for (auto& [name, s] : r.stage_seconds)
                if (name == "delay-and-sum") das = s;
            if (das > 0) {
                std::printf("throughput      %.3g effective terms/s in delay-and-sum (pixels x transmits x receives / s); %.3g end to end\n",
                            terms / das, total > 0 ? terms / total : 0.0);
                std::printf("executed        %.3g terms evaluated (%.0f %% of effective: reciprocity and aperture skipping), %.3g terms/s\n",
                            executed, terms > 0 ? 100 * executed / terms : 0.0, executed / das);
            } else {  // das.method = wavenumber: no delay-and-sum terms
                std::printf("throughput      %.3g effective terms/s end to end (pixels x transmits x receives / s; wavenumber imaging)\n",
                            total > 0 ? terms / total : 0.0);
            }
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
