// SPDX-License-Identifier: MIT
#include "core/stored_caliper.h"

#include <cmath>
#include <cstdio>

namespace umbra::core {

std::vector<MeasuredValue> storedCaliper(const PixelScale& scale, double col_a, double row_a, double col_b, double row_b,
                                         double speed_rel) {
    const bool mm = scale.calibrated;
    const double px = mm ? scale.dx_mm : 1.0, pz = mm ? scale.dz_mm : 1.0;
    const std::string unit = mm ? "mm" : "px";
    const double dx = (col_b - col_a) * px, dz = (row_b - row_a) * pz;
    const double d = std::hypot(dx, dz);
    // One end's coordinate: uniform over a pixel, standard uncertainty pitch/√12 (GUM 4.3.7).
    const double ux = px / std::sqrt(12.0), uz = pz / std::sqrt(12.0);
    char basis[160];
    std::snprintf(basis, sizeof basis, "each end uniform over one pixel (%.4g x %.4g %s), /sqrt(12), two ends", px, pz, unit.c_str());
    auto make = [&](const char* name, double value, double read_u, double speed_u) {
        MeasuredValue m;
        m.name = name;
        m.value = value;
        m.unit = unit;
        m.budget.add("reading (end placement)", basis, read_u);
        if (mm) m.budget.add("speed of sound (scanner's assumed speed)", "relative " + std::to_string(speed_rel) + " of the depth extent", speed_u);
        return m;
    };
    // distance: ∂d/∂(end coordinate) = ±Δ/d for each of the two ends (at d = 0 the reading term
    // is taken as the pixel diagonal's).
    const double cx = d > 0 ? dx / d : std::sqrt(0.5), cz = d > 0 ? dz / d : std::sqrt(0.5);
    const double u_read_d = std::sqrt(2.0 * (cx * cx * ux * ux + cz * cz * uz * uz));
    const double u_speed_d = d > 0 ? std::abs(dz * dz / d) * speed_rel : 0.0;
    return {make("distance", d, u_read_d, u_speed_d), make("Δx", std::abs(dx), std::sqrt(2.0) * ux, 0.0),
            make("Δdepth", std::abs(dz), std::sqrt(2.0) * uz, std::abs(dz) * speed_rel)};
}

}  // namespace umbra::core
