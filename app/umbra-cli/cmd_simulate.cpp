// SPDX-License-Identifier: MIT
#include <cstdio>
#include <filesystem>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/error.h"
#include "reconstruction/simulate/scene.h"
#include "reconstruction/simulate/simulator.h"
#include "time_limit.h"

namespace umbra::cli {

// Usage errors and bad scenes propagate to main(), which exits 2 naming the file or option.
int cmdSimulate(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"-o", "CAPTURE.h5", "output capture file (required)"},
        {"--seed", "N", "random seed (overrides the scene's seed)"},
        {"--frames", "N", "simulate only the first N frames (quick tests)"},
        {"--threads", "N", "worker threads (default: all cores)"},
        {"--quiet", "", "print nothing on success"},
    };
    const char* usage = "umbra-cli simulate SCENE.json -o CAPTURE.h5 [--seed N] [--frames N]";
    Args a(argv, specs, 1, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Simulates the capture described by SCENE.json (schema: docs/scene-format.md) and\n"
                            "writes it as a capture file (format v1). The result is labelled synthetic data.\n"
                            "Exit 0 on success; 2 for a bad scene, bad options or an output file that cannot\n"
                            "be created (the message names the file and the key); 1 for other failures.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    const auto out = a.value("-o");
    if (!out) throw UsageError("missing -o CAPTURE.h5 (see --help)");
    recon::sim::SimOptions opt;
    if (auto v = a.value("--seed")) opt.seed = parseWholeNumber("--seed", *v, 0, (uint64_t(1) << 53));
    if (auto v = a.value("--frames")) opt.max_frames = parseWholeNumber("--frames", *v, 1, 1000000);
    if (auto v = a.value("--threads")) opt.threads = unsigned(parseWholeNumber("--threads", *v, 1, 256));
    const auto scene = recon::sim::loadScene(a.positional()[0]);
    opt.progress = [](double) {
        if (timeLimitReached()) throw core::Cancelled();  // --timeout: between frames; the partial file is removed
    };
    const auto st = recon::sim::simulateToFile(scene, *out, opt);
    if (!a.has("--quiet")) {
        std::error_code ec;
        const auto bytes = std::filesystem::file_size(*out, ec);
        std::printf("%s: %s (synthetic), %.2f s, %.1f MiB, %.3g scatterer-traces, %.3g samples written (%.3g nominal)\n",
                    out->c_str(), scene.title.c_str(), st.seconds, double(bytes) / (1024.0 * 1024.0), st.scatterer_traces,
                    st.samples_written, st.nominal_samples);
    }
    return 0;
}

}  // namespace umbra::cli
