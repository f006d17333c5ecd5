// SPDX-License-Identifier: MIT
// Loading an optional module (a shared library with one C entry point) on first use, so that a
// heavy dependency costs nothing at start-up of the commands that never need it.
#pragma once

#include <string>

namespace umbra::core::detail {

/// What to load: `file` (e.g. "libumbra_png.so"), looked for in $`env_var` (a file path), beside
/// the running executable, ../lib/umbra/ from it (installed layout), then `build_path` (the build
/// tree, may be empty); `symbol` is the entry point; `what` names the module in messages.
struct ModuleSpec {
    const char* what;
    const char* file;
    const char* env_var;
    const char* build_path;
    const char* symbol;
};

/// Address of the entry point, or nullptr with the reason in `why`. Each distinct `spec.file`
/// is loaded once per process (thread-safe); the outcome, success or failure, is remembered.
void* loadModuleSymbol(const ModuleSpec& spec, std::string& why);

}  // namespace umbra::core::detail
