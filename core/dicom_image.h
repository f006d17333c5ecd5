// SPDX-License-Identifier: MIT
#pragma once
// DICOM ultrasound images in and out (already beamformed, stored frames): 8-bit monochrome or
// RGB, single- or multi-frame, calibrated from the Sequence of Ultrasound Regions (DICOM PS3.3
// C.8.5.5). Built on DCMTK; no Qt. See docs/dicom.md.
#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "core/frame.h"

namespace umbra::core {

/// Sizes refused before any pixel buffer is allocated.
struct DicomLimits {
    static constexpr size_t max_rows = 8192;                     ///< pixels down
    static constexpr size_t max_columns = 8192;                  ///< pixels across
    static constexpr size_t max_frames = 100000;                 ///< frames of a cine
    static constexpr uint64_t max_pixel_bytes = uint64_t(1) << 30;  ///< rows x columns x frames x samples (8-bit), 1 GiB
};

/// Spatial calibration of a stored frame, from one region of the Sequence of Ultrasound Regions.
/// Pixel (column c, row r) of the full frame has its centre at
///   x = x0_m + (c - col0) * dx_m,  depth z = z0_m + (r - row0) * dz_m.
/// The calibrated part of the frame is the region: columns [col0, col0 + cols), rows [row0, row0 + rows).
struct DicomCalibration {
    size_t col0 = 0, row0 = 0, cols = 0, rows = 0;  ///< the region's pixel rectangle
    double x0_m = 0, z0_m = 0;                      ///< centre of pixel (col0, row0), m
    double dx_m = 0, dz_m = 0;                      ///< pixel pitch, m (> 0)
    size_t region_index = 0;                        ///< item of (0018,6011) used
};

/// One DICOM image as read: every frame's pixels, 8 bits per sample, and what is known about it.
struct DicomImage {
    std::string file;                 ///< the name used in messages
    size_t rows = 0, columns = 0, frames = 0;
    size_t samples = 1;               ///< 1 (monochrome) or 3 (RGB, interleaved)
    std::vector<uint8_t> pixels;      ///< [frames][rows][columns][samples]; MONOCHROME1 already inverted
    std::string photometric;          ///< as stored (MONOCHROME2, MONOCHROME1, RGB, YBR_FULL_422, ...)
    std::string transfer_syntax;      ///< UID
    std::string sop_class_uid;
    std::optional<DicomCalibration> calibration;  ///< empty: uncalibrated (measure in pixels)
    std::string calibration_note;     ///< why no region was usable ("" when calibrated)
    std::optional<double> frame_time_s;  ///< from Frame Time (0018,1063), else Cine Rate (0018,0040)
    std::string description;          ///< Series Description, else Study Description
    std::string image_comments;       ///< Image Comments (0020,4000)
    bool synthetic = false;           ///< descriptions or comments say "synthetic"

    /// Grey level of a pixel (luminance of RGB, ITU-R BT.601 weights), 0..255.
    double grey(size_t frame, size_t row, size_t col) const;
    /// Pixel (row, col) of `frame` as RGB (grey repeated for monochrome).
    void rgb(size_t frame, size_t row, size_t col, uint8_t out[3]) const;
    /// The frames as an Umbra image stack: grey levels (not a linear envelope: see
    /// docs/dicom.md) of the calibrated region on axes in metres, or of the whole frame on
    /// pixel-index axes (ImageStack::axes_in_pixels) when uncalibrated.
    ImageStack toImageStack() const;
};

/// Reads a DICOM file (Part 10 or a bare data set). Throws InputError naming the file and the
/// problem: not DICOM, truncated, no pixel data, unsupported transfer syntax or photometric
/// interpretation, bits allocated other than 8, sizes beyond DicomLimits or beyond the bytes
/// the file holds. Never allocates more than the limits allow.
DicomImage readDicomFile(const std::string& path);
/// The same on bytes in memory (`name` is used in messages).
DicomImage readDicomBuffer(const uint8_t* data, size_t size, const std::string& name);
/// True when the file starts like DICOM Part 10 ("DICM" at byte 128).
bool looksLikeDicom(const std::string& path);

/// Fuzzing entry point: parses `size` bytes as a DICOM file and decodes its frames; an
/// InputError is the expected outcome for bad bytes. Returns 0 (libFuzzer convention).
int fuzzDicomBuffer(const uint8_t* data, size_t size);

/// What goes into an exported DICOM file beyond the pixels.
struct DicomExportInfo {
    std::string title;           ///< case or capture title → Study Description, Series Description
    std::string part_id;         ///< part identifier → Patient ID (and Patient's Name), may be empty
    std::string capture_sha256;  ///< → Image Comments with the recipe
    std::string recipe_json;     ///< → Image Comments
    bool synthetic = false;      ///< "synthetic" in Series Description and Image Comments
    std::optional<double> frame_time_s;  ///< Frame Time for multi-frame files (default 0.1 s)
};

/// Writes 8-bit frames ([frames][N_z][N_x][samples], samples 1 or 3) on the grid x_m, z_m
/// (pixel centres, uniformly spaced, metres) as an Ultrasound Image (one frame) or Ultrasound
/// Multi-frame Image, explicit VR little endian, with one Sequence of Ultrasound Regions item
/// covering the frame (PhysicalDeltaX/Y in cm). Written atomically. Throws InputError naming
/// `path` (not writable) or SettingError (non-uniform grid, no frames, wrong size).
void writeDicomFile(const std::string& path, const std::vector<double>& x_m, const std::vector<double>& z_m,
                    size_t frames, size_t samples, const std::vector<uint8_t>& pixels, const DicomExportInfo& info);

}  // namespace umbra::core
