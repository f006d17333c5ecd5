// SPDX-License-Identifier: MIT
#pragma once
// Point-spread widths of a delay-and-sum image of any view (delay_model.mode) through an
// optional wedge, for the sizing tools. Not a stage: a model read by sizing_setup.cpp. No Qt.
//
// Model (k-space / wavenumber coverage of a synthetic aperture; M. Soumekh, Fourier Array
// Imaging, Prentice Hall 1994, and Walker & Trahey, IEEE TUFFC 45(3) 1998 541-558, both from
// memory). Near the pixel P the delay-and-sum image of a point at P is
//   I(δ) = Σ_t Σ_r w_t w_r s((û_t/c_t + û_r/c_r)·δ),
// û_t, û_r the unit vectors from P back along the last leg of the transmit and receive paths,
// c_t, c_r their wave speeds, s the pulse. Narrowband, the sum separates into two one-way
// aperture patterns |Σ_t w_t exp(i k_t û_t·δ)| and |Σ_r w_r exp(i k_r û_r·δ)| times the pulse
// envelope along the slowness sum g = ū_t/c_t + ū_r/c_r. A one-way set whose directions span
// the angle Δθ covers the transverse wavenumbers k sin(θ − θ̄), a band 2 k sin(Δθ/2) wide; its
// pattern is the Fourier transform of the aperture window over that band, so it falls to 1/√2
// (−3 dB one way) at ±K λ / (4 sin(Δθ/2)), K = lateralWidthFactor of the window, and a
// transmit and receive set that agree give the two-way −6 dB width K λ / (2 sin(Δθ/2)). For a
// contact array imaging straight down at depth z with aperture D, 2 sin(Δθ/2) = D/√(z² + D²/4),
// i.e. K λ F √(1 + 1/(4F²)): the paraxial K λ F of point_spread.h up to 3 % at F ≥ 2.
// Along g the pulse's −6 dB duration T = 4 ln2/(π B f0) spans T/|g| (c T/2 when both legs
// have speed c and arrive from the same side).
//
// Each factor is replaced by the Gaussian with the same −6 dB (two-way) or −3 dB (one-way)
// points, so the image is exp(−δᵀAδ) with A = Σ a_i n_i n_iᵀ (n_i across each set's mean
// direction, along g for the pulse); its −6 dB contour δᵀAδ = ln 2 is an ellipse whose
// projections onto x and z have full widths 2 √(ln 2 (A⁻¹)_xx) and 2 √(ln 2 (A⁻¹)_zz).
//
// Aperture: the beamformer's rule (reconstructor.cpp): with a wedge, or das.aperture = full, the
// non-excluded elements' span ± pitch/2; otherwise the dynamic aperture z / F# centred on the
// pixel, clipped at the first and last non-excluded element centres (as point_spread.h). Rays
// are traced (ray_path.h) from the two ends of that aperture; excluded elements inside the
// span (holes) are ignored.
#include <optional>
#include <vector>

#include "core/capture.h"
#include "core/frame.h"
#include "core/parameters.h"
#include "reconstruction/ray_path.h"
#include "reconstruction/view_mode.h"

namespace umbra::recon {

struct ViewPointSpread {
    ViewGeometry geometry;
    ViewMode mode;
    std::vector<core::Vec3> elements;  ///< element centres, array frame, m
    std::vector<char> excluded;        ///< per element: 1 = left out of the sum (das.excluded_elements)
    double pitch_m = 0;
    bool full_aperture = false;        ///< das.aperture == "full", or a wedge capture (the beamformer's rule)
    double f_number = 1;               ///< das.f_number
    double width_factor = 0.886;       ///< lateralWidthFactor(das.apodization, das.tukey_alpha)
    double f0_hz = 0, fractional_bandwidth = 0;

    struct Widths {
        bool valid = false;                ///< false: no path from an aperture end to the pixel
        double x_m = 0, z_m = 0;           ///< −6 dB full widths projected onto the image's x and z, m
        double across_m = 0, along_m = 0;  ///< −6 dB full widths across and along the slowness sum g, m
        double ray_angle_rad = 0;          ///< direction of −g (into the part) from +z towards +x
        double span_tx_rad = 0, span_rx_rad = 0;  ///< angular span Δθ of the aperture seen from the pixel
    };
    /// Widths at the image pixel (x, z), m (specimen frame with a wedge, else the array frame).
    Widths at(double x_m, double z_m) const;
};

/// Model of an image made with `recipe` (delay_model.*, das.*) from a capture with header `h`.
/// Throws core::SettingError for a bad recipe or geometry (as the delay model does).
ViewPointSpread viewPointSpread(const core::Recipe& recipe, const core::CaptureHeader& h);

/// Same from the acquisition facts of an image file or a capture (linear array at z = 0 rebuilt
/// from the element x range and pitch); nullopt when the facts lack what the view needs
/// (frequency, bandwidth, speeds, element range, wedge geometry when `acq.wedge`, thickness for a
/// skip view) or the recipe or geometry is refused.
std::optional<ViewPointSpread> viewPointSpread(const core::Recipe& recipe, const core::AcquisitionFacts& acq);

}  // namespace umbra::recon
