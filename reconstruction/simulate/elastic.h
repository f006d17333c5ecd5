// SPDX-License-Identifier: MIT
#pragma once
// Elastic paths of the simulator (scenes with a wedge or a "paths" key): every leg sequence of
// the views the scene lists (L-L, T-T, TT-T, ...) from each element to each reflector point,
// by the least-time ray through the wedge and off the back wall (reconstruction/ray_path.h).
// Amplitude of one element-to-point path =
//   directivity (strip in the wedge, directivity.h; on contact Miller & Pursey 1954 for the
//   leg's wave type, times the strip's width factor)
//   x interface coefficients (wedge-to-part transmission on the way in, part-to-wedge on the
//     way back; back-wall reflection with mode conversion for skips;
//     reconstruction/interface_coefficients.h, Achenbach 1973)
//   x ray-tube spreading through the flat interfaces, 2-D (default) or 3-D (coverage.h),
//     scaled to 1 at kReferenceRange_m = 10 mm as the contact model
//   x attenuation exp(-alpha f0 path) over the legs in the part.
// Scattering at a point does not depend on the wave types (the same amplitude converts).
#include <vector>

#include "reconstruction/ray_path.h"
#include "reconstruction/simulate/scene.h"

namespace umbra::recon::sim {

struct ElasticLeg {
    bool valid = false;
    double delay_s = 0;
    double amplitude = 0;
    double ux = 0, uz = 0;  ///< unit vector (specimen frame) from the point back along the arriving ray
    double last_speed_m_s = 0;
};

class ElasticModel {
public:
    explicit ElasticModel(const Scene& s);
    const ViewGeometry& geometry() const { return g_; }
    /// Path of `legs` from element e (array frame position) to specimen point (x_s, z_s);
    /// `receive` selects the part-to-wedge transmission coefficient.
    ElasticLeg leg(const core::Vec3& e, const std::vector<Wave>& legs, double x_s, double z_s, bool receive) const;

private:
    const Scene& s_;
    ViewGeometry g_;
    double alpha_np_per_m_ = 0;  ///< amplitude attenuation at f0, Np/m
};

/// The capture's wedge from the scene's (surface_origin_m = (0, 0, height), tilt = angle).
core::WedgeInfo wedgeInfo(const WedgeSpec& w);

}  // namespace umbra::recon::sim
