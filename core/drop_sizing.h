// SPDX-License-Identifier: MIT
#pragma once
// −6 dB drop sizing (ultrasonic testing practice; common practice): inside a box the user drew around an
// indication, find the peak of the linear amplitude (envelope), then walk along the row and the
// column through the peak until the amplitude falls below `ratio` × peak (0.5 = −6.02 dB). Each
// edge lies between the last pixel at or above the level and the first one below it, placed by
// linear interpolation of the amplitude between the two pixel centres (sub-pixel). The lateral
// extent (x) and through-wall height (depth) are the distances between opposite edges. An edge
// that is not reached inside the box is "open" and put at the box's last pixel: the indication
// is bigger than the box. No Qt.
#include <cstddef>
#include <vector>

#include "core/measurement.h"

namespace umbra::core {

/// Amplitude ratio of the −6 dB drop: 0.5 (20·log10(0.5) = −6.02 dB).
inline constexpr double kSixDbDropRatio = 0.5;

struct DropSizing {
    bool found = false;          ///< false: the box holds no pixel or only zero amplitude
    size_t peak_ix = 0;          ///< peak pixel column
    size_t peak_iz = 0;          ///< peak pixel row
    double peak_value = 0;       ///< linear amplitude at the peak (the image's unit)
    double peak_x_mm = 0;        ///< pixel centre of the peak, mm
    double peak_z_mm = 0;
    double left_x_mm = 0;        ///< edges along the row through the peak, mm
    double right_x_mm = 0;
    double top_z_mm = 0;         ///< edges along the column through the peak, mm
    double bottom_z_mm = 0;
    bool left_open = false, right_open = false, top_open = false, bottom_open = false;
    double lengthMm() const { return right_x_mm - left_x_mm; }   ///< lateral extent, mm
    double heightMm() const { return bottom_z_mm - top_z_mm; }   ///< through-wall height, mm
    bool anyOpen() const { return left_open || right_open || top_open || bottom_open; }
};

/// Drop sizing of `amplitude` (row-major [z][x], linear, x_mm.size() × z_mm.size() values; pixel
/// centres x_mm and z_mm in mm, strictly increasing) inside the box with opposite corners a and b
/// (mm, any order; pixels whose centre lies inside count). `ratio` in (0, 1): 0.5 for −6 dB,
/// 0.1 for −20 dB. Throws SettingError for mismatched sizes or a ratio outside (0, 1).
DropSizing dropSize(const std::vector<float>& amplitude, const std::vector<double>& x_mm,
                    const std::vector<double>& z_mm, PointMm a, PointMm b, double ratio = kSixDbDropRatio);

/// Values with uncertainty budgets, the −20 dB and tip tools and the resolution-limited flag:
/// core/sizing.h, which builds on dropSize.

}  // namespace umbra::core
