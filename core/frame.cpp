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

namespace {
void check(herr_t r, const std::string& path, const std::string& what) {
    if (r < 0) throw InputError(path, "/image/envelope", "cannot " + what + " (disk full or not writable?)");
}
}  // namespace

struct ImageWriter::Impl {
    Hid file, envelope;
    size_t nx = 0, nz = 0;
    std::string partial;
    std::string sha256;
    std::vector<double> scan_position_m;
    AcquisitionFacts acquisition;
    bool axes_in_pixels = false;
    bool finished = false;
};

ImageWriter::ImageWriter(const std::string& path, const std::vector<double>& x_m, const std::vector<double>& z_m,
                         const std::string& recipe_json)
    : impl_(new Impl), path_(path) {
    std::lock_guard lock(hdf5Mutex());
    silenceHdf5();
    Impl& I = *impl_;
    I.nx = x_m.size();
    I.nz = z_m.size();
    I.partial = path + ".partial";
    try {
        if (I.nx == 0 || I.nz == 0) throw InputError(path, "/image", "an image needs at least one pixel along x and z");
        I.file = Hid(H5Fcreate(I.partial.c_str(), H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT));
        if (!I.file) throw InputError(path, "", "cannot create the file (directory missing or not writable?)");
        try {
            writeStringAttr(I.file.get(), "umbra_format", "image");
            writeIntAttr(I.file.get(), "umbra_format_version", 1);
            writeStringAttr(I.file.get(), "recipe_json", recipe_json);
            Hid g = createGroup(I.file.get(), "image");
            writeDoubles(g.get(), "x_m", x_m.data(), {I.nx});
            writeDoubles(g.get(), "z_m", z_m.data(), {I.nz});
            // [N_frames, N_z, N_x], growing by one frame per append; one chunk per frame, so
            // HDF5 never holds more than a frame in memory.
            const hsize_t dims[3] = {0, I.nz, I.nx}, maxdims[3] = {H5S_UNLIMITED, I.nz, I.nx}, chunk[3] = {1, I.nz, I.nx};
            Hid sp(H5Screate_simple(3, dims, maxdims));
            Hid dcpl = creationPlist(H5P_DATASET_CREATE);
            if (!sp || H5Pset_chunk(dcpl.get(), 3, chunk) < 0) throw std::runtime_error("cannot set up /image/envelope");
            I.envelope = Hid(H5Dcreate2(g.get(), "envelope", H5T_IEEE_F32LE, sp.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT));
            if (!I.envelope) throw std::runtime_error("cannot create /image/envelope");
        } catch (const std::runtime_error& e) {
            if (dynamic_cast<const InputError*>(&e)) throw;
            throw InputError(path, "", e.what());
        }
    } catch (...) {
        I.envelope.reset();
        I.file.reset();
        std::remove(I.partial.c_str());
        delete impl_;
        throw;
    }
}

ImageWriter::~ImageWriter() {
    if (!impl_->finished) {
        std::lock_guard lock(hdf5Mutex());
        impl_->envelope.reset();
        impl_->file.reset();
        std::remove(impl_->partial.c_str());
    }
    delete impl_;
}

void ImageWriter::append(const float* envelope, size_t count) {
    Impl& I = *impl_;
    if (I.finished || !I.envelope) throw std::logic_error("ImageWriter::append after finish()");
    if (count != I.nx * I.nz)
        throw InputError(path_, "/image/envelope", "frame of " + std::to_string(count) + " values does not match N_z x N_x = " +
                                                       std::to_string(I.nz) + " x " + std::to_string(I.nx));
    std::lock_guard lock(hdf5Mutex());
    const hsize_t size[3] = {frames_ + 1, I.nz, I.nx}, start[3] = {frames_, 0, 0}, one[3] = {1, I.nz, I.nx};
    check(H5Dset_extent(I.envelope.get(), size), path_, "grow the dataset");
    Hid fsp(H5Dget_space(I.envelope.get()));
    Hid msp(H5Screate_simple(3, one, nullptr));
    check(H5Sselect_hyperslab(fsp.get(), H5S_SELECT_SET, start, nullptr, one, nullptr), path_, "select the frame");
    check(H5Dwrite(I.envelope.get(), H5T_NATIVE_FLOAT, msp.get(), fsp.get(), H5P_DEFAULT, envelope), path_, "write a frame");
    ++frames_;
}

void ImageWriter::setCaptureSha256(const std::string& sha256) { impl_->sha256 = sha256; }
void ImageWriter::setScanPositions(const std::vector<double>& scan_position_m) { impl_->scan_position_m = scan_position_m; }
void ImageWriter::setAcquisition(const AcquisitionFacts& facts) { impl_->acquisition = facts; }
void ImageWriter::setAxesInPixels(bool px) { impl_->axes_in_pixels = px; }

