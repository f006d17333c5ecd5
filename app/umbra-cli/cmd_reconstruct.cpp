// SPDX-License-Identifier: MIT
#include <cstdio>

#include "commands.h"

namespace umbra::cli {
// Placeholder until the reconstruct command lands: fails loudly, never pretends.
int cmdReconstruct(const Argv&) {
    std::fputs("umbra-cli reconstruct: not available in this build\n", stderr);
    return 1;
}
}  // namespace umbra::cli
