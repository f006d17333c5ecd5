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

std::string plainParseMessage(const std::string& m) {
    std::string out = m;
    if (out.size() > 1 && out[0] == '[') {
        const auto close = out.find("] ");
        if (close != std::string::npos) out = out.substr(close + 2);
    }
    for (const char* lead : {"parse error at ", "parse error: "})
        if (out.rfind(lead, 0) == 0) out = out.substr(std::string(lead).size());
    return out;
}

}  // namespace umbra::core
