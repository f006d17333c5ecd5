// SPDX-License-Identifier: MIT
#include "core/uncertainty.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace umbra::core {

double UncertaintyBudget::combined() const {
    double s = 0;
    for (const auto& c : components) s += c.standard * c.standard;
    return std::sqrt(s);
}

void UncertaintyBudget::add(std::string name, std::string basis, double standard) {
    if (!std::isfinite(standard)) return;
    components.push_back({std::move(name), std::move(basis), std::abs(standard)});
}

namespace {

std::string fixed(double v, int decimals) {
    if (std::abs(v) < 0.5 * std::pow(10.0, -decimals)) v = 0;  // no "-0.00"
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", std::max(0, decimals), v + 0.0);
    return buf;
}

}  // namespace

Rounded roundToUncertainty(double value, double u, int fallback_decimals) {
    Rounded r;
    if (!std::isfinite(value)) {
        r.value = value;
        r.value_text = "n/a";
        r.uncertainty_text = "n/a";
        return r;
    }
    if (!(u > 0) || !std::isfinite(u)) {
        r.decimals = std::max(0, fallback_decimals);
        const double step = std::pow(10.0, -r.decimals);
        r.value = std::round(value / step) * step;
        r.value_text = fixed(r.value, r.decimals);
        r.uncertainty_text = fixed(0, r.decimals);
        return r;
    }
    // Exponent of the second significant digit of u; rounding may carry into a new decade
    // (0.0996 -> 0.10), which is then re-evaluated so that two digits remain.
    int e = static_cast<int>(std::floor(std::log10(u))) - 1;
    double step = std::pow(10.0, e);
    if (std::round(u / step) >= 100) {
        ++e;
        step = std::pow(10.0, e);
    }
    r.decimals = std::max(0, -e);
    r.uncertainty = std::round(u / step) * step;
    r.value = std::round(value / step) * step;
    r.value_text = fixed(r.value, r.decimals);
    r.uncertainty_text = fixed(r.uncertainty, r.decimals);
    return r;
}

std::string formatWithUncertainty(double value, double u, const std::string& unit) {
    const Rounded r = roundToUncertainty(value, u);
    std::string s = r.value_text + " ± " + r.uncertainty_text;
    if (!unit.empty()) s += " " + unit;
    return s;
}

std::string formatMeasured(const MeasuredValue& m) {
    const double U = m.budget.expanded();
    const Rounded r = roundToUncertainty(m.value, U);
    char k[16];
    std::snprintf(k, sizeof k, "%g", m.budget.coverage_factor);
    const std::string unit = m.unit.empty() ? "" : " " + m.unit;
    if (m.upper_bound)
        return m.name + " ≤ " + r.value_text + unit + " (resolution-limited, true size may be smaller; U = " + r.uncertainty_text +
               unit + ", k = " + k + ")";
    return m.name + " " + r.value_text + " ± " + r.uncertainty_text + unit + " (k = " + k + ")";
}

std::string formatBudget(const MeasuredValue& m) {
    const double U = m.budget.expanded();
    const Rounded r = roundToUncertainty(m.value, U);
    // Components are shown one digit finer than the result so that small ones stay visible.
    const int d = r.decimals + 1;
    const std::string unit = m.unit.empty() ? "" : " " + m.unit;
    std::string t = formatMeasured(m) + "\n";
    t += "Uncertainty budget (standard uncertainties, combined root-sum-square, JCGM 100:2008):\n";
    for (const auto& c : m.budget.components)
        t += "  " + c.name + ": " + fixed(c.standard, d) + unit + (c.basis.empty() ? "" : "  [" + c.basis + "]") + "\n";
    t += "  combined standard uncertainty u_c: " + fixed(m.budget.combined(), d) + unit + "\n";
    char k[16];
    std::snprintf(k, sizeof k, "%g", m.budget.coverage_factor);
    t += "  expanded uncertainty U = " + std::string(k) + " u_c: " + r.uncertainty_text + unit;
    return t;
}

std::string roundedValueText(const MeasuredValue& m) { return roundToUncertainty(m.value, m.budget.expanded()).value_text; }

SpeedUncertaintyDefault speedUncertaintyDefault(const std::string& medium) {
    if (medium == "steel")
        return {"steel", 0.01,
                "carbon and low-alloy steels: longitudinal speed about 5850-6000 m/s (Krautkramer & Krautkramer, Ultrasonic "
                "Testing of Materials, velocity table; from memory): half-range 1.3 % of 5920 m/s, rectangular 0.7 %, "
                "rounded up to 1 % for temperature and texture"};
    if (medium == "water")
        return {"water", 0.0035,
                "water near 20 C: speed rises about 3 m/s per C (Bilaniuk & Wong, J. Acoust. Soc. Am. 93 (1993) 1609; from "
                "memory); temperature unknown within +-3 C: 9 m/s / 1482 m/s, rectangular /sqrt(3) = 0.35 %"};
    if (medium == "soft tissue")
        return {"soft tissue", 0.034,
                "soft tissues about 1450 (fat) to 1630 m/s (Duck, Physical Properties of Tissue, 1990; from memory) around "
                "the assumed 1540 m/s: half-range 5.8 %, rectangular /sqrt(3) = 3.4 %"};
    return {"other", 0.02, "no medium-specific figure: a cautious default of 2 % (set the case's value)"};
}

std::string mediumForSpeed(double c) {
    if (c >= 1460 && c < 1500) return "water";
    if (c >= 1500 && c <= 1650) return "soft tissue";
    if (c >= 5000 && c <= 6500) return "steel";
    return "other";
}

}  // namespace umbra::core
