// SPDX-License-Identifier: MIT
#include "args.h"

#include <cmath>
#include <cstdlib>

namespace umbra::cli {

Args::Args(const std::vector<std::string>& argv, const std::vector<OptionSpec>& specs, size_t min_positional,
           size_t max_positional) {
    auto find = [&](const std::string& n) -> const OptionSpec* {
        for (auto& s : specs)
            if (s.name == n) return &s;
        return nullptr;
    };
    bool only_positional = false;
    for (size_t i = 0; i < argv.size(); ++i) {
        std::string a = argv[i];
        if (!only_positional && (a == "--help" || a == "-h")) { help_ = true; continue; }
        if (!only_positional && a == "--") { only_positional = true; continue; }
        if (!only_positional && a.size() > 1 && a[0] == '-') {
            std::string name = a, val;
            bool inline_val = false;
            if (auto eq = a.find('='); eq != std::string::npos && a.rfind("--", 0) == 0) {
                name = a.substr(0, eq);
                val = a.substr(eq + 1);
                inline_val = true;
            }
            const OptionSpec* s = find(name);
            if (!s) throw UsageError("unknown option '" + name + "' (see --help)");
            if (s->metavar.empty()) {
                if (inline_val) throw UsageError("option '" + name + "' takes no value");
                values_[name].push_back("");
            } else {
                if (!inline_val) {
                    if (i + 1 >= argv.size()) throw UsageError("option '" + name + "' needs a value " + s->metavar);
                    val = argv[++i];
                }
                if (!s->repeatable && values_.count(name)) throw UsageError("option '" + name + "' given twice");
                values_[name].push_back(val);
            }
            continue;
        }
        positional_.push_back(a);
    }
    if (help_) return;
    if (positional_.size() < min_positional) throw UsageError("missing argument (see --help)");
    if (positional_.size() > max_positional) throw UsageError("unexpected argument '" + positional_.back() + "' (see --help)");
}

std::optional<std::string> Args::value(const std::string& name) const {
    auto it = values_.find(name);
    if (it == values_.end() || it->second.empty()) return std::nullopt;
    return it->second.back();
}

std::vector<std::string> Args::values(const std::string& name) const {
    auto it = values_.find(name);
    return it == values_.end() ? std::vector<std::string>{} : it->second;
}

std::string helpText(const std::string& usage, const std::string& description, const std::vector<OptionSpec>& specs) {
    std::string s = "usage: " + usage + "\n\n" + description + "\n\noptions:\n";
    for (auto& o : specs) {
        std::string left = "  " + o.name + (o.metavar.empty() ? "" : " " + o.metavar);
        if (left.size() < 30) left.resize(30, ' ');
        else left += "\n" + std::string(30, ' ');
        s += left + o.help + "\n";
    }
    s += "  --help                      show this help\n";
    return s;
}

uint64_t parseWholeNumber(const std::string& opt, const std::string& v, uint64_t lo, uint64_t hi) {
    const auto bad = [&] {
        return UsageError("option '" + opt + "' needs a whole number from " + std::to_string(lo) + " to " + std::to_string(hi) +
                          ", got '" + v + "'");
    };
    if (v.empty() || v.find_first_not_of("0123456789") != std::string::npos || v.size() > 19) throw bad();
    const uint64_t n = std::stoull(v);
    if (n < lo || n > hi) throw bad();
    return n;
}

double parseFiniteNumber(const std::string& opt, const std::string& v) {
    const char* b = v.c_str();
    char* e = nullptr;
    const double x = std::strtod(b, &e);
    if (v.empty() || e == b || *e != '\0' || !std::isfinite(x)) throw UsageError("option '" + opt + "': '" + v + "' is not a number");
    return x;
}

}  // namespace umbra::cli
