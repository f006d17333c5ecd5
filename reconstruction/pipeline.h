// SPDX-License-Identifier: MIT
#pragma once
// Public face of the reconstruction library: the stage declarations, the grid, the beamforming
// run (capture frame -> linear envelope) and the display chain (envelope -> TCG -> dB -> colour).
// No Qt. Progress and cancellation are plain callbacks.
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "core/capture.h"
#include "core/capture_file.h"
#include "core/frame.h"
#include "core/parameters.h"

namespace umbra::recon {

/// Every stage's declaration, in pipeline order (band-pass, analytic signal, delay model,
/// delay-and-sum, envelope, time-gain compensation, log compression, colour map, grid).
/// The recipe panel, `--set` and the saved recipe are generated from this.
const std::vector<core::StageSpec>& allStages();

/// A recipe with every value at its declared default.
core::Recipe defaultRecipe();

/// Image grid in the array frame: x along the array, z depth; pixel centres from min to max
/// in steps of step_m (square pixels).
struct Grid {
    double x_min_m = 0, x_max_m = 0, z_min_m = 0, z_max_m = 0, step_m = 0;
    size_t nx() const;
    size_t nz() const;
    std::vector<double> xAxis() const;
    std::vector<double> zAxis() const;
};

/// The grid the recipe asks for; where the recipe leaves the region at "auto" (0 span), the
/// array's aperture and the recorded depth range (0 to min(recorded depth, 1.15 x thickness)
/// when the medium's thickness is recorded); where the step is "auto", a pixel that keeps the
/// estimated worst-case point loss within grid.max_loss_db (default 1 dB). Throws core::SettingError for an empty grid, a
/// non-positive step or more pixels than the limit.
Grid resolveGrid(const core::CaptureHeader& h, const core::Recipe& r);

/// Worst-case loss (dB, >= 0) of a point reflector's envelope peak: the loss when it falls
/// between pixels of `grid` (from the point-spread function the capture and recipe give) plus
/// the loss of the delay-and-sum interpolation at the centre frequency (interpolationLossDb).
double amplitudeFidelityDb(const core::CaptureHeader& h, const core::Recipe& r, const Grid& grid);

/// Plain callbacks for long runs. `progress` gets a fraction in [0, 1]; `cancelled` is polled
/// between transmit blocks and tiles; when it returns true the run throws core::Cancelled.
struct Progress {
    std::function<void(double)> progress;
    std::function<bool()> cancelled;
};

/// Wall time per stage and the beamforming throughput.
struct Timings {
    std::vector<std::pair<std::string, double>> stage_seconds;  ///< in pipeline order
    double total_seconds = 0;
    double effective_terms = 0;  ///< pixels x transmits x receives summed
    double executed_terms = 0;   ///< terms the kernels actually evaluated (after reciprocity, aperture and tile skipping, incl. tile padding)
    /// effective_terms / delay-and-sum seconds.
    double termsPerSecond() const;
};

/// Beamforms one or more frames of a capture. Holds per-worker scratch (FFT plans, buffers)
/// so repeated runs allocate nothing in the hot loop. Reads the capture one (frame, transmit)
/// block at a time.
///
///   core::CaptureReader cap("weld.h5");
///   recon::Reconstructor rec(cap, recon::defaultRecipe());
///   core::Frame f = rec.run(0);           // linear envelope, before TCG
///
/// `capture` must outlive the Reconstructor. One run() at a time per Reconstructor (it owns
/// the worker threads and buffers); use one Reconstructor per concurrent job.
class Reconstructor {
public:
    Reconstructor(const core::CaptureReader& capture, const core::Recipe& recipe, int threads = 0 /*all cores*/);
    ~Reconstructor();
    const Grid& grid() const;
    /// Linear envelope of capture frame `frame` on grid(), before time-gain compensation.
    core::Frame run(size_t frame, const Progress& progress = {});
    const Timings& lastTimings() const;
    /// Amplitude fidelity (dB) achieved by grid(); see amplitudeFidelityDb.
    double amplitudeFidelityDb() const;

private:
    struct Impl;
    Impl* impl_;
};

// ------------------------------------------------------------------- display chain
// Display-only: these re-map a stored linear envelope and never re-run delay-and-sum.

/// The attenuation and frequency the attenuation TCG uses, and where each comes from: the
/// recipe's value, or (recipe value 0) the capture's medium attenuation / array centre
/// frequency. `attenuation_recorded` is false when the capture records no attenuation (then 0).
struct TgcInputs {
    double attenuation_db_per_cm_mhz = 0;  ///< one-way alpha, dB/cm/MHz
    double frequency_mhz = 0;              ///< f, MHz
    bool attenuation_from_capture = false;
    bool attenuation_recorded = false;
    bool frequency_from_capture = false;
};
TgcInputs resolvedTgcInputs(const core::CaptureHeader& h, const core::Recipe& r);

/// Time-gain compensation gain (linear amplitude factor) per depth row z_m, from the recipe
/// (medium attenuation, round trip, or a user curve of dB versus depth points).
std::vector<float> tgcGain(const core::CaptureHeader& h, const core::Recipe& r, const std::vector<double>& z_m);

/// Envelope after TCG (linear), as written to image files.
core::Frame applyTgc(const core::Frame& f, const core::CaptureHeader& h, const core::Recipe& r);

/// Log compression: dB relative to the reference (peak, or the user reference), plus gain,
/// clipped to [-dynamic range, 0]. Output [N_z][N_x].
std::vector<float> logCompress(const core::Frame& tgc_applied, const core::Recipe& r);

/// Colour map lookup for dB values in [-dynamic range, 0]: 8-bit RGB, [N_z][N_x][3].
std::vector<uint8_t> colourise(const std::vector<float>& db, const core::Recipe& r);

/// Names of the colour maps the colour-map stage offers.
std::vector<std::string> colourMapNames();
/// One colour of a named map at t in [0, 1] (for colour bars).
void colourAt(const std::string& map, double t, uint8_t rgb[3]);

/// Writes an 8-bit PNG of a frame with mm axes, a title line and a colour bar; `dark`: light
/// text on a dark surround (screens) instead of black on white (print).
void writePng(const std::string& path, const core::Frame& tgc_applied, const core::Recipe& r, const std::string& title,
              bool dark = false);

}  // namespace umbra::recon
