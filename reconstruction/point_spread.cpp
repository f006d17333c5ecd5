// SPDX-License-Identifier: MIT
#include "reconstruction/point_spread.h"

#include <algorithm>
#include <cmath>
#include <complex>
#include <vector>

#include "reconstruction/das_stage.h"
#include "reconstruction/grid_stage.h"

namespace umbra::recon {

namespace {
/// One-way far-field pattern of the window at spatial frequency s (cycles per aperture),
/// normalised to 1 at s = 0: ∫ w(u) cos(2π s u) du / ∫ w(u) du over u in [−1/2, 1/2]
/// (the window is even, so the sine part vanishes). Midpoint rule, 4000 points.
double pattern(const std::string& kind, double alpha, double s) {
    constexpr int n = 4000;
    double num = 0, den = 0;
    for (int i = 0; i < n; ++i) {
        const double u = -0.5 + (i + 0.5) / n;
        const double w = apodizationWeight(kind, 2 * u, alpha);
        num += w * std::cos(2 * M_PI * s * u);
        den += w;
    }
    return den > 0 ? num / den : 0;
}
}  // namespace

double lateralWidthFactor(const std::string& apodization, double tukey_alpha) {
    const double target = 1 / std::sqrt(2.0);
    // The main lobe falls monotonically from 1 at s = 0; bisection on [0, 2] (first zero of the
    // widest window considered lies below 2 cycles per aperture).
    double lo = 0, hi = 2;
    for (int it = 0; it < 60; ++it) {
        const double mid = 0.5 * (lo + hi);
        if (pattern(apodization, tukey_alpha, mid) > target) lo = mid;
        else hi = mid;
    }
    return 2 * 0.5 * (lo + hi);  // full width in units of λ·F# (x = s·λ·z / D)
}

PointSpreadModel::Widths PointSpreadModel::at(double x, double z) const {
    Widths w;
    const double lambda = c_m_s / f0_hz;
    const double span = std::max(array_x_max_m - array_x_min_m, pitch_m);
    double aperture = span;
    if (!full_aperture) {
        const double half = z / (2 * f_number);
        const double a = std::max(x - half, array_x_min_m), b = std::min(x + half, array_x_max_m);
        aperture = b - a;
    }
    aperture = std::max(aperture, std::max(pitch_m, 1e-9));
    w.f_number = std::max(z, 0.0) / aperture;
    w.lateral_m = std::max(width_factor * lambda * w.f_number, 0.5 * lambda);  // never below λ/2
    w.axial_m = pointSpreadWidths(c_m_s, f0_hz, fractional_bandwidth, 1.0).axial_m;
    return w;
}

PointSpreadModel pointSpreadModel(const core::Recipe& recipe, double c, double f0, double B, double xmin, double xmax, double pitch) {
    const DasParams d = dasParams(recipe);
    PointSpreadModel m;
    m.c_m_s = c;
    m.f0_hz = f0;
    m.fractional_bandwidth = B;
    m.array_x_min_m = xmin;
    m.array_x_max_m = xmax;
    m.pitch_m = pitch;
    m.full_aperture = d.aperture == "full";
    m.f_number = d.f_number;
    m.width_factor = lateralWidthFactor(d.apodization, d.tukey_alpha);
    return m;
}

}  // namespace umbra::recon
