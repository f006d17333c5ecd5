// SPDX-License-Identifier: MIT
#pragma once
// Subcommands of umbra-cli. Each returns the process exit code: 0 success, 1 failure,
// 2 bad input or usage. Each lives in its own cmd_*.cpp.
#include <string>
#include <vector>

namespace umbra::cli {

using Argv = std::vector<std::string>;

int cmdInfo(const Argv& args);
int cmdValidate(const Argv& args);
int cmdSimulate(const Argv& args);
int cmdReconstruct(const Argv& args);
int cmdBatch(const Argv& args);
int cmdMeasure(const Argv& args);
int cmdExportFindings(const Argv& args);
int cmdReport(const Argv& args);
int cmdBlindCopy(const Argv& args);
int cmdAgreement(const Argv& args);
int cmdImport(const Argv& args);
int cmdExportDicom(const Argv& args);
int cmdCalibrate(const Argv& args);

/// Reads and checks a batch manifest (as `batch` does before it starts); throws InputError
/// naming the manifest and the key.
void checkManifest(const std::string& path);

struct Command {
    const char* name;
    const char* summary;
    int (*run)(const Argv&);
};

/// The table main() dispatches on.
const std::vector<Command>& commands();

}  // namespace umbra::cli
