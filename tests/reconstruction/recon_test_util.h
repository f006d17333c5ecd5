// SPDX-License-Identifier: MIT
#pragma once
// Test helpers: synthetic captures of analytic point echoes, written to a temporary file.
// Echo of each path: A exp(-t^2 / 2 sigma^2) cos(2 pi f0 t) delayed by the path time, with
// sigma = sqrt(2 ln 2) / (pi B f0) so that B is the -6 dB fractional bandwidth of the echo
// (derived from the Gaussian Fourier pair: T(-6 dB) = 4 ln2 / (pi B f0)).
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <functional>
#include <optional>
#include <random>
#include <string>
#include <vector>

#include "core/capture.h"
#include "core/capture_file.h"
#include "core/parameters.h"
#include "core/frame.h"

namespace umbra::testutil {

struct Point {
    double x, z, amp;
};

struct SynthSpec {
    size_t elements = 64;
    double pitch = 0.15e-3;
    double f0 = 5e6, bw = 0.6, c = 1540, fs = 40e6;
    size_t samples = 1000;
    core::TransmitKind kind = core::TransmitKind::SingleElement;
    std::vector<double> angles;  // plane wave
    std::vector<core::Vec3> sources;  // virtual source
    std::optional<double> attenuation;
};

inline double sigmaFor(double f0, double B) { return std::sqrt(2 * std::log(2.0)) / (M_PI * B * f0); }

inline core::CaptureHeader makeHeader(const SynthSpec& s) {
    core::CaptureHeader h;
    h.title = "synthetic point echoes (test)";
    h.created_utc = "2026-01-01T00:00:00Z";
    for (size_t e = 0; e < s.elements; ++e)
        h.array.element_position_m.push_back({(double(e) - double(s.elements - 1) / 2) * s.pitch, 0, 0});
    h.array.centre_frequency_hz = s.f0;
    h.array.fractional_bandwidth = s.bw;
    h.array.element_width_m = s.pitch * 0.9;
    h.transmit.kind = s.kind;
    size_t ntx = 0;
    if (s.kind == core::TransmitKind::SingleElement) {
        for (size_t e = 0; e < s.elements; ++e) h.transmit.source_element.push_back(int32_t(e));
        ntx = s.elements;
    } else if (s.kind == core::TransmitKind::PlaneWave) {
        h.transmit.angle_rad = s.angles;
        ntx = s.angles.size();
    } else {
        h.transmit.virtual_source_m = s.sources;
        ntx = s.sources.size();
    }
    for (size_t e = 0; e < s.elements; ++e) h.receive.element_index.push_back(int32_t(e));
    h.receive.sampling_frequency_hz = s.fs;
    h.receive.start_time_s.assign(ntx, 0.0);
    h.medium.speed_of_sound_m_s = s.c;
    h.medium.attenuation_db_per_cm_mhz = s.attenuation;
    h.frames = 1;
    h.samples = s.samples;
    h.sample_type = core::SampleType::Float32;
    h.provenance["source"] = "synthetic test data (analytic point echoes)";
    return h;
}

/// Writes a capture of point scatterers to `path`; returns the header.
inline core::CaptureHeader writePointCapture(const std::string& path, const SynthSpec& s, const std::vector<Point>& pts) {
    core::CaptureHeader h = makeHeader(s);
    const double sig = sigmaFor(s.f0, s.bw);
    const size_t ntx = h.transmits();
    core::CaptureWriter w(path, h);
    std::vector<float> block(h.blockSize());
    for (size_t t = 0; t < ntx; ++t) {
        std::fill(block.begin(), block.end(), 0.0f);
        for (size_t r = 0; r < s.elements; ++r) {
            const double xr = h.array.element_position_m[r][0];
            for (const auto& p : pts) {
                double ttx;
                if (s.kind == core::TransmitKind::SingleElement) {
                    const double xt = h.array.element_position_m[t][0];
                    ttx = std::hypot(p.x - xt, p.z) / s.c;
                } else if (s.kind == core::TransmitKind::PlaneWave) {
                    const double a = s.angles[t];
                    ttx = (p.z * std::cos(a) + p.x * std::sin(a)) / s.c;
                } else {
                    // Capture format v1: time zero when the wavefront passes the origin.
                    const auto& v = s.sources[t];
                    const double vr = std::hypot(v[0], v[2]), d = std::hypot(p.x - v[0], p.z - v[2]);
                    ttx = v[2] <= 0 ? (d - vr) / s.c : (vr + (p.z >= v[2] ? d : -d)) / s.c;
                }
                const double tau = ttx + std::hypot(p.x - xr, p.z) / s.c;
                const long k0 = long(std::floor((tau - 5 * sig) * s.fs)), k1 = long(std::ceil((tau + 5 * sig) * s.fs));
                for (long k = std::max(0L, k0); k <= k1 && k < long(s.samples); ++k) {
                    const double dt = double(k) / s.fs - tau;
                    block[r * s.samples + size_t(k)] += float(p.amp * std::exp(-dt * dt / (2 * sig * sig)) * std::cos(2 * M_PI * s.f0 * dt));
                }
            }
        }
        w.writeBlock(0, t, block.data());
    }
    w.finish();
    return h;
}

struct PeakAt {
    double x_m, z_m, v;
};

/// Largest pixel of a frame, within +-half_m of (x_m, z_m) when half_m > 0, refined to sub-pixel
/// position by a parabola through its neighbours in x and in z.
inline PeakAt framePeak(const core::Frame& f, double x_m = 0, double z_m = 0, double half_m = 0) {
    size_t bi = 0, bj = 0;
    float bv = -1;
    for (size_t iz = 0; iz < f.nz(); ++iz)
        for (size_t ix = 0; ix < f.nx(); ++ix) {
            if (half_m > 0 && (std::fabs(f.x_m[ix] - x_m) > half_m || std::fabs(f.z_m[iz] - z_m) > half_m)) continue;
            if (f.at(iz, ix) > bv) bv = f.at(iz, ix), bi = iz, bj = ix;
        }
    auto vertex = [](double a, double b, double c) {
        const double d = a - 2 * b + c;
        return d < 0 ? 0.5 * (a - c) / d : 0.0;
    };
    double dx = 0, dz = 0;
    if (bj > 0 && bj + 1 < f.nx()) dx = vertex(f.at(bi, bj - 1), bv, f.at(bi, bj + 1));
    if (bi > 0 && bi + 1 < f.nz()) dz = vertex(f.at(bi - 1, bj), bv, f.at(bi + 1, bj));
    const double step = f.x_m.size() > 1 ? f.x_m[1] - f.x_m[0] : 0;
    return {f.x_m[bj] + dx * step, f.z_m[bi] + dz * step, bv};
}

/// Sets the recipe's image region (mm) and, when step_mm > 0, the pixel step.
inline void setRegion(core::Recipe& r, double x0, double x1, double z0, double z1, double step_mm = 0) {
    r.setNumber("grid.x_min_mm", x0);
    r.setNumber("grid.x_max_mm", x1);
    r.setNumber("grid.z_min_mm", z0);
    r.setNumber("grid.z_max_mm", z1);
    if (step_mm > 0) r.setNumber("grid.step_mm", step_mm);
}

/// This test process's scratch directory (removed when the process exits).
inline std::filesystem::path tempDir() {
    return std::filesystem::temp_directory_path() / ("umbra_recon_tests_" + std::to_string(::getpid()));
}
struct TempDirCleanup {
    ~TempDirCleanup() {
        std::error_code ec;
        std::filesystem::remove_all(tempDir(), ec);
    }
};
inline TempDirCleanup temp_dir_cleanup;

/// A fresh temporary file name under the system temp directory.
inline std::string tempPath(const std::string& name) {
    std::filesystem::create_directories(tempDir());
    return (tempDir() / name).string();
}

}  // namespace umbra::testutil
