// SPDX-License-Identifier: MIT
#pragma once
// Tiny option parser shared by the subcommands. Unknown options are usage errors (exit 2).
#include <map>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

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

}  // namespace umbra::cli
