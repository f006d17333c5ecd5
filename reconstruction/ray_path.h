// SPDX-License-Identifier: MIT
#pragma once
// Ray paths from an array element to a point of the specimen through an optional wedge and
// off the flat back wall, by Fermat's principle (least travel time).
//
// Frames (docs/capture-format.md): a specimen point (x_s, z_s) -- x_s along the part surface,
// z_s depth below it -- sits in the array frame at o + x_s u + z_s n with o = the wedge's
// surface_origin_m, u = (cos t, sin t), n = (-sin t, cos t) in (x, z), t = surface_tilt_rad.
// Without a wedge the specimen frame is the array frame (the array face is the surface).
//
// Every interface is flat and parallel to the surface (the surface, the back wall), so the
// horizontal slowness p = sin(theta_i) / c_i is the same on every leg (Snell's law) and the
// least-time path is the one whose legs' horizontal runs add up to the element-to-point
// offset R: sum_i h_i tan(theta_i) = R. It is solved for p by Newton's method inside a
// bracket [0, 1/c_max) (X(p) is increasing and convex, so the bracket always holds the root);
// the time is then T = p R + sum_i h_i sqrt(1/c_i^2 - p^2), which is stationary in p, so the
// time's error is second order in p's. Equivalent to minimising the time over the entry point
// on the surface (and the bounce point on the back wall), which the tests do by brute force.
#include <array>
#include <limits>
#include <optional>
#include <vector>

#include "core/capture.h"
#include "reconstruction/view_mode.h"

namespace umbra::recon {

/// One solved path. Legs in travel order from the element: the wedge leg (if any), then the
/// specimen legs. Angles from the surface normal.
struct RayPath {
    bool valid = false;  ///< false: no path (pixel in the wedge, below the back wall for a skip, ...)
    double time_s = std::numeric_limits<double>::infinity();
    double p_s_per_m = 0;   ///< horizontal slowness
    size_t legs = 0;
    std::array<double, 3> length_m{};  ///< length of each leg
    std::array<double, 3> angle_rad{}; ///< angle of each leg to the surface normal
    std::array<double, 3> speed_m_s{};
    double entry_x_s = 0;   ///< x_s where the path enters the specimen (x component)
    double bounce_x_s = 0;  ///< x_s of the back-wall point (skip paths)
    double element_angle_rad = 0;  ///< angle of the first leg to the array normal, towards +x of the array positive
};

/// Speeds and geometry of one capture's views.
struct ViewGeometry {
    std::optional<core::WedgeInfo> wedge;  ///< absent: contact (specimen frame = array frame)
    double thickness_m = 0;  ///< back wall depth; 0 = unknown
    double c_l_m_s = 0, c_t_m_s = 0;  ///< specimen speeds (c_t 0 = unknown)

    /// From the capture's /medium, with the recipe's speed overrides when > 0. Throws
    /// core::SettingError for a wedge that puts an element at or below the surface, a tilt at or
    /// beyond 90 degrees, or speeds outside [100, 20000] m/s.
    static ViewGeometry fromHeader(const core::CaptureHeader& h, double c_l_override = 0, double c_t_override = 0);

    double speed(Wave w) const { return w == Wave::L ? c_l_m_s : c_t_m_s; }
    /// Array-frame (x, z) of a specimen point.
    std::array<double, 2> toArray(double x_s, double z_s) const;
    /// Specimen-frame (x_s, z_s) of an array-frame point (x, z).
    std::array<double, 2> toSpecimen(double x, double z) const;

    /// Least-time path from element position e (array frame) to specimen point (x_s, z_s)
    /// along `legs` (1 = direct, 2 = via the back wall). p_guess (< 0: none) starts Newton.
    RayPath path(const core::Vec3& e, const std::vector<Wave>& legs, double x_s, double z_s, double p_guess = -1) const;
};

}  // namespace umbra::recon
