// SPDX-License-Identifier: MIT
#pragma once
#include <stdexcept>
#include <string>
#include <vector>

namespace umbra::core {

/// One thing wrong with an input file: where in the file (an HDF5 path, a JSON key, or empty)
/// and what is wrong, in words a user can act on.
struct Problem {
    std::string where;
    std::string what;
};

/// Error raised for bad input. `file()` names the file, `problems()` lists every problem found;
/// `what()` is a ready-to-print message "FILE: WHERE: WHAT" (one line per problem).
class InputError : public std::runtime_error {
public:
    InputError(std::string file, std::vector<Problem> problems);
    InputError(std::string file, std::string where, std::string what);
    const std::string& file() const { return file_; }
    const std::vector<Problem>& problems() const { return problems_; }

private:
    std::string file_;
    std::vector<Problem> problems_;
};

/// Error raised for an invalid setting (recipe value, grid, command-line option).
class SettingError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

/// A parser library's message without its internal tag: "[json.exception.parse_error.101] parse
/// error at line 1, column 2: ..." becomes "line 1, column 2: ...". Other text is returned as is.
std::string plainParseMessage(const std::string& library_message);

/// Raised by long operations when the caller's cancel callback asked to stop.
class Cancelled : public std::runtime_error {
public:
    Cancelled() : std::runtime_error("cancelled") {}
};

}  // namespace umbra::core
