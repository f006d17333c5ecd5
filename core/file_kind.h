// SPDX-License-Identifier: MIT
#pragma once
// What kind of Umbra file a path holds, decided by its content (never by its name): the HDF5
// signature (captures and images; which of the two is told by the root groups), the DICOM
// preamble ("DICM" at byte 128), or a JSON text and its identifying keys. No Qt.
#include <string>

namespace umbra::core {

enum class FileKind {
    Unknown,   ///< none of the below
    Capture,   ///< HDF5 without /image (checked against capture format v1)
    Image,     ///< HDF5 with /image (reconstructed image file)
    Hdf5,      ///< HDF5, not yet told capture or image (hdf5Kind tells them)
    Dicom,     ///< DICOM Part 10 file: 128-byte preamble, then "DICM"
    Case,      ///< JSON, "format": "umbracase"
    Scene,     ///< JSON, "format": "umbra-scene"
    Manifest,  ///< JSON object with a "captures" list and no "format" (batch manifest)
    BatchSummary,  ///< JSON, "umbra_format": "batch_summary"
    Recipe,    ///< any other JSON object ({"stage": {"param": value}}; its stages are checked when read)
};

/// Lower-case name ("capture", "image", "DICOM file", "case file", ...).
std::string toString(FileKind k);

/// Kind of the file at `path` by its first bytes; a JSON text is checked (core::checkJsonText)
/// and its top-level keys looked at. HDF5 files give FileKind::Hdf5: telling captures from images
/// opens the file with the HDF5 library (hdf5Kind), which should run isolated for untrusted files.
/// Throws InputError naming the file when it does not exist, is a folder, cannot be read, is
/// empty, or is JSON that is not valid.
FileKind sniffFileKind(const std::string& path);

/// Image when the HDF5 file has /image, else Capture (opens it with the HDF5 library).
/// Throws InputError when the library cannot open it.
FileKind hdf5Kind(const std::string& path);

}  // namespace umbra::core
