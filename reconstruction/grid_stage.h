// SPDX-License-Identifier: MIT
#pragma once
// Grid stage: the image region and pixel step. Auto region: the array's aperture and the
// recorded depth range (cut at 1.15 x the medium's thickness when that is recorded); auto
// step: the largest pixel whose worst-case amplitude loss for a point reflector between pixels
// stays within the fidelity target grid.max_loss_db (see pointSpreadWidths).
#include <cstddef>

#include "core/capture.h"
#include "core/parameters.h"

namespace umbra::recon {

struct GridParams {
    double x_min_mm = 0, x_max_mm = 0;  ///< lateral region, mm; 0/0 (default) = the array's aperture
    double z_min_mm = 0, z_max_mm = 0;  ///< depth region, mm; 0/0 (default) = the recorded depth range
    double step_mm = 0;                 ///< pixel step, mm; default 0 = auto (loss within max_loss_db)
    double max_loss_db = 1.0;           ///< amplitude fidelity target for the auto step, dB, in [0.1, 2]
};

/// Largest pixel count a grid may have (16 Mpx).
constexpr size_t kMaxGridPixels = size_t(16) << 20;
/// Amplitude-fidelity limit of TFM practice, dB (common practice: 2 dB); the upper end of
/// grid.max_loss_db.
constexpr double kFidelityLimitDb = 2.0;
/// Default fidelity target of the automatic step, dB: a margin under kFidelityLimitDb because
/// the Gaussian point-spread model below is approximate.
constexpr double kDefaultMaxLossDb = 1.0;
/// Automatic depth region with a recorded medium thickness d: 0 to min(recorded depth, this x d)
/// (the back wall and a margin below it; its first repeat at 2 d stays outside).
constexpr double kThicknessMargin = 1.15;

/// Declaration of the "grid" stage.
core::StageSpec gridSpec();
/// The stage's values from a recipe.
GridParams gridParams(const core::Recipe& r);

/// -6 dB widths (m) of the envelope point-spread function, modelled as separable Gaussian:
/// axial c T/2 with T = 4 ln2 / (pi B f0) the -6 dB duration of a Gaussian pulse of -6 dB
/// fractional bandwidth B; lateral 0.886 lambda F# (two-way uniform aperture; the narrowest
/// case, so the estimate errs towards more loss). With the "full" aperture the f-number is
/// depth / array length at the grid's mid depth.
struct PsfWidths {
    double axial_m = 0, lateral_m = 0;
};
PsfWidths pointSpreadWidths(double c_m_s, double f0_hz, double fractional_bandwidth, double f_number);

/// Worst-case loss (dB) of the Gaussian PSF peak at a half-pixel offset in both axes:
/// 20 log10(e) * 4 ln2 * (step/2)^2 * (1/Wa^2 + 1/Wl^2).
double gaussianHalfPixelLossDb(const PsfWidths& w, double step_m);
/// Largest step (m) whose half-pixel loss is at most limit_db.
double stepForLossDb(const PsfWidths& w, double limit_db);

}  // namespace umbra::recon
