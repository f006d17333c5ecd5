// SPDX-License-Identifier: MIT
#pragma once
// Delay-model stage: travel times from the array to image points. The delay-and-sum stage
// asks this interface only: the homogeneous model (contact L-L), or the view model of
// reconstruction/view_delay_model.h (any delay_model.mode, through a wedge when the capture has
// one; images of wedge captures are in the specimen frame).
//
// Conventions: times in seconds; pixel coordinates (float metres) in the array frame (x along
// the array, z depth), or in the specimen frame for wedge captures (specimenFrame()). Time zero of each transmit event is when its
// wavefront passes the event's reference point (capture format v1): the firing element for
// single_element, the origin for plane_wave and virtual_source.
#include <cstddef>
#include <memory>
#include <string>

#include "core/capture.h"
#include "core/parameters.h"

namespace umbra::recon {

struct Grid;

struct DelayModelParams {
    double speed_of_sound_m_s = 0;  ///< m/s; default 0 = the capture's /medium speed of sound
    std::string model = "homogeneous";  ///< only "homogeneous" for now
    std::string mode = "L-L";        ///< view (reconstruction/view_mode.h); default L-L
    double shear_speed_m_s = 0;      ///< m/s; default 0 = the capture's /medium shear speed
    double fixed_delay_us = 0;       ///< µs present in every trace beyond the model, removed before delay-and-sum
};

/// Time (s) given to a pixel that no path of the view reaches (in the wedge, below the back
/// wall for a skip): far beyond any recording, so delay-and-sum reads the zero guard samples.
inline constexpr float kNoPathTime = 1.0f;

/// Which path of a view an element's time belongs to.
enum class DelayLeg { Transmit, Receive };

/// Declaration of the "delay_model" stage (model, mode, speed_of_sound_m_s, shear_speed_m_s,
/// fixed_delay_us).
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
    /// One-way time (s) between array element `element` (at `pos`) and each pixel along the
    /// view's transmit or receive path. Default: pointTime(pos, ...) for both.
    virtual void elementTime(const core::Vec3& pos, size_t element, DelayLeg leg, const float* x, const float* z, size_t n,
                             float* t_s) const {
        (void)element;
        (void)leg;
        pointTime(pos, x, z, n, t_s);
    }
    /// True when the transmit and receive paths of an element are the same (elementTime does not
    /// depend on `leg`).
    virtual bool symmetricLegs() const { return true; }
    /// True when pixels are in the specimen frame (wedge captures), false for the array frame.
    virtual bool specimenFrame() const { return false; }
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

/// The model the recipe asks for, for this capture: homogeneous for L-L on a contact capture
/// (whatever the grid), else a ViewDelayModel with travel-time tables over `grid` (required
/// then; SettingError without it). Throws SettingError for bad values, a mode the capture
/// cannot support (naming the missing attribute), bad wedge geometry, or a skip view whose grid
/// lies wholly outside the part (no path). threads <= 0: all hardware threads for the tables.
std::unique_ptr<DelayModel> makeDelayModel(const core::CaptureHeader& h, const core::Recipe& r, const Grid* grid = nullptr,
                                           int threads = 0);
/// True when makeDelayModel gives the homogeneous model (contact capture, mode L-L).
bool usesHomogeneousModel(const core::CaptureHeader& h, const core::Recipe& r);

}  // namespace umbra::recon
