// SPDX-License-Identifier: MIT
#pragma once
// Path model of the simulator: travel time and amplitude of each leg (transmit event -> point,
// point -> receive element) and of the specular back wall (image-source method).
//
// Amplitude of one leg = directivity x spreading x attenuation, with
//  - directivity: soft-baffled strip, directivity.h (element legs; plane waves use D(angle)),
//  - spreading: 2-D cylindrical, sqrt(r_ref / r) per leg with r_ref = 10 mm (r clamped at lambda/2);
//    plane waves do not spread; a diverging virtual source spreads as sqrt(|v| / |r - v|);
//  - attenuation: attenuation.h, exp(-alpha f0 path).
// Time conventions (capture format v1): time zero is when the wavefront passes the event's
// reference point: the source element centre (single_element), the origin (plane_wave, delay
// (z cos a + x sin a)/c, Montaldo et al., IEEE TUFFC 56(3) 2009; virtual_source, delay
// (|r - v| - |v|)/c diverging, (|v| -+ |r - v|)/c converging before/after the focus).
#include <vector>

#include "reconstruction/simulate/scene.h"

namespace umbra::recon::sim {

/// One leg or one whole echo: time (s) and amplitude factor.
struct Leg {
    double delay_s = 0;
    double amplitude = 0;
};

class PathModel {
public:
    explicit PathModel(const Scene& scene);

    static constexpr double kReferenceRange_m = 10e-3;

    /// Transmit leg of event t to the point (x, z), z > 0.
    Leg transmit(size_t t, double x, double z) const;
    /// Transmit path length as c * delay (m) for event t at (x, z); used to find specular points.
    double transmitPath(size_t t, double x, double z) const;
    /// Direction (unit vector, x and z) pointing from (x, z) back towards where event t's wave comes from.
    void incomingDirection(size_t t, double x, double z, double& ux, double& uz) const;
    /// Receive leg from (x, z) to element e.
    Leg receive(int e, double x, double z) const;
    /// Specular back-wall echo (reflection coefficient not included) for event t received by
    /// element e; repeat 0 = first echo, 1 = double round trip. Amplitude 0 when not insonified.
    Leg backWall(size_t t, int e, double depth_m, int repeat) const;

    /// Near-surface point of a cylinder (centre cx, cz, radius a) that gives the stationary
    /// (first-arrival) path for event t and element e; writes it to (px, pz).
    void specularPointOnCircle(size_t t, int e, double cx, double cz, double a, double& px, double& pz) const;

    double speed() const { return c_; }
    double wavelength() const { return lambda_; }
    int sourceElement(size_t t) const;
    const std::vector<double>& elementX() const { return ex_; }

private:
    double spreading(double r) const;
    double atten(double path) const;
    /// Smooth window, ~1 inside the aperture's projection [x_lo, x_hi], edges one wavelength wide.
    double apertureWeight(double xs) const;

    const Scene& s_;
    std::vector<double> ex_;
    double c_, lambda_, width_, alpha_np_, x_lo_, x_hi_;
};

}  // namespace umbra::recon::sim