void ImageWriter::finish() {
    Impl& I = *impl_;
    if (I.finished) return;
    {
        std::lock_guard lock(hdf5Mutex());
        try {
            writeStringAttr(I.file.get(), "capture_sha256", I.sha256);
            if (!I.scan_position_m.empty()) {
                if (I.scan_position_m.size() != frames_) throw std::runtime_error("scan positions are not one per frame");
                Hid g(H5Gopen2(I.file.get(), "image", H5P_DEFAULT));
                writeDoubles(g.get(), "scan_position_m", I.scan_position_m.data(), {frames_});
            }
            const auto& a = I.acquisition;
            const std::pair<const char*, const std::optional<double>*> opt[] = {
                {"centre_frequency_hz", &a.centre_frequency_hz}, {"fractional_bandwidth", &a.fractional_bandwidth},
                {"speed_of_sound_m_s", &a.speed_of_sound_m_s},   {"array_x_min_m", &a.array_x_min_m},
                {"array_x_max_m", &a.array_x_max_m},             {"array_pitch_m", &a.array_pitch_m},
                {"elevation_beam_width_m", &a.elevation_beam_width_m},
        {"shear_speed_m_s", &a.shear_speed_m_s},             {"thickness_m", &a.thickness_m},
        {"wedge_speed_m_s", &a.wedge_speed_m_s},             {"wedge_origin_x_m", &a.wedge_origin_x_m},
        {"wedge_origin_z_m", &a.wedge_origin_z_m},           {"wedge_tilt_rad", &a.wedge_tilt_rad}};
            for (const auto& [name, v] : opt)
                if (*v) writeDoubleAttr(I.file.get(), name, **v);
            if (a.wedge) writeIntAttr(I.file.get(), "wedge", 1);
            if (I.axes_in_pixels) writeStringAttr(I.file.get(), "axes_unit", "px");
            if (!a.view_mode.empty()) writeStringAttr(I.file.get(), "view_mode", a.view_mode);
            if (!a.image_frame.empty()) writeStringAttr(I.file.get(), "image_frame", a.image_frame);
        } catch (const std::exception& e) {
            throw InputError(path_, "/", e.what());
        }
        I.envelope.reset();
        if (H5Fclose(I.file.get()) < 0) throw InputError(path_, "", "cannot finish writing the file (disk full?)");
        I.file = Hid();
    }
    std::error_code ec;
    std::filesystem::rename(I.partial, path_, ec);
    if (ec) throw InputError(path_, "", "cannot move the finished file into place: " + ec.message());
    I.finished = true;
}

void writeImageFile(const std::string& path, const ImageStack& img) {
    const size_t n = img.x_m.size() * img.z_m.size();
    if (img.envelope.size() != img.frames * n) throw InputError(path, "/image/envelope", "size does not match frames x N_z x N_x");
    ImageWriter w(path, img.x_m, img.z_m, img.recipe_json);
    for (size_t i = 0; i < img.frames; ++i) w.append(img.envelope.data() + i * n, n);
    w.setCaptureSha256(img.capture_sha256);
    w.setScanPositions(img.scan_position_m);
    w.setAcquisition(img.acquisition);
    w.setAxesInPixels(img.axes_in_pixels);
    w.finish();
}

namespace {
ImageStack readImage(const std::string& path, bool with_envelope) {
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
    // Pixel centres: finite and strictly increasing (x to the right, z downwards).
    for (auto [axis, v] : {std::pair{"/image/x_m", &*x}, std::pair{"/image/z_m", &*z}}) {
        for (size_t i = 0; i < v->size(); ++i) {
            if (!std::isfinite((*v)[i])) throw InputError(path, axis, "non-finite pixel centre");
            if (i > 0 && !((*v)[i] > (*v)[i - 1])) throw InputError(path, axis, "pixel centres must be strictly increasing");
        }
    }
    // Shape checked against the axes, a size bound and the bytes actually stored before anything
    // is allocated.
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
        dims = *d;
        Hid type(H5Dget_type(ds.get()));
        const size_t elem = type ? H5Tget_size(type.get()) : 0;
        double values = 1;
        for (hsize_t v : dims) values *= double(v);
        if (values > double(kMaxEnvelope))
            throw InputError(path, "/image/envelope", "declares " + std::to_string(static_cast<long long>(values)) +
                                                          " values, too large (the limit is " + std::to_string(kMaxEnvelope) + ")");
        if (elem > 0)
            if (auto problem = unwrittenData(ds.get(), dims, elem, "of image values")) throw InputError(path, "/image/envelope", *problem);
    }
    if (with_envelope) {
        auto e = readFloats(f.get(), "/image/envelope", 3, kMaxEnvelope, dims, err);
        if (!e) throw InputError(path, "/image/envelope", err);
        img.envelope = std::move(*e);
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
        {"elevation_beam_width_m", &acq.elevation_beam_width_m},
        {"shear_speed_m_s", &acq.shear_speed_m_s},             {"thickness_m", &acq.thickness_m},
        {"wedge_speed_m_s", &acq.wedge_speed_m_s},             {"wedge_origin_x_m", &acq.wedge_origin_x_m},
        {"wedge_origin_z_m", &acq.wedge_origin_z_m},           {"wedge_tilt_rad", &acq.wedge_tilt_rad}};
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
    if (attrExists(f.get(), "view_mode"))
        if (auto v = readStringAttr(f.get(), "view_mode", err)) acq.view_mode = *v;
    if (attrExists(f.get(), "image_frame")) {
        auto v = readStringAttr(f.get(), "image_frame", err);
        if (!v || (*v != "array" && *v != "specimen")) throw InputError(path, "/@image_frame", "must be \"array\" or \"specimen\"");
        acq.image_frame = *v;
    }
    if (attrExists(f.get(), "axes_unit")) {
        auto u = readStringAttr(f.get(), "axes_unit", err);
        if (!u || (*u != "px" && *u != "m")) throw InputError(path, "/@axes_unit", "must be 'm' or 'px'");
        img.axes_in_pixels = *u == "px";
    }
    img.x_m = *x;
    img.z_m = *z;
    img.frames = e_frames;
    return img;
}
}  // namespace

ImageStack readImageFile(const std::string& path) { return readImage(path, true); }
ImageStack readImageFileHeader(const std::string& path) { return readImage(path, false); }

}  // namespace umbra::core
