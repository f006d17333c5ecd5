// SPDX-License-Identifier: MIT
// Uncertainty budgets and rounding against JCGM 100:2008 (GUM): combination root-sum-square of
// uncorrelated components (GUM 5.1.2, eq. 10), expanded U = k·u_c with k = 2 (GUM 6.2.1), and
// rounding (GUM 7.2.6: uncertainty to at most two significant digits, the value to the same
// place; the worked example of GUM 7.2.2: m_S = 100.021 47 g, u_c = 0.35 mg).
#include <gtest/gtest.h>

#include <cmath>

#include "core/uncertainty.h"

using namespace umbra::core;

// GUM 5.1.2, eq. (10), with sensitivity coefficients 1: u_c = sqrt(3² + 4²) = 5; U = 2 u_c.
TEST(uncertainty_test, gum_root_sum_square_and_k2) {
    UncertaintyBudget b;
    b.add("a", "", 3.0);
    b.add("b", "", -4.0);  // counted by magnitude
    b.add("nan", "", std::nan(""));  // ignored
    EXPECT_EQ(b.components.size(), 2u);
    EXPECT_DOUBLE_EQ(b.combined(), 5.0);
    EXPECT_DOUBLE_EQ(b.expanded(), 10.0);
}

// GUM 7.2.2 example: 100.021 47 g with u_c = 0.35 mg = 0.000 35 g: both kept to the 5th decimal.
TEST(uncertainty_test, gum_7_2_2_example_rounding) {
    const Rounded r = roundToUncertainty(100.02147, 0.00035);
    EXPECT_EQ(r.value_text, "100.02147");
    EXPECT_EQ(r.uncertainty_text, "0.00035");
    EXPECT_EQ(r.decimals, 5);
}

// GUM 7.2.6: two significant digits of the uncertainty, the value to the same decimal place.
TEST(uncertainty_test, gum_7_2_6_two_significant_digits) {
    EXPECT_EQ(formatWithUncertainty(6.05691972807, 0.1934, "mm"), "6.06 ± 0.19 mm");
    EXPECT_EQ(formatWithUncertainty(-17.6017189026, 0.734, "dB"), "-17.60 ± 0.73 dB");
    EXPECT_EQ(formatWithUncertainty(1234.5, 34, "mm²"), "1235 ± 34 mm²");
    EXPECT_EQ(formatWithUncertainty(12345.6, 345, "mm²"), "12350 ± 350 mm²");
    // Rounding carries into the next decade: 0.0996 -> 0.10 (still two digits).
    EXPECT_EQ(formatWithUncertainty(1.23456, 0.0996, "mm"), "1.23 ± 0.10 mm");
    EXPECT_EQ(formatWithUncertainty(-0.0001, 0.012, "mm"), "0.000 ± 0.012 mm");  // no "-0.000"
    // No uncertainty: fallback decimals, uncertainty 0.
    EXPECT_EQ(formatWithUncertainty(2.0, 0, "mm"), "2.00 ± 0.00 mm");
}

TEST(uncertainty_test, measured_value_readout_and_upper_bound) {
    MeasuredValue m{"length", 3.04567, "mm", {}};
    m.budget.add("resolution", "", 0.1);
    m.budget.add("grid", "", 0.05);
    // u_c = 0.1118, U = 0.2236 -> 0.22; value 3.05
    EXPECT_EQ(formatMeasured(m), "length 3.05 ± 0.22 mm (k = 2)");
    EXPECT_EQ(roundedValueText(m), "3.05");
    m.upper_bound = true;
    EXPECT_NE(formatMeasured(m).find("≤ 3.05 mm"), std::string::npos);
    const std::string t = formatBudget(m);
    EXPECT_NE(t.find("resolution: 0.100 mm"), std::string::npos) << t;
    EXPECT_NE(t.find("combined standard uncertainty u_c: 0.112 mm"), std::string::npos) << t;
}

// Defaults per medium (sources named in core/uncertainty.cpp; from memory).
TEST(uncertainty_test, speed_defaults_per_medium) {
    EXPECT_EQ(mediumForSpeed(5920), "steel");
    EXPECT_EQ(mediumForSpeed(1482), "water");
    EXPECT_EQ(mediumForSpeed(1540), "soft tissue");
    EXPECT_EQ(mediumForSpeed(2700), "other");
    EXPECT_DOUBLE_EQ(speedUncertaintyDefault("steel").relative, 0.01);
    EXPECT_GT(speedUncertaintyDefault("soft tissue").relative, speedUncertaintyDefault("water").relative);
    EXPECT_FALSE(speedUncertaintyDefault("water").source.empty());
}
