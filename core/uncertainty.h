// SPDX-License-Identifier: MIT
#pragma once
// Uncertainty budgets and rounding after JCGM 100:2008 (the GUM). A budget lists named
// components, each already expressed as a standard uncertainty of the measured quantity (the
// sensitivity coefficient applied, GUM 5.1.3); the components are taken as uncorrelated and
// combined root-sum-square (GUM 5.1.2). The expanded uncertainty is U = k·u_c with k = 2
// (GUM 6.2, about 95 % for a near-normal result). Shown values are rounded with
// roundToUncertainty (GUM 7.2.6: uncertainty to at most two significant digits, the value to
// the same decimal place). No Qt.
#include <string>
#include <vector>

namespace umbra::core {

/// One named component of an uncertainty budget.
struct UncertaintyComponent {
    std::string name;      ///< e.g. "resolution (edge placement)", "grid step", "speed of sound", "noise"
    std::string basis;     ///< how it was evaluated, e.g. "rectangular, half-width 0.05 mm, /√3"
    double standard = 0;   ///< standard uncertainty contribution in the quantity's unit (≥ 0)
    bool operator==(const UncertaintyComponent&) const = default;
};

/// Coverage factor used for every expanded uncertainty Umbra shows (GUM 6.2.1, k = 2).
inline constexpr double kCoverageFactor = 2.0;

struct UncertaintyBudget {
    std::vector<UncertaintyComponent> components;
    double coverage_factor = kCoverageFactor;
    /// Combined standard uncertainty: root-sum-square of the components (GUM eq. 10, uncorrelated).
    double combined() const;
    /// Expanded uncertainty U = k·u_c.
    double expanded() const { return coverage_factor * combined(); }
    /// Adds a component (ignored when `standard` is not finite; negative values count by magnitude).
    void add(std::string name, std::string basis, double standard);
    bool operator==(const UncertaintyBudget&) const = default;
};

/// A measured value with its budget, in one unit.
struct MeasuredValue {
    std::string name;   ///< "x", "depth", "length", "height", ...
    double value = 0;
    std::string unit;   ///< "mm", "dB", ...
    UncertaintyBudget budget;
    /// True when the value is an upper bound (resolution-limited extent: the true size may be
    /// smaller); the interval then reads "≤ value + U".
    bool upper_bound = false;
    bool operator==(const MeasuredValue&) const = default;
};

/// A value and its uncertainty rounded together (GUM 7.2.6).
struct Rounded {
    double value = 0;        ///< rounded value
    double uncertainty = 0;  ///< rounded uncertainty
    int decimals = 0;        ///< decimal places of both (0 when the step is 1 or coarser)
    std::string value_text;        ///< e.g. "12.35"
    std::string uncertainty_text;  ///< e.g. "0.12"
};

/// Rounds `u` (> 0) to two significant digits and `value` to the same decimal place (GUM 7.2.6).
/// u ≤ 0 or not finite: the value is shown with `fallback_decimals` places and the uncertainty
/// as 0. A non-finite value gives the text "n/a".
Rounded roundToUncertainty(double value, double u, int fallback_decimals = 2);

/// "12.35 ± 0.12 mm" with the two rounded together (uncertainty as given: pass U for expanded).
std::string formatWithUncertainty(double value, double u, const std::string& unit);

/// Readout of a measured value with its expanded uncertainty: "length 3.04 ± 0.22 mm (k = 2)";
/// an upper bound reads "length ≤ 0.84 mm (resolution-limited; + U 0.10 mm, k = 2)".
std::string formatMeasured(const MeasuredValue& m);

/// The budget as plain text, one line per component then the combined and expanded values,
/// every number rounded to the expanded uncertainty's decimal place.
std::string formatBudget(const MeasuredValue& m);

/// Value rounded to its expanded uncertainty (for pre-filled findings and exports): the number
/// as text with the decimals GUM 7.2.6 gives, without the uncertainty.
std::string roundedValueText(const MeasuredValue& m);

/// Relative standard uncertainty of the assumed speed of sound for a medium, with its source.
struct SpeedUncertaintyDefault {
    std::string medium;  ///< "steel", "water", "soft tissue", "other"
    double relative = 0; ///< relative standard uncertainty (0.01 = 1 %)
    std::string source;  ///< where the figure comes from
};
/// Default for a medium named by `medium` ("steel", "water", "soft tissue"; anything else is
/// "other", 2 %).
SpeedUncertaintyDefault speedUncertaintyDefault(const std::string& medium);
/// Medium guessed from a nominal longitudinal speed (m/s): 1460–1500 water, 1500–1650 soft
/// tissue, 5000–6500 steel, else other.
std::string mediumForSpeed(double c_m_s);

}  // namespace umbra::core
