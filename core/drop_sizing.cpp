// SPDX-License-Identifier: MIT
#include "core/drop_sizing.h"

#include <algorithm>
#include <cmath>
#include <string>
#include <tuple>
#include <utility>

#include "core/error.h"

namespace umbra::core {

namespace {
/// Index range [lo, hi] of the centres in `c` (increasing) that lie in [a, b]; lo > hi if none.
std::pair<long, long> indexRange(const std::vector<double>& c, double a, double b) {
    if (a > b) std::swap(a, b);
    const long lo = static_cast<long>(std::lower_bound(c.begin(), c.end(), a) - c.begin());
    const long hi = static_cast<long>(std::upper_bound(c.begin(), c.end(), b) - c.begin()) - 1;
    return {lo, hi};
}

/// Walks from index `from` in direction `dir` (+1 / −1) to the first sample below `level`,
/// staying inside [lo, hi]; returns the interpolated coordinate and whether the edge is open.
std::pair<double, bool> edge(const std::vector<double>& coord, long from, int dir, long lo, long hi, double level,
                             const auto& at) {
    long i = from;
    while (true) {
        const long n = i + dir;
        if (n < lo || n > hi) return {coord[static_cast<size_t>(i)], true};
        const double an = at(n);
        if (an < level) {
            const double ai = at(i);
            const double t = (ai - level) / (ai - an);  // ai >= level > an, so t in [0, 1)
            return {coord[static_cast<size_t>(i)] + t * (coord[static_cast<size_t>(n)] - coord[static_cast<size_t>(i)]), false};
        }
        i = n;
    }
}
}  // namespace

DropSizing dropSize(const std::vector<float>& amplitude, const std::vector<double>& x_mm, const std::vector<double>& z_mm,
                    PointMm a, PointMm b, double ratio) {
    const size_t nx = x_mm.size(), nz = z_mm.size();
    if (amplitude.size() != nx * nz)
        throw SettingError("drop sizing: image has " + std::to_string(amplitude.size()) + " values, grid is " +
                           std::to_string(nx) + " x " + std::to_string(nz));
    if (!(ratio > 0 && ratio < 1)) throw SettingError("drop sizing: ratio " + std::to_string(ratio) + " is not in (0, 1)");
    DropSizing s;
    const auto [x0, x1] = indexRange(x_mm, a.x_mm, b.x_mm);
    const auto [z0, z1] = indexRange(z_mm, a.z_mm, b.z_mm);
    if (x0 > x1 || z0 > z1) return s;
    float best = 0;
    for (long iz = z0; iz <= z1; ++iz)
        for (long ix = x0; ix <= x1; ++ix) {
            const float v = amplitude[static_cast<size_t>(iz) * nx + static_cast<size_t>(ix)];
            if (v > best) best = v, s.peak_ix = static_cast<size_t>(ix), s.peak_iz = static_cast<size_t>(iz);
        }
    if (!(best > 0)) return s;
    s.found = true;
    s.peak_value = best;
    s.peak_x_mm = x_mm[s.peak_ix];
    s.peak_z_mm = z_mm[s.peak_iz];
    const double level = ratio * best;
    const auto row = [&](long ix) { return double(amplitude[s.peak_iz * nx + static_cast<size_t>(ix)]); };
    const auto col = [&](long iz) { return double(amplitude[static_cast<size_t>(iz) * nx + s.peak_ix]); };
    std::tie(s.left_x_mm, s.left_open) = edge(x_mm, static_cast<long>(s.peak_ix), -1, x0, x1, level, row);
    std::tie(s.right_x_mm, s.right_open) = edge(x_mm, static_cast<long>(s.peak_ix), +1, x0, x1, level, row);
    std::tie(s.top_z_mm, s.top_open) = edge(z_mm, static_cast<long>(s.peak_iz), -1, z0, z1, level, col);
    std::tie(s.bottom_z_mm, s.bottom_open) = edge(z_mm, static_cast<long>(s.peak_iz), +1, z0, z1, level, col);
    return s;
}

}  // namespace umbra::core
