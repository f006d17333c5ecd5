// SPDX-License-Identifier: MIT
#pragma once
// Expansion of a scene into what the simulator sums for one frame: point sources (point
// reflectors, planar flaws as dense lines with tips, speckle) and side-drilled holes, with
// the frame's elevation weighting (encoded scans) or rigid displacement (cine) applied.
#include <cstdint>
#include <string>
#include <vector>

#include "core/capture.h"
#include "reconstruction/simulate/scene.h"

namespace umbra::recon::sim {

struct PointSource {
    double x_m, z_m;
    double amplitude;
};

struct HoleInstance {
    double x_m, z_m, radius_m;
    double amplitude;
};

struct FrameContent {
    std::vector<PointSource> points;
    std::vector<HoleInstance> holes;
};

/// Elevation weight (0..1) of a point at y for an array at scan position y_scan: Gaussian beam
/// profile with the given -6 dB full width.
double elevationWeightPoint(double y, double y_scan, double beam_width_m);
/// Elevation weight of a reflector extending over [y0, y1]: the fraction of the beam profile's
/// integral that falls on it (0.5 at an end, 1 well inside).
double elevationWeightRange(const YRange& r, double y_scan, double beam_width_m);

/// Speckle scatterers (2-D, fixed for a given seed): positions and Gaussian amplitudes, with
/// regions applied (anechoic regions hold none; others are scaled by 10^(dB/20)).
std::vector<PointSource> makeSpeckle(const SpeckleSpec& s, uint64_t seed);

/// Points making up a planar flaw: interior points spaced <= lambda/4 with amplitude
/// a * spacing / lambda each, and the two tips with tip_amplitude.
/// opposite_tips: the deeper tip's echo is inverted (diffraction from the two ends of a crack
/// has opposite phase; used with elastic paths).
std::vector<PointSource> expandFlaw(const PlanarFlaw& f, double wavelength_m, bool opposite_tips = false);

/// Wavelength that sets the spacing of flaw points: the shear wavelength when elastic paths
/// with a shear speed are simulated, else the longitudinal one.
double flawWavelength(const Scene& s);

/// Everything of frame f. `speckle` is the output of makeSpeckle (shared by all frames).
FrameContent frameContent(const Scene& s, size_t f, const std::vector<PointSource>& speckle);

/// /truth of the capture: points, planar-flaw points (tips included) and hole centres, in the
/// array frame at scan position 0 / cine frame 0. Speckle scatterers and the back wall are not
/// listed; the speckle regions (cysts, ellipses, tubes) go into regions_json (see regionsJson).
core::TruthInfo makeTruth(const Scene& s);

/// The scene's speckle regions as a JSON list (empty string when there are none), one object
/// each: "label" (if any), "kind" (circle | ellipse | tube), "centre_m" [x, z] m, circle
/// "diameter_m" m, ellipse "axes_m" [width, height] full lengths m and "angle_deg" (from +x
/// towards +z), tube "start_m"/"end_m" [x, z] m of its axis, "diameter_m" and "angle_deg" of
/// the axis; "anechoic" (bool) and "echogenicity_db" (contrast to the background in dB, null
/// when anechoic).
std::string regionsJson(const Scene& s);

}  // namespace umbra::recon::sim
