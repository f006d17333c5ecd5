// SPDX-License-Identifier: MIT
#pragma once
// Delay-model stage: travel times from the array to image points. The delay-and-sum stage
// asks this interface only, so a layered (wedge) model can replace the homogeneous one.
//
// Conventions: times in seconds; the array frame of the capture (x along the array, z depth);
// pixel coordinates are given as float metres. Time zero of each transmit event is when its
// wavefront passes the event's reference point (capture format v1): the firing element for
// single_element, the origin for plane_wave and virtual_source.
#include <cstddef>
#include <memory>

#include "core/capture.h"
#include "core/parameters.h"

namespace umbra::recon {

struct DelayModelParams {
    double speed_of_sound_m_s = 0;  ///< m/s; default 0 = the capture's /medium speed of sound
    std::string model = "homogeneous";  ///< only "homogeneous" for now
};

/// Declaration of the "delay_model" stage (model, speed_of_sound_m_s).
core::StageSpec delayModelSpec();
/// The stage's values from a recipe.
DelayModelParams delayModelParams(const core::Recipe& r);

/// Travel-time model. Implementations are immutable and thread-safe.
class DelayModel {
public:
    virtual ~DelayModel() = default;
    /// One-way time (s) from point `from` (array frame, m; an element or a virtual source) to
    /// each of n pixels (x[i], z[i] in m), into t_s[i].
    virtual void pointTime(const core::Vec3& from, const float* x, const float* z, size_t n, float* t_s) const = 0;
    /// Transmit time (s) of a plane wave steered `angle_rad` from +z towards +x whose wavefront
    /// passes the origin at t = 0, at each pixel.
    virtual void planeWaveTime(double angle_rad, const float* x, const float* z, size_t n, float* t_s) const = 0;
    /// Transmit time (s) of a wave diverging from (z < 0) or converging to (z > 0) `source`,
    /// with the wavefront at the origin at t = 0, at each pixel.
    virtual void virtualSourceTime(const core::Vec3& source, const float* x, const float* z, size_t n, float* t_s) const = 0;
    /// True when the time between two elements does not depend on which one transmits (lets
    /// full-matrix delay-and-sum use transmit-receive reciprocity).
    virtual bool reciprocal() const = 0;
    /// Nominal speed (m/s) used for wavelengths and resolution estimates.
    virtual double nominalSpeed() const = 0;
};

/// Homogeneous medium at speed c: t = |r - p| / c; plane wave (z cos a + x sin a) / c
/// (Montaldo et al., IEEE TUFFC 56(3), 2009); virtual source (|r - v| - |v|) / c diverging,
/// (|v| + sign(z - z_v) |r - v|) / c converging.
class HomogeneousDelayModel : public DelayModel {
public:
    explicit HomogeneousDelayModel(double c_m_s);
    void pointTime(const core::Vec3& from, const float* x, const float* z, size_t n, float* t_s) const override;
    void planeWaveTime(double angle_rad, const float* x, const float* z, size_t n, float* t_s) const override;
    void virtualSourceTime(const core::Vec3& source, const float* x, const float* z, size_t n, float* t_s) const override;
    bool reciprocal() const override { return true; }
    double nominalSpeed() const override { return c_; }

private:
    double c_;
};

/// Resolved speed of sound (m/s): the recipe's, or the capture's when the recipe says 0.
/// Throws SettingError for a speed outside [100, 20000] m/s.
double resolvedSpeed(const core::CaptureHeader& h, const core::Recipe& r);

/// The model the recipe asks for, for this capture. Throws SettingError for bad values and for
/// a capture with a wedge (the layered model is not available yet).
std::unique_ptr<DelayModel> makeDelayModel(const core::CaptureHeader& h, const core::Recipe& r);

}  // namespace umbra::recon
