// SPDX-License-Identifier: MIT
#include "core/json_guard.h"

#include <cerrno>
#include <cctype>
#include <cmath>
#include <cstdlib>
#include <vector>

#include "core/error.h"

namespace umbra::core {
namespace {

class Scanner {
public:
    Scanner(const std::string& t, const std::string& file, const JsonLimits& lim) : t_(t), file_(file), lim_(lim) {}

    void run() {
        ws();
        value();
        ws();
        if (i_ < t_.size()) syntax("unexpected text after the end of the JSON value");
    }

private:
    struct Level {
        bool object;
        std::string key;  // object: the current key
        size_t index = 0;  // array: the current index
    };

    // A grammar error: "not valid JSON: ...".
    [[noreturn]] void syntax(const std::string& what) const { fail("not valid JSON: " + what); }

    [[noreturn]] void fail(const std::string& what) const {
        size_t line = 1, col = 1;
        for (size_t k = 0; k < i_ && k < t_.size(); ++k) {
            if (t_[k] == '\n') {
                ++line;
                col = 1;
            } else {
                ++col;
            }
        }
        throw InputError(file_, path(), what + " (line " + std::to_string(line) + ", column " + std::to_string(col) + ")");
    }

    std::string path() const {
        std::string p;
        for (const auto& l : stack_) {
            if (l.object) {
                if (l.key.empty()) continue;
                p += (p.empty() ? "" : ".") + l.key;
            } else {
                p += "[" + std::to_string(l.index) + "]";
            }
        }
        return p;
    }

    void ws() {
        while (i_ < t_.size() && (t_[i_] == ' ' || t_[i_] == '\t' || t_[i_] == '\n' || t_[i_] == '\r')) ++i_;
    }

    void count() {
        if (++values_ > lim_.max_values) fail("more than " + std::to_string(lim_.max_values) + " values (the file is too large to load)");
        spend(kJsonValueBytes);
    }

    // Adds to the estimated memory of the parsed tree; refuses past the budget.
    void spend(size_t bytes) {
        memory_ += bytes;
        if (memory_ > lim_.max_memory_bytes)
            fail("loading it would take more than " + std::to_string(lim_.max_memory_bytes >> 20) +
                 " MiB of memory (the file is too large to load)");
    }

    void value() {
        if (i_ >= t_.size()) syntax("the text ends where a value was expected");
        count();
        const char c = t_[i_];
        if (c == '{') return object();
        if (c == '[') return array();
        if (c == '"') {
            const size_t start = i_;
            string(nullptr);
            spend(kJsonStringBytes + (i_ - start));
            return;
        }
        if (c == '-' || (c >= '0' && c <= '9')) return number();
        for (const char* lit : {"true", "false", "null"}) {
            const std::string s(lit);
            if (t_.compare(i_, s.size(), s) == 0) {
                i_ += s.size();
                return;
            }
        }
        syntax(std::string("unexpected character '") + (c >= 32 && c < 127 ? std::string(1, c) : "?") + "' where a value was expected");
    }

    void push(bool object) {
        if (stack_.size() >= lim_.max_depth) fail("nested deeper than " + std::to_string(lim_.max_depth) + " levels");
        spend(kJsonContainerBytes);
        stack_.push_back({object, {}, 0});
    }

    void object() {
        push(true);
        ++i_;
        ws();
        if (i_ < t_.size() && t_[i_] == '}') {
            ++i_;
            stack_.pop_back();
            return;
        }
        for (;;) {
            ws();
            if (i_ >= t_.size() || t_[i_] != '"') syntax("expected a key in double quotes");
            std::string key;
            string(&key);
            spend(kJsonMemberBytes + key.size());
            stack_.back().key = key;
            ws();
            if (i_ >= t_.size() || t_[i_] != ':') syntax("expected ':' after the key");
            ++i_;
            ws();
            value();
            ws();
            if (i_ < t_.size() && t_[i_] == ',') {
                ++i_;
                continue;
            }
            if (i_ < t_.size() && t_[i_] == '}') {
                ++i_;
                break;
            }
            syntax("expected ',' or '}' in an object");
        }
        stack_.pop_back();
    }

    void array() {
        push(false);
        ++i_;
        ws();
        if (i_ < t_.size() && t_[i_] == ']') {
            ++i_;
            stack_.pop_back();
            return;
        }
        for (;;) {
            ws();
            value();
            ws();
            if (i_ < t_.size() && t_[i_] == ',') {
                ++i_;
                ++stack_.back().index;
                continue;
            }
            if (i_ < t_.size() && t_[i_] == ']') {
                ++i_;
                break;
            }
            syntax("expected ',' or ']' in an array");
        }
        stack_.pop_back();
    }

    // A string; its raw text (escapes kept, enough to name a key) goes to `out` when given.
    void string(std::string* out) {
        ++i_;
        const size_t start = i_;
        while (i_ < t_.size()) {
            const unsigned char c = static_cast<unsigned char>(t_[i_]);
            if (c == '"') {
                if (out) *out = t_.substr(start, i_ - start);
                ++i_;
                return;
            }
            if (c < 0x20) syntax("control character inside a string");
            if (c == '\\') {
                if (i_ + 1 >= t_.size()) break;
                const char e = t_[i_ + 1];
                if (e == 'u') {
                    for (size_t k = 2; k < 6; ++k)
                        if (i_ + k >= t_.size() || !std::isxdigit(static_cast<unsigned char>(t_[i_ + k]))) syntax("bad \\u escape in a string");
                    i_ += 6;
                    continue;
                }
                if (std::string("\"\\/bfnrt").find(e) == std::string::npos) syntax("bad escape in a string");
                i_ += 2;
                continue;
            }
            ++i_;
        }
        syntax("a string is not closed");
    }

    void number() {
        const size_t start = i_;
        if (t_[i_] == '-') ++i_;
        auto digits = [&] {
            const size_t d = i_;
            while (i_ < t_.size() && t_[i_] >= '0' && t_[i_] <= '9') ++i_;
            return i_ > d;
        };
        if (i_ < t_.size() && t_[i_] == '0') {
            ++i_;
        } else if (!digits()) {
            syntax("bad number");
        }
        if (i_ < t_.size() && t_[i_] == '.') {
            ++i_;
            if (!digits()) syntax("bad number: digits expected after '.'");
        }
        if (i_ < t_.size() && (t_[i_] == 'e' || t_[i_] == 'E')) {
            ++i_;
            if (i_ < t_.size() && (t_[i_] == '+' || t_[i_] == '-')) ++i_;
            if (!digits()) syntax("bad number: digits expected in the exponent");
        }
        const std::string s = t_.substr(start, i_ - start);
        errno = 0;
        const double v = std::strtod(s.c_str(), nullptr);
        if (!std::isfinite(v) || errno == ERANGE) {
            if (std::isfinite(v) && std::fabs(v) < 1) return;  // underflow to (nearly) zero is harmless
            i_ = start;
            fail("number " + s + " is out of range");
        }
    }

    const std::string& t_;
    const std::string& file_;
    JsonLimits lim_;
    size_t i_ = 0, values_ = 0, memory_ = 0;
    std::vector<Level> stack_;
};

}  // namespace

void checkJsonText(const std::string& text, const std::string& file, const JsonLimits& limits) { Scanner(text, file, limits).run(); }

}  // namespace umbra::core
