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
    /// Geometry of views and wedges for the view-aware point-spread model (attributes of the same
    /// names, from the capture's /medium; absent when the capture has none, and in older files).
    std::optional<double> shear_speed_m_s, thickness_m;
    std::optional<double> wedge_speed_m_s, wedge_origin_x_m, wedge_origin_z_m, wedge_tilt_rad;
    bool wedge = false;  ///< the capture had a wedge or water path (attribute "wedge" = 1)
    std::string view_mode;    ///< view of the image, e.g. "TT-T" (attribute "view_mode"; empty = not recorded, L-L)
    std::string image_frame;  ///< "array" or "specimen" (attribute "image_frame"; empty = not recorded, array)
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
    /// True when x_m and z_m hold pixel indices, not metres (an uncalibrated stored frame, e.g.
    /// a DICOM image without a usable ultrasound region): root attribute axes_unit = "px".
    bool axes_in_pixels = false;
    /// Frame i (0-based) as its own Frame; throws std::out_of_range when i >= frames.
    Frame frame(size_t i) const;
};

/// Writes an image file one frame at a time, so memory stays at one frame whatever the number
/// of frames: /image/envelope is a chunked dataset (one chunk per frame) that grows with each
/// append(). The file is written to "PATH.partial" and renamed into place by finish(); the
/// destructor removes the partial file if finish() was not called. The bytes depend only on
/// the content (no object timestamps), so the same image always gives the same file.
///
///   ImageWriter w("out.image.h5", grid.xAxis(), grid.zAxis(), recipe.toJson());
///   for (...) w.append(frame.envelope);     // [N_z][N_x] each
///   w.setCaptureSha256(sha);
///   w.finish();
class ImageWriter {
public:
    /// Creates PATH.partial. Throws InputError naming `path` (folder missing, not writable,
    /// empty axes).
    ImageWriter(const std::string& path, const std::vector<double>& x_m, const std::vector<double>& z_m,
                const std::string& recipe_json);
    ~ImageWriter();
    ImageWriter(const ImageWriter&) = delete;
    ImageWriter& operator=(const ImageWriter&) = delete;

    /// Appends one frame, [N_z][N_x] row-major linear envelope (exactly N_z x N_x values).
    void append(const float* envelope, size_t count);
    void append(const std::vector<float>& envelope) { append(envelope.data(), envelope.size()); }
    /// SHA-256 of the capture (lowercase hex), stored by finish().
    void setCaptureSha256(const std::string& sha256);
    /// Scan position of each frame along the scan axis, m (one per appended frame; empty: none),
    /// written by finish() as /image/scan_position_m.
    void setScanPositions(const std::vector<double>& scan_position_m);
    /// Acquisition facts for the sizing tools' point-spread model, written as root attributes.
    void setAcquisition(const AcquisitionFacts& facts);
    /// Marks the axes as pixel indices (root attribute axes_unit = "px"); default metres.
    void setAxesInPixels(bool px);
    size_t frames() const { return frames_; }
    /// Writes the remaining attributes, closes the file and renames it into place.
    void finish();

private:
    struct Impl;
    Impl* impl_;
    std::string path_;
    size_t frames_ = 0;
};

/// Writes atomically (temporary file then rename) through ImageWriter. Throws InputError
/// naming the file.
void writeImageFile(const std::string& path, const ImageStack& img);
/// Reads and checks an image file (shape against the axes, axes finite and strictly
/// increasing, at least one frame). Throws InputError naming the file and the problem.
ImageStack readImageFile(const std::string& path);
/// The same checks on everything but the envelope, which is not read (envelope stays empty;
/// frames is the count in the file). For deciding whether an existing output is up to date.
ImageStack readImageFileHeader(const std::string& path);

}  // namespace umbra::core
