// SPDX-License-Identifier: MIT
#include "core/parameters.h"

#include <cmath>
#include <cstdlib>
#include <nlohmann/json.hpp>
#include <sstream>

#include "core/error.h"
#include "core/json_guard.h"

namespace umbra::core {
namespace {
std::string fmt(double v) {
    std::ostringstream os;
    os.precision(10);
    os << v;
    return os.str();
}
std::string rangeText(const ParamSpec& s) {
    switch (s.kind) {
        case ParamKind::Real: return "a number in [" + fmt(s.min) + ", " + fmt(s.max) + "]" + (s.unit.empty() ? "" : " " + s.unit);
        case ParamKind::Integer: return "a whole number in [" + fmt(s.min) + ", " + fmt(s.max) + "]";
        case ParamKind::Flag: return "on/off (1/0, true/false)";
        case ParamKind::Choice: {
            std::string c;
            for (auto& x : s.choices) c += (c.empty() ? "" : ", ") + x;
            return "one of: " + c;
        }
        case ParamKind::Text: return "text";
    }
    return "";
}
}  // namespace

Recipe::Recipe(std::vector<StageSpec> stages) : stages_(std::move(stages)) {
    for (const auto& st : stages_)
        for (const auto& p : st.params) {
            std::string key = st.name + "." + p.name;
            specs_[key] = p;
            if (p.kind == ParamKind::Choice || p.kind == ParamKind::Text)
                values_[key] = p.default_text;
            else
                values_[key] = p.default_number;
        }
}

bool Recipe::has(const std::string& key) const { return specs_.count(key) != 0; }

const ParamSpec& Recipe::spec(const std::string& key) const {
    auto it = specs_.find(key);
    if (it == specs_.end()) {
        std::string known;
        for (auto& [k, v] : specs_) known += (known.empty() ? "" : ", ") + k;
        throw SettingError("unknown setting '" + key + "' (known: " + known + ")");
    }
    return it->second;
}

double Recipe::number(const std::string& key) const {
    const auto& s = spec(key);
    if (s.kind == ParamKind::Choice || s.kind == ParamKind::Text)
        throw SettingError("setting '" + key + "' is text, not a number");
    return std::get<double>(values_.at(key));
}

std::string Recipe::text(const std::string& key) const {
    const auto& s = spec(key);
    if (s.kind != ParamKind::Choice && s.kind != ParamKind::Text)
        throw SettingError("setting '" + key + "' is a number, not text");
    return std::get<std::string>(values_.at(key));
}

void Recipe::setNumber(const std::string& key, double v) {
    const auto& s = spec(key);
    auto bad = [&](const std::string& why) {
        throw SettingError("setting '" + key + "' = " + fmt(v) + " " + why + "; expected " + rangeText(s));
    };
    switch (s.kind) {
        case ParamKind::Choice:
        case ParamKind::Text: bad("is a number"); break;
        case ParamKind::Flag:
            if (v != 0.0 && v != 1.0) bad("is not 0 or 1");
            break;
        case ParamKind::Integer:
            if (!std::isfinite(v) || v != std::round(v)) bad("is not a whole number");
            [[fallthrough]];
        case ParamKind::Real:
            if (!std::isfinite(v)) bad("is not finite");
            if (v < s.min || v > s.max) bad("is out of range");
            break;
    }
    values_[key] = v;
}

void Recipe::setText(const std::string& key, const std::string& v) {
    const auto& s = spec(key);
    if (s.kind == ParamKind::Choice) {
        bool ok = false;
        for (auto& c : s.choices) ok = ok || c == v;
        if (!ok) throw SettingError("setting '" + key + "' = '" + v + "' is not allowed; expected " + rangeText(s));
    } else if (s.kind != ParamKind::Text) {
        set(key, v);
        return;
    }
    values_[key] = v;
}

void Recipe::set(const std::string& key, const std::string& value) {
    const auto& s = spec(key);
    if (s.kind == ParamKind::Choice || s.kind == ParamKind::Text) {
        setText(key, value);
        return;
    }
    if (s.kind == ParamKind::Flag) {
        if (value == "1" || value == "true" || value == "on" || value == "yes") return setNumber(key, 1);
        if (value == "0" || value == "false" || value == "off" || value == "no") return setNumber(key, 0);
        throw SettingError("setting '" + key + "' = '" + value + "' is not on/off; expected " + rangeText(s));
    }
    const char* b = value.c_str();
    char* e = nullptr;
    double v = std::strtod(b, &e);
    if (value.empty() || e == b || *e != '\0')
        throw SettingError("setting '" + key + "' = '" + value + "' is not a number; expected " + rangeText(s));
    setNumber(key, v);
}

void Recipe::applyAssignment(const std::string& a) {
    auto eq = a.find('=');
    if (eq == std::string::npos || eq == 0)
        throw SettingError("'" + a + "' is not of the form stage.param=value");
    set(a.substr(0, eq), a.substr(eq + 1));
}

std::string Recipe::valueText(const std::string& key) const {
    const auto& s = spec(key);
    const auto& v = values_.at(key);
    if (s.kind == ParamKind::Choice || s.kind == ParamKind::Text) return std::get<std::string>(v);
    return fmt(std::get<double>(v));
}

bool Recipe::differsOnlyInDisplay(const Recipe& other) const {
    for (auto& [k, v] : values_) {
        auto it = other.values_.find(k);
        if (it == other.values_.end()) return false;
        if (it->second != v && !specs_.at(k).display_only) return false;
    }
    return values_.size() == other.values_.size();
}

std::string Recipe::toJson(int indent) const {
    nlohmann::ordered_json j = nlohmann::ordered_json::object();
    for (const auto& st : stages_) {
        nlohmann::ordered_json js = nlohmann::ordered_json::object();
        for (const auto& p : st.params) {
            const auto& v = values_.at(st.name + "." + p.name);
            if (p.kind == ParamKind::Choice || p.kind == ParamKind::Text)
                js[p.name] = std::get<std::string>(v);
            else if (p.kind == ParamKind::Flag)
                js[p.name] = std::get<double>(v) != 0.0;
            else if (p.kind == ParamKind::Integer)
                js[p.name] = static_cast<long long>(std::get<double>(v));
            else
                js[p.name] = std::get<double>(v);
        }
        j[st.name] = js;
    }
    return j.dump(indent);
}

void Recipe::mergeJson(const std::string& text, const std::string& source) {
    nlohmann::json j;
    try {
        checkJsonText(text, source);
        j = nlohmann::json::parse(text);
    } catch (const InputError& e) {
        throw SettingError(e.what());
    } catch (const std::exception& e) {
        throw SettingError(source + ": not valid JSON at " + plainParseMessage(e.what()));
    }
    if (!j.is_object()) throw SettingError(source + ": a recipe is a JSON object of stages");
    Recipe next = *this;
    for (auto& [stage, params] : j.items()) {
        if (!params.is_object()) throw SettingError(source + ": '" + stage + "' is not an object of settings");
        for (auto& [name, val] : params.items()) {
            std::string key = stage + "." + name;
            try {
                if (val.is_string()) next.set(key, val.get<std::string>());
                else if (val.is_boolean()) next.setNumber(key, val.get<bool>() ? 1.0 : 0.0);
                else if (val.is_number()) next.setNumber(key, val.get<double>());
                else throw SettingError("setting '" + key + "' has an unsupported JSON type");
            } catch (const SettingError& e) {
                throw SettingError(source + ": " + e.what());
            }
        }
    }
    *this = std::move(next);
}

}  // namespace umbra::core
