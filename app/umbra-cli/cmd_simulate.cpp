// SPDX-License-Identifier: MIT
#include <cstdio>

#include "commands.h"

namespace umbra::cli {
// Placeholder until the simulate command lands: fails loudly, never pretends.
int cmdSimulate(const Argv&) {
    std::fputs("umbra-cli simulate: not available in this build\n", stderr);
    return 1;
}
}  // namespace umbra::cli
