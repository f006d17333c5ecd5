// SPDX-License-Identifier: MIT
// umbra-cli report: runs umbra-report (the PDF report, Qt Gui on the offscreen platform) from
// the folder umbra-cli is in, so that umbra-cli itself needs no Qt.
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <string>
#include <vector>

#include "args.h"
#include "commands.h"

namespace umbra::cli {

int cmdReport(const Argv& argv) {
    std::error_code ec;
    const std::filesystem::path self = std::filesystem::read_symlink("/proc/self/exe", ec);
    const std::string helper = (ec ? std::filesystem::path("umbra-report") : self.parent_path() / "umbra-report").string();
    if (access(helper.c_str(), X_OK) != 0)
        throw UsageError("PDF reports need umbra-report beside umbra-cli (" + helper +
                         " not found: build with the workstation, -DUMBRA_BUILD_UI=ON)");
    std::vector<std::string> args = {helper};
    args.insert(args.end(), argv.begin(), argv.end());
    std::vector<char*> cargs;
    for (auto& a : args) cargs.push_back(a.data());
    cargs.push_back(nullptr);
    execv(helper.c_str(), cargs.data());
    throw UsageError("cannot run " + helper + ": " + std::strerror(errno));
}

}  // namespace umbra::cli
