// SPDX-License-Identifier: MIT
#include "core/file_kind.h"

#include <hdf5.h>

#include <cstring>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "core/detail/h5.h"
#include "core/error.h"
#include "core/json_guard.h"

namespace umbra::core {
namespace {
// Largest JSON text looked at; Umbra's own JSON files are far smaller (a case is at most 64 MiB).
constexpr std::uintmax_t kMaxJsonBytes = std::uintmax_t(64) << 20;

bool isHdf5Signature(const std::string& head) {
    // HDF5 format signature (HDF5 File Format Specification, "Format Signature"); it may also
    // follow a user block of 512, 1024, 2048, ... bytes.
    static const char sig[8] = {'\x89', 'H', 'D', 'F', '\r', '\n', '\x1a', '\n'};
    if (head.size() >= 8 && std::memcmp(head.data(), sig, 8) == 0) return true;
    for (size_t off = 512; off + 8 <= head.size(); off *= 2)
        if (std::memcmp(head.data() + off, sig, 8) == 0) return true;
    return false;
}
}  // namespace

std::string toString(FileKind k) {
    switch (k) {
        case FileKind::Capture: return "capture";
        case FileKind::Image: return "image file";
        case FileKind::Hdf5: return "HDF5 file";
        case FileKind::Dicom: return "DICOM file";
        case FileKind::Case: return "case file";
        case FileKind::Scene: return "scene file";
        case FileKind::Manifest: return "batch manifest";
        case FileKind::BatchSummary: return "batch summary";
        case FileKind::Recipe: return "recipe";
        case FileKind::Unknown: break;
    }
    return "unknown file";
}

FileKind sniffFileKind(const std::string& path) {
    namespace fs = std::filesystem;
    std::error_code ec;
    if (!fs::exists(path, ec)) throw InputError(path, "", "does not exist");
    if (fs::is_directory(path, ec)) throw InputError(path, "", "is a directory, not a file");
    const auto size = fs::file_size(path, ec);
    if (ec) throw InputError(path, "", "cannot be read: " + ec.message());
    if (size == 0) throw InputError(path, "", "is empty: not an HDF5 file, nor any other file Umbra reads");
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path, "", "cannot be read");
    std::string head(size_t(std::min<std::uintmax_t>(size, 4096)), '\0');
    in.read(head.data(), std::streamsize(head.size()));
    head.resize(size_t(in.gcount()));
    if (isHdf5Signature(head)) return FileKind::Hdf5;
    if (head.size() >= 132 && head.compare(128, 4, "DICM") == 0) return FileKind::Dicom;  // DICOM PS3.10 section 7.1
    // JSON: first non-blank character (after an optional UTF-8 byte order mark) opens an object.
    size_t i = head.compare(0, 3, "\xEF\xBB\xBF") == 0 ? 3 : 0;
    while (i < head.size() && std::strchr(" \t\r\n", head[i])) ++i;
    if (i >= head.size() || head[i] != '{') return FileKind::Unknown;
    if (size > kMaxJsonBytes)
        throw InputError(path, "", "is a JSON text of " + std::to_string(size) + " bytes; Umbra reads at most " +
                                       std::to_string(kMaxJsonBytes) + " bytes of JSON");
    std::ostringstream ss;
    in.seekg(0);
    ss << in.rdbuf();
    std::string text = ss.str();
    if (i == 3) text.erase(0, 3);
    checkJsonText(text, path);
    const auto j = nlohmann::json::parse(text);
    auto str = [&](const char* key) { return j.contains(key) && j[key].is_string() ? j[key].get<std::string>() : std::string(); };
    if (str("format") == "umbracase") return FileKind::Case;
    if (str("format") == "umbra-scene") return FileKind::Scene;
    if (str("umbra_format") == "batch_summary") return FileKind::BatchSummary;
    if (!j.contains("format") && j.contains("captures") && j["captures"].is_array()) return FileKind::Manifest;
    if (j.contains("format") || j.contains("umbra_format")) return FileKind::Unknown;
    return FileKind::Recipe;
}

FileKind hdf5Kind(const std::string& path) {
    using namespace detail;
    std::lock_guard lock(hdf5Mutex());
    silenceHdf5();
    if (H5Fis_hdf5(path.c_str()) <= 0) throw InputError(path, "", "is not an HDF5 file (or is truncated or damaged)");
    Hid f(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT));
    if (!f) throw InputError(path, "", "cannot be opened as HDF5 (truncated or damaged?)");
    // Every other HDF5 file is checked as a capture, so that what it lacks is named.
    return exists(f.get(), "/image") ? FileKind::Image : FileKind::Capture;
}

}  // namespace umbra::core
