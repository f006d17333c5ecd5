// SPDX-License-Identifier: MIT
// umbra-cli blind-copy: a case for a blind second reading (core/blind_copy.h).
#include <cstdio>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/blind_copy.h"

namespace umbra::cli {

int cmdBlindCopy(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"-o", "NEW.umbracase", "the blind copy to write (required; never the source case)"},
        {"--copy-captures", "", "copy the captures beside the new case, so that no path leads to the first reader's folders"},
    };
    const char* usage = "umbra-cli blind-copy CASE.umbracase -o NEW.umbracase [--copy-captures]";
    Args a(argv, specs, 0, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Writes a case for a blind second reading: the same captures (path and SHA-256) and recipes,\n"
                            "without the first reader's measurements, findings, texts, views and distance-amplitude curve.\n"
                            "Capture paths are stored relative to the new case, without an absolute fallback.\n"
                            "Exit 2 for a bad or missing case file.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    if (a.positional().size() != 1) throw UsageError(std::string("needs one case file\nusage: ") + usage);
    const auto out = a.value("-o");
    if (!out || out->empty()) throw UsageError(std::string("-o NEW.umbracase is required\nusage: ") + usage);
    const auto doc = core::writeBlindCopy(a.positional()[0], *out, a.has("--copy-captures"));
    std::printf("blind copy of %s written to %s (%zu capture%s, no measurements, findings or texts)\n",
                a.positional()[0].c_str(), out->c_str(), doc.captures.size(), doc.captures.size() == 1 ? "" : "s");
    return 0;
}

}  // namespace umbra::cli
