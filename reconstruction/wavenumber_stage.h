// SPDX-License-Identifier: MIT
#pragma once
// Wavenumber (f-k) imaging stage: an alternative to delay-and-sum for a linear array with evenly
// spaced elements in a homogeneous medium, chosen by das.method = wavenumber.
//  - full matrix (single_element transmits): f-k migration of the full matrix (Hunter,
//    Drinkwater & Wilcox, IEEE TUFFC 55(11), 2008): 3-D FFT over time, transmit and receive
//    position, Stolt mapping Kx = kt + kr, Kz = sqrt(k^2 - kt^2) + sqrt(k^2 - kr^2);
//  - plane waves: Stolt migration of each steered plane wave (after Garcia et al., IEEE TUFFC
//    60(9), 2013: steering compensation across the array, then a 1-D Stolt interpolation along
//    frequency per lateral wavenumber), here with the exact dispersion relation of a plane wave
//    transmitted at angle a and received by the array, k = (Kx^2 + Kz^2) / (2 (Kz cos a + Kx sin a)),
//    instead of the exploding-reflector velocity fit; the angles are compounded in the
//    wavenumber domain.
// The receive (and, for the full matrix, transmit) aperture of delay-and-sum is reproduced as a
// window over propagation angle (das.f_number, das.apodization), and each pixel is divided by
// the sum of the aperture weights that reach it, so a point echo of amplitude A on every trace
// reads about A, as with delay-and-sum. See docs/reconstruction.md "Wavenumber imaging".
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "core/capture.h"
#include "core/capture_file.h"
#include "core/frame.h"
#include "core/parameters.h"
#include "reconstruction/pipeline.h"

namespace umbra::recon {

struct WavenumberParams {
    double lateral_padding = 0;     ///< padded lateral FFT extent / array length, 1.25 to 4; default 0 = automatic (array, region beside it, aperture spread at the deepest row)
    double temporal_padding = 2.0;  ///< padded FFT length / samples used, [1.5, 4]; default 2
    double max_angle_deg = 60.0;    ///< largest propagation angle from the z axis when das.aperture = full, degrees, [10, 80]; default 60
};

/// Declaration of the "wavenumber" stage (padding and angle limit; the method is das.method).
core::StageSpec wavenumberSpec();
/// The stage's values from a recipe, checked.
WavenumberParams wavenumberParams(const core::Recipe& r);

/// Throws core::SettingError, naming the reason, when wavenumber imaging cannot image captures
/// with this header: not a linear array along x with evenly spaced elements, a wedge, start
/// times that differ between transmits, virtual-source transmits, a transmit or receive element
/// used twice.
void checkWavenumberCapture(const core::CaptureHeader& h);

/// Smallest n' >= n whose only prime factors are 2, 3 and 5 (fast FFT sizes).
size_t fastFftSize(size_t n);

/// Wavenumber imager for one capture, recipe and grid. Holds FFT plans and buffers, so repeated
/// runs allocate little. One run() at a time.
class WavenumberImager {
public:
    /// Throws core::SettingError for an unsupported capture (checkWavenumberCapture) or when the
    /// transforms would need more than 1 GiB.
    WavenumberImager(const core::CaptureReader& capture, const core::Recipe& recipe, const Grid& grid, int threads);
    ~WavenumberImager();
    WavenumberImager(const WavenumberImager&) = delete;
    WavenumberImager& operator=(const WavenumberImager&) = delete;
    /// Linear envelope of capture frame `frame` on the grid (x_m, z_m, envelope filled); wall time
    /// per step appended to `seconds`. Throws core::Cancelled when progress.cancelled says so.
    core::Frame run(size_t frame, const Progress& progress, std::vector<std::pair<std::string, double>>& seconds);
    /// Samples per trace used (the time window) and the padded FFT sizes: time, lateral.
    size_t windowSamples() const;
    size_t timeFftSize() const;
    size_t lateralFftSize() const;

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
};

}  // namespace umbra::recon
