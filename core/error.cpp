// SPDX-License-Identifier: MIT
#include "core/error.h"

namespace umbra::core {
namespace {
std::string format(const std::string& file, const std::vector<Problem>& problems) {
    std::string out;
    for (size_t i = 0; i < problems.size(); ++i) {
        if (i) out += '\n';
        out += file + ": ";
        if (!problems[i].where.empty()) out += problems[i].where + ": ";
        out += problems[i].what;
    }
    if (problems.empty()) out = file + ": unknown problem";
    return out;
}
}  // namespace

InputError::InputError(std::string file, std::vector<Problem> problems)
    : std::runtime_error(format(file, problems)), file_(std::move(file)), problems_(std::move(problems)) {}

InputError::InputError(std::string file, std::string where, std::string what)
    : InputError(std::move(file), std::vector<Problem>{{std::move(where), std::move(what)}}) {}

}  // namespace umbra::core
