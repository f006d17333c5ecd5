// SPDX-License-Identifier: MIT
#pragma once
// One reconstructed image: linear envelope on an x-z grid, with the recipe that made it.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace umbra::core {

struct Frame {
    std::vector<double> x_m;     ///< [N_x] pixel centres, m
    std::vector<double> z_m;     ///< [N_z] pixel centres (depth), m
    std::vector<float> envelope; ///< [N_z][N_x] row-major, linear amplitude (not log)
    std::string recipe_json;     ///< every setting used
    std::string capture_sha256;  ///< of the capture's bytes
    size_t frame_index = 0;      ///< which capture frame

    size_t nx() const { return x_m.size(); }  ///< pixels across
    size_t nz() const { return z_m.size(); }  ///< pixels down
    /// Linear envelope amplitude of pixel (row iz, column ix); no bounds check.
    float at(size_t iz, size_t ix) const { return envelope[iz * nx() + ix]; }
    /// Largest envelope amplitude (linear; 0 for an empty frame).
    float peak() const;
};

/// Facts of the acquisition the sizing tools' point-spread model needs; any may be missing.
struct AcquisitionFacts {
    std::optional<double> centre_frequency_hz, fractional_bandwidth, speed_of_sound_m_s;
    std::optional<double> array_x_min_m, array_x_max_m, array_pitch_m;  ///< element centres' x range and pitch
    std::optional<double> elevation_beam_width_m;  ///< −6 dB elevation beam width (scan-axis resolution)
    bool wedge = false;  ///< the capture had a wedge or water path (attribute "wedge" = 1)
    bool operator==(const AcquisitionFacts&) const = default;
};

/// A reconstructed image file (format "image", version 1): several frames on one grid.
struct ImageStack {
    std::vector<double> x_m, z_m;
    size_t frames = 0;
    std::vector<float> envelope;  ///< [frames][N_z][N_x]
    std::string recipe_json;
    std::string capture_sha256;
    /// Optional: scan position of each stored frame along the scan axis, m ([frames]; empty
    /// when the capture records none). Dataset /image/scan_position_m.
    std::vector<double> scan_position_m;
    /// Optional acquisition facts for the point-spread model of the sizing tools (root
    /// attributes of the same names; absent in files written before they existed).
    AcquisitionFacts acquisition;
    /// Frame i (0-based) as its own Frame; throws std::out_of_range when i >= frames.
    Frame frame(size_t i) const;
};

/// Writes atomically (temporary file then rename). Throws InputError naming the file.
void writeImageFile(const std::string& path, const ImageStack& img);
/// Reads and checks an image file (shape against the axes, axes finite and strictly
/// increasing, at least one frame). Throws InputError naming the file and the problem.
ImageStack readImageFile(const std::string& path);

}  // namespace umbra::core
