// SPDX-License-Identifier: MIT
#pragma once
// Caliper on a stored frame (e.g. a DICOM ultrasound image): distance between two points given
// in pixel coordinates, in mm when the frame is calibrated and in px when it is not. No Qt.
#include <vector>

#include "core/uncertainty.h"

namespace umbra::core {

/// Size of one pixel of a stored frame. Uncalibrated: every length is in pixels ("px").
struct PixelScale {
    bool calibrated = false;
    double dx_mm = 1, dz_mm = 1;  ///< pixel pitch across and down, mm (ignored when uncalibrated)
};

/// Distance, Δx and Δdepth between points a and b (column, row in pixels, pixel centres at
/// whole numbers), each with its budget:
///  * reading: each end's column and row uniform over one pixel, pitch/√12 (GUM 4.3.7),
///    propagated to first order (GUM 5.1.2);
///  * speed of sound (calibrated only): the depth scale of a stored frame assumes the scanner's
///    speed; relative standard uncertainty `speed_rel` scales Δdepth.
/// Unit "mm" (calibrated) or "px" (uncalibrated, no speed component). Names: "distance", "Δx", "Δdepth".
std::vector<MeasuredValue> storedCaliper(const PixelScale& scale, double col_a, double row_a, double col_b, double row_b,
                                         double speed_rel);

}  // namespace umbra::core
