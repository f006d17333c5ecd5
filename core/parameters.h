// SPDX-License-Identifier: MIT
#pragma once
// Declared parameters and recipes. Each stage declares its parameters once (StageSpec); the
// command line (--set stage.param=value), the saved recipe (JSON) and the workstation's
// recipe panel are all generated from those declarations.
#include <map>
#include <string>
#include <variant>
#include <vector>

namespace umbra::core {

enum class ParamKind {
    Real,     ///< floating-point number in [min, max]
    Integer,  ///< whole number in [min, max]
    Choice,   ///< one of `choices`
    Flag,     ///< on/off (stored as 0/1)
    Text      ///< free text with its own syntax, checked by the stage (e.g. a curve)
};

struct ParamSpec {
    std::string name;         ///< key inside the stage, snake_case, e.g. "f_number"
    std::string label;        ///< short label for the recipe panel, e.g. "Receive f-number"
    std::string description;  ///< one sentence: what it does, with the unit
    std::string unit;         ///< "", "dB", "mm", "MHz", "m/s", ...
    ParamKind kind = ParamKind::Real;
    double min = 0, max = 0;          ///< Real / Integer bounds (inclusive)
    double default_number = 0;        ///< Real / Integer / Flag default
    std::vector<std::string> choices; ///< Choice values
    std::string default_text;         ///< Choice / Text default
    bool display_only = false;        ///< true: changing it re-maps the stored envelope, no re-beamforming
    double step = 0;                  ///< suggested UI step (0 = choose from range)
    /// For Real/Integer parameters where 0 is not a value but a mode: the text a user sees for 0
    /// (e.g. "from capture", "automatic"). Empty: 0 is an ordinary value.
    std::string zero_means;
};

struct StageSpec {
    std::string name;         ///< "das", "tgc", "log_compression", ...
    std::string label;        ///< "Delay-and-sum"
    std::string description;
    std::vector<ParamSpec> params;
};

using ParamValue = std::variant<double, std::string>;

/// Every setting of reconstruction and display, keyed "stage.param", validated against the
/// declarations it was made from. Value semantics; cheap to copy.
///
///   Recipe r(recon::allStages());
///   r.set("das.f_number", "2.0");            // throws SettingError on a bad value
///   double f = r.number("das.f_number");
class Recipe {
public:
    Recipe() = default;
    explicit Recipe(std::vector<StageSpec> stages);  ///< all values at their defaults

    const std::vector<StageSpec>& stages() const { return stages_; }
    const ParamSpec& spec(const std::string& key) const;  ///< throws SettingError if unknown
    bool has(const std::string& key) const;

    double number(const std::string& key) const;
    int integer(const std::string& key) const { return static_cast<int>(number(key)); }
    bool flag(const std::string& key) const { return number(key) != 0.0; }
    std::string text(const std::string& key) const;  ///< Choice / Text value

    /// Parses `value` as the parameter's kind and checks its range; throws SettingError with a
    /// message naming the key, the value and the allowed range.
    void set(const std::string& key, const std::string& value);
    void setNumber(const std::string& key, double value);
    void setText(const std::string& key, const std::string& value);
    /// "stage.param=value" as on the command line.
    void applyAssignment(const std::string& assignment);

    /// Value as text for display or the command line.
    std::string valueText(const std::string& key) const;
    /// True if every display-only key is the only difference between *this and other.
    bool differsOnlyInDisplay(const Recipe& other) const;
    bool operator==(const Recipe& other) const { return values_ == other.values_; }

    /// {"stage": {"param": value, ...}, ...}
    std::string toJson(int indent = 2) const;
    /// Applies values from JSON over the current ones (unknown keys and bad values are
    /// SettingError naming them). `source` names the file for messages.
    void mergeJson(const std::string& json, const std::string& source = "recipe");

    const std::map<std::string, ParamValue>& values() const { return values_; }

private:
    std::vector<StageSpec> stages_;
    std::map<std::string, ParamValue> values_;
    std::map<std::string, ParamSpec> specs_;
};

}  // namespace umbra::core
