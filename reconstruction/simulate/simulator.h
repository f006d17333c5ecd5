// SPDX-License-Identifier: MIT
#pragma once
// Forward simulator: scene -> capture (format v1). Linear superposition of analytic Gaussian
// pulses, one per (transmit, receive, scatterer) path, delayed by the exact path time and
// weighted by directivity, 2-D cylindrical spreading and attenuation. It is the adjoint of
// delay-and-sum: the delay conventions are those of the capture contract.
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "core/capture.h"
#include "reconstruction/simulate/scene.h"

namespace umbra::recon::sim {

/// Version string written to /provenance.
const char* simulatorVersion();

struct SimOptions {
    std::optional<uint64_t> seed;        ///< overrides scene.seed
    std::optional<size_t> max_frames;    ///< simulate only the first N frames
    unsigned threads = 0;                ///< 0 = hardware concurrency
    std::function<void(double)> progress;  ///< fraction done in [0, 1]
    std::string created_utc;             ///< empty = now (set it for byte-identical reruns)
};

/// Counters of one run (for benchmarks and --timings).
struct SimStats {
    double seconds = 0;
    size_t scatterers = 0;          ///< point sources per frame after expansion (incl. speckle)
    double scatterer_traces = 0;    ///< scatterer x trace pairs evaluated
    double samples_written = 0;     ///< pulse samples actually accumulated
    double nominal_samples = 0;     ///< scatterers x traces x N_samples
};

/// A capture held in memory: header plus every block as physical values (for int16 captures
/// already quantised exactly as a reader would return them).
struct SimulatedCapture {
    core::CaptureHeader header;
    std::vector<float> rf;  ///< [frames][N_tx][N_rx][N_samples]
    SimStats stats;
    /// Pointer to block (frame, transmit): [N_rx][N_samples].
    const float* block(size_t frame, size_t transmit) const {
        return rf.data() + (frame * header.transmits() + transmit) * header.blockSize();
    }
};

/// The capture header the scene produces (no traces yet; rf_scale set for explicit scales).
core::CaptureHeader makeHeader(const Scene& scene, const SimOptions& opt = {});

/// Simulates the whole capture in memory. Throws core::InputError for scenes too large to hold.
SimulatedCapture simulate(const Scene& scene, const SimOptions& opt = {});

/// Simulates frame by frame and writes `out_path` (HDF5 capture v1). Returns run counters.
SimStats simulateToFile(const Scene& scene, const std::string& out_path, const SimOptions& opt = {});

}  // namespace umbra::recon::sim
