// SPDX-License-Identifier: MIT
// Caliper on stored frames: values by Pythagoras, budgets after GUM 4.3.7 (uniform over a
// pixel: pitch/sqrt(12)) and first-order propagation (GUM 5.1.2), units mm or px.
#include <gtest/gtest.h>

#include <cmath>

#include "core/stored_caliper.h"

using namespace umbra::core;

TEST(StoredCaliper, CalibratedDistanceAndBudget) {
    const PixelScale s{true, 0.2, 0.15};
    const auto q = storedCaliper(s, 10, 20, 40, 60, 0.034);
    ASSERT_EQ(q.size(), 3u);
    const double dx = 30 * 0.2, dz = 40 * 0.15, d = std::hypot(dx, dz);  // 6 mm, 6 mm
    EXPECT_EQ(q[0].unit, "mm");
    EXPECT_NEAR(q[0].value, d, 1e-12);
    EXPECT_NEAR(q[1].value, dx, 1e-12);
    EXPECT_NEAR(q[2].value, dz, 1e-12);
    const double ux = 0.2 / std::sqrt(12.0), uz = 0.15 / std::sqrt(12.0);
    const double read = std::sqrt(2 * ((dx / d) * (dx / d) * ux * ux + (dz / d) * (dz / d) * uz * uz));
    const double speed = dz * dz / d * 0.034;
    EXPECT_NEAR(q[0].budget.combined(), std::hypot(read, speed), 1e-12);
    EXPECT_NEAR(q[1].budget.combined(), std::sqrt(2.0) * ux, 1e-12);  // no speed term across
    EXPECT_NEAR(q[2].budget.combined(), std::hypot(std::sqrt(2.0) * uz, dz * 0.034), 1e-12);
}

TEST(StoredCaliper, UncalibratedIsInPixelsWithoutSpeed) {
    const auto q = storedCaliper(PixelScale{}, 0, 0, 3, 4, 0.034);
    EXPECT_EQ(q[0].unit, "px");
    EXPECT_NEAR(q[0].value, 5.0, 1e-12);  // 3-4-5 triangle
    ASSERT_EQ(q[0].budget.components.size(), 1u);
    EXPECT_NEAR(q[0].budget.combined(), std::sqrt(2.0 / 12.0), 1e-12);  // both directions 1 px: sqrt(2/12)
    EXPECT_NE(formatMeasured(q[0]).find("px"), std::string::npos);
    EXPECT_EQ(formatMeasured(q[0]).find("mm"), std::string::npos);
}
