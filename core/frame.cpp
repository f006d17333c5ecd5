// SPDX-License-Identifier: MIT
#include "core/frame.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <mutex>
#include <stdexcept>
#include <string>
#include <utility>

#include "core/capture.h"
#include "core/detail/h5.h"
#include "core/error.h"

namespace umbra::core {
using namespace detail;

float Frame::peak() const {
    float m = 0;
    for (float v : envelope) m = std::max(m, v);
    return m;
}

Frame ImageStack::frame(size_t i) const {
    if (i >= frames || envelope.size() < frames * x_m.size() * z_m.size())
        throw std::out_of_range("ImageStack::frame(" + std::to_string(i) + "): the stack has " + std::to_string(frames) +
                                " frame(s)");
    Frame f;
    f.x_m = x_m;
    f.z_m = z_m;
    const size_t n = x_m.size() * z_m.size();
    f.envelope.assign(envelope.begin() + std::ptrdiff_t(i * n), envelope.begin() + std::ptrdiff_t((i + 1) * n));
    f.recipe_json = recipe_json;
    f.capture_sha256 = capture_sha256;
    f.frame_index = i;
    return f;
}

void writeImageFile(const std::string& path, const ImageStack& img) {
    std::lock_guard lock(hdf5Mutex());
    silenceHdf5();
    const std::string partial = path + ".partial";
    const size_t nx = img.x_m.size(), nz = img.z_m.size();
    if (img.envelope.size() != img.frames * nx * nz)
        throw InputError(path, "/image/envelope", "size does not match frames x N_z x N_x");
    {
        Hid f(H5Fcreate(partial.c_str(), H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT));
        if (!f) throw InputError(path, "", "cannot create the file (directory missing or not writable?)");
        try {
            writeStringAttr(f.get(), "umbra_format", "image");
            writeIntAttr(f.get(), "umbra_format_version", 1);
            writeStringAttr(f.get(), "recipe_json", img.recipe_json);
            writeStringAttr(f.get(), "capture_sha256", img.capture_sha256);
            Hid g = createGroup(f.get(), "image");
            writeFloats(g.get(), "envelope", img.envelope.data(), {img.frames, nz, nx});
            writeDoubles(g.get(), "x_m", img.x_m.data(), {nx});
            writeDoubles(g.get(), "z_m", img.z_m.data(), {nz});
            if (!img.scan_position_m.empty()) {
                if (img.scan_position_m.size() != img.frames) throw std::runtime_error("scan_position_m is not one per frame");
                writeDoubles(g.get(), "scan_position_m", img.scan_position_m.data(), {img.frames});
            }
            const auto& a = img.acquisition;
            const std::pair<const char*, const std::optional<double>*> opt[] = {
                {"centre_frequency_hz", &a.centre_frequency_hz}, {"fractional_bandwidth", &a.fractional_bandwidth},
                {"speed_of_sound_m_s", &a.speed_of_sound_m_s},   {"array_x_min_m", &a.array_x_min_m},
                {"array_x_max_m", &a.array_x_max_m},             {"array_pitch_m", &a.array_pitch_m},
                {"elevation_beam_width_m", &a.elevation_beam_width_m}};
            for (const auto& [name, v] : opt)
                if (*v) writeDoubleAttr(f.get(), name, **v);
            if (a.wedge) writeIntAttr(f.get(), "wedge", 1);
        } catch (const std::exception& e) {
            f.reset();
            std::remove(partial.c_str());
            throw InputError(path, "", e.what());
        }
    }
    std::error_code ec;
    std::filesystem::rename(partial, path, ec);
    if (ec) throw InputError(path, "", "cannot move the finished file into place: " + ec.message());
}

ImageStack readImageFile(const std::string& path) {
    std::lock_guard lock(hdf5Mutex());
    silenceHdf5();
    std::error_code ec;
    if (!std::filesystem::exists(path, ec)) throw InputError(path, "", "file does not exist");
    if (std::filesystem::is_directory(path, ec)) throw InputError(path, "", "is a directory, not an image file");
    if (H5Fis_hdf5(path.c_str()) <= 0) throw InputError(path, "", "is not an HDF5 file");
    Hid f(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT));
    if (!f) throw InputError(path, "", "cannot be opened");
    std::string err;
    auto fmt = readStringAttr(f.get(), "umbra_format", err);
    if (!fmt || *fmt != "image") throw InputError(path, "/@umbra_format", "is not 'image'");
    auto ver = readIntAttr(f.get(), "umbra_format_version", err);
    if (!ver || *ver != 1) throw InputError(path, "/@umbra_format_version", "must be 1");
    ImageStack img;
    if (auto r = readStringAttr(f.get(), "recipe_json", err)) img.recipe_json = *r;
    if (auto s = readStringAttr(f.get(), "capture_sha256", err)) img.capture_sha256 = *s;
    std::vector<hsize_t> dims;
    auto x = readDoubles(f.get(), "/image/x_m", 1, 1 << 20, dims, err);
    if (!x) throw InputError(path, "/image/x_m", err);
    auto z = readDoubles(f.get(), "/image/z_m", 1, 1 << 20, dims, err);
    if (!z) throw InputError(path, "/image/z_m", err);
    // Shape checked against the axes and a size bound before anything is allocated.
    constexpr size_t kMaxEnvelope = size_t(1) << 28;  // 1 GiB of float32
    if (!exists(f.get(), "/image/envelope")) throw InputError(path, "/image/envelope", "is missing");
    {
        Hid ds(H5Dopen2(f.get(), "/image/envelope", H5P_DEFAULT));
        if (!ds) throw InputError(path, "/image/envelope", "is not a dataset");
        auto d = datasetDims(ds.get(), err);
        if (!d) throw InputError(path, "/image/envelope", err);
        if (d->size() != 3 || (*d)[1] != z->size() || (*d)[2] != x->size())
            throw InputError(path, "/image/envelope", "shape does not match [N_frames, N_z, N_x] = [*, " +
                                                          std::to_string(z->size()) + ", " + std::to_string(x->size()) + "]");
    }
    auto e = readFloats(f.get(), "/image/envelope", 3, kMaxEnvelope, dims, err);
    if (!e) throw InputError(path, "/image/envelope", err);
    // Pixel centres: finite and strictly increasing (x to the right, z downwards).
    for (auto [axis, v] : {std::pair{"/image/x_m", &*x}, std::pair{"/image/z_m", &*z}}) {
        for (size_t i = 0; i < v->size(); ++i) {
            if (!std::isfinite((*v)[i])) throw InputError(path, axis, "non-finite pixel centre");
            if (i > 0 && !((*v)[i] > (*v)[i - 1])) throw InputError(path, axis, "pixel centres must be strictly increasing");
        }
    }
    if (dims[0] == 0) throw InputError(path, "/image/envelope", "holds no frames");
    const size_t e_frames = dims[0];
    if (exists(f.get(), "/image/scan_position_m")) {
        auto sp = readDoubles(f.get(), "/image/scan_position_m", 1, CaptureLimits::max_frames, dims, err);
        if (!sp) throw InputError(path, "/image/scan_position_m", err);
        if (sp->size() != e_frames) throw InputError(path, "/image/scan_position_m", "must hold one position per frame");
        for (double v : *sp)
            if (!std::isfinite(v)) throw InputError(path, "/image/scan_position_m", "non-finite scan position");
        img.scan_position_m = std::move(*sp);
    }
    auto& acq = img.acquisition;
    const std::pair<const char*, std::optional<double>*> opt[] = {
        {"centre_frequency_hz", &acq.centre_frequency_hz}, {"fractional_bandwidth", &acq.fractional_bandwidth},
        {"speed_of_sound_m_s", &acq.speed_of_sound_m_s},   {"array_x_min_m", &acq.array_x_min_m},
        {"array_x_max_m", &acq.array_x_max_m},             {"array_pitch_m", &acq.array_pitch_m},
        {"elevation_beam_width_m", &acq.elevation_beam_width_m}};
    for (const auto& [name, v] : opt) {
        if (!attrExists(f.get(), name)) continue;
        err.clear();
        auto d = readDoubleAttr(f.get(), name, err);
        if (!d || !std::isfinite(*d)) throw InputError(path, std::string("/@") + name, err.empty() ? "is not a finite number" : err);
        *v = *d;
    }
    if (attrExists(f.get(), "wedge")) {
        auto w = readIntAttr(f.get(), "wedge", err);
        acq.wedge = w && *w != 0;
    }
    img.x_m = *x;
    img.z_m = *z;
    img.frames = e_frames;
    img.envelope = std::move(*e);
    return img;
}

}  // namespace umbra::core
