// SPDX-License-Identifier: MIT
#pragma once
// Tiny option parser and helpers shared by the subcommands. Unknown options are usage errors
// (exit 2; main() maps UsageError, core::SettingError and core::InputError to exit 2).
#include <cstdint>
#include <map>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "core/error.h"

namespace umbra::cli {

struct UsageError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

struct OptionSpec {
    std::string name;      ///< "--grid-mm"
    std::string metavar;   ///< "" for a flag, else e.g. "XMIN:XMAX:ZMIN:ZMAX:STEP"
    std::string help;
    bool repeatable = false;
};

class Args {
public:
    /// Parses `argv` (after the subcommand name). Throws UsageError for unknown options,
    /// missing values or a wrong number of positional arguments.
    Args(const std::vector<std::string>& argv, const std::vector<OptionSpec>& specs,
         size_t min_positional, size_t max_positional);
    bool has(const std::string& name) const { return values_.count(name) != 0; }
    std::optional<std::string> value(const std::string& name) const;
    std::vector<std::string> values(const std::string& name) const;
    const std::vector<std::string>& positional() const { return positional_; }
    bool help() const { return help_; }

private:
    std::map<std::string, std::vector<std::string>> values_;
    std::vector<std::string> positional_;
    bool help_ = false;
};

/// Formats a --help page: usage line, description, options.
std::string helpText(const std::string& usage, const std::string& description, const std::vector<OptionSpec>& specs);

/// Value `v` of option `opt` as a whole number in [lo, hi] (decimal digits only, no sign).
/// Throws UsageError naming the option and the accepted range otherwise.
uint64_t parseWholeNumber(const std::string& opt, const std::string& v, uint64_t lo, uint64_t hi);

/// Value `v` of option `opt` as a finite number (unit as the option says). Throws UsageError.
double parseFiniteNumber(const std::string& opt, const std::string& v);

/// Checks the capture at `path` in a child process, so that a crash or endless loop of the
/// HDF5 library on a damaged file becomes a reported problem instead of killing umbra-cli.
/// Header only (deadline: 30 s, or UMBRA_HEADER_TIMEOUT_S seconds), or with `full` also
/// every trace block as CaptureReader::validate does. Empty when the file is sound.
/// Call it before opening a capture from the command line (in cmd_info.cpp).
std::vector<core::Problem> checkCaptureIsolated(const std::string& path, bool full);
/// Seconds a child may take to get through a file's header (UMBRA_HEADER_TIMEOUT_S, default 30).
int headerSeconds();

}  // namespace umbra::cli
