// SPDX-License-Identifier: MIT
#include "core/capture_file.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <mutex>

#include "core/detail/h5.h"
#include "core/sha256.h"

namespace umbra::core {
using namespace detail;

namespace {

std::vector<Vec3> toVec3(const std::vector<double>& v) {
    std::vector<Vec3> out(v.size() / 3);
    for (size_t i = 0; i < out.size(); ++i) out[i] = {v[3 * i], v[3 * i + 1], v[3 * i + 2]};
    return out;
}

// HDF5 is not thread-safe in Debian's serial build: every call into it is serialised.
std::mutex& h5Mutex() { return hdf5Mutex(); }  // shared with image files

// A string from the file, safe to put into a one-line message: control and non-ASCII bytes
// become '?', and it is cut to 60 characters.
std::string printable(const std::string& s) {
    std::string out;
    for (unsigned char c : s.substr(0, 60)) out += (c >= 0x20 && c < 0x7f) ? char(c) : '?';
    return s.size() > 60 ? out + "..." : out;
}

// Opens a group; a missing required group or an object of another kind is a problem.
Hid openGroup(hid_t file, const char* path, bool required, std::vector<Problem>& P) {
    if (!exists(file, path)) {
        if (required) P.push_back({path, "group is missing"});
        return Hid();
    }
    H5O_info_t info;
    if (H5Oget_info_by_name2(file, path, &info, H5O_INFO_BASIC, H5P_DEFAULT) < 0 || info.type != H5O_TYPE_GROUP) {
        P.push_back({path, "is not a group"});
        return Hid();
    }
    Hid g(H5Gopen2(file, path, H5P_DEFAULT));
    if (!g) P.push_back({path, "group cannot be opened (file damaged?)"});
    return g;
}

struct HeaderParse {
    CaptureHeader h;
    std::vector<Problem> problems;
    Hid rf;  // open /data/rf on success
};

void parseHeader(hid_t file, HeaderParse& out) {
    auto& h = out.h;
    auto& P = out.problems;
    auto add = [&](std::string w, std::string m) { P.push_back({std::move(w), std::move(m)}); };
    std::string err;

    // Root
    auto fmt = readStringAttr(file, "umbra_format", err);
    if (!fmt) { add("/@umbra_format", err.empty() ? "is missing (not an Umbra capture?)" : err); return; }
    if (*fmt != "capture") { add("/@umbra_format", "is '" + printable(*fmt) + "'; expected 'capture'"); return; }
    auto ver = readIntAttr(file, "umbra_format_version", err);
    if (!ver) { add("/@umbra_format_version", err.empty() ? "is missing" : err); return; }
    if (*ver != 1) { add("/@umbra_format_version", "is " + std::to_string(*ver) + "; this program reads version 1"); return; }
    auto title = readStringAttr(file, "title", err);
    if (!title) add("/@title", err.empty() ? "is missing" : err); else h.title = *title;
    auto created = readStringAttr(file, "created_utc", err);
    if (!created) add("/@created_utc", err.empty() ? "is missing" : err); else h.created_utc = *created;

    std::vector<hsize_t> dims;
    // Array
    if (Hid g = openGroup(file, "/array", true, P); g) {
        // The bound is checked on the shape before anything is allocated.
        auto pos = readDoubles(g.get(), "element_position_m", 2, 3 * CaptureLimits::max_elements, dims, err);
        if (!pos) add("/array/element_position_m", err);
        else if (dims[1] != 3) add("/array/element_position_m", "must have shape [N_el, 3]");
        else if (dims[0] > CaptureLimits::max_elements) add("/array/element_position_m", std::to_string(dims[0]) + " elements is beyond the limit");
        else h.array.element_position_m = toVec3(*pos);
        auto cf = readDoubleAttr(g.get(), "centre_frequency_hz", err);
        if (!cf) add("/array@centre_frequency_hz", err.empty() ? "is missing" : err); else h.array.centre_frequency_hz = *cf;
        auto bw = readDoubleAttr(g.get(), "fractional_bandwidth", err);
        if (!bw) add("/array@fractional_bandwidth", err.empty() ? "is missing" : err); else h.array.fractional_bandwidth = *bw;
        auto w = readDoubleAttr(g.get(), "element_width_m", err);
        if (!w) add("/array@element_width_m", err.empty() ? "is missing" : err); else h.array.element_width_m = *w;
        auto eh = readDoubleAttr(g.get(), "element_height_m", err);
        if (eh) h.array.element_height_m = *eh; else if (!err.empty()) add("/array@element_height_m", err);
        err.clear();
        auto ew = readDoubleAttr(g.get(), "elevation_beam_width_m", err);
        if (ew) h.array.elevation_beam_width_m = *ew; else if (!err.empty()) add("/array@elevation_beam_width_m", err);
    }

    // Transmit
    bool tx_ok = false;  // the transmit list was read (its length can be compared with /data/rf)
    if (Hid g = openGroup(file, "/transmit", true, P); g) {
        auto kind = readStringAttr(g.get(), "kind", err);
        if (!kind) add("/transmit@kind", err.empty() ? "is missing" : err);
        else if (auto k = transmitKindFromString(*kind); !k)
            add("/transmit@kind", "is '" + printable(*kind) + "'; expected single_element, plane_wave or virtual_source");
        else {
            h.transmit.kind = *k;
            if (*k == TransmitKind::SingleElement) {
                auto v = readInts(g.get(), "source_element", 1, CaptureLimits::max_transmits, dims, err);
                if (!v) add("/transmit/source_element", err); else { h.transmit.source_element = *v; tx_ok = true; }
            } else if (*k == TransmitKind::PlaneWave) {
                auto v = readDoubles(g.get(), "angle_rad", 1, CaptureLimits::max_transmits, dims, err);
                if (!v) add("/transmit/angle_rad", err); else { h.transmit.angle_rad = *v; tx_ok = true; }
            } else {
                auto v = readDoubles(g.get(), "virtual_source_m", 2, 3 * CaptureLimits::max_transmits, dims, err);
                if (!v) add("/transmit/virtual_source_m", err);
                else if (dims[1] != 3) add("/transmit/virtual_source_m", "must have shape [N_tx, 3]");
                else { h.transmit.virtual_source_m = toVec3(*v); tx_ok = true; }
            }
        }
        // Optional [N_tx, N_el] tables: the shape must match exactly (not only the value count),
        // and nothing larger than that is ever allocated.
        const size_t ntx = h.transmit.count(), nel = h.array.elementCount();
        const size_t table_limit = std::max<size_t>(ntx, 1) * std::max<size_t>(nel, 1);
        const std::string want = "shape must be [N_tx, N_el] = [" + std::to_string(ntx) + ", " + std::to_string(nel) + "]";
        // Checks one table read (or failed) into `v`; true when it may be kept.
        auto tableOk = [&](const char* where, bool read) {
            if (!read) {
                const auto big = err.find(" is too large");
                add(where, big != std::string::npos ? err.substr(0, big) + " is not what the transmit list needs: " + want : err);
                return false;
            }
            if (dims[0] != ntx || dims[1] != nel) {
                add(where, "has shape [" + std::to_string(dims[0]) + ", " + std::to_string(dims[1]) + "]; " + want);
                return false;
            }
            return true;
        };
        // Without a readable transmit list and array there is nothing to check them against
        // (that problem is reported already), so they are not read.
        const bool can_check = tx_ok && nel > 0;
        if (can_check && exists(g.get(), "delay_s")) {
            auto v = readDoubles(g.get(), "delay_s", 2, table_limit, dims, err);
            if (tableOk("/transmit/delay_s", v.has_value())) h.transmit.delay_s = *v;
        }
        if (can_check && exists(g.get(), "apodization")) {
            auto v = readFloats(g.get(), "apodization", 2, table_limit, dims, err);
            if (tableOk("/transmit/apodization", v.has_value())) h.transmit.apodization = *v;
        }
    }

    // Receive
    bool rx_ok = false;
    if (Hid g = openGroup(file, "/receive", true, P); g) {
        auto idx = readInts(g.get(), "element_index", 1, CaptureLimits::max_elements, dims, err);
        if (!idx) add("/receive/element_index", err); else { h.receive.element_index = *idx; rx_ok = true; }
        auto fs = readDoubleAttr(g.get(), "sampling_frequency_hz", err);
        if (!fs) add("/receive@sampling_frequency_hz", err.empty() ? "is missing" : err); else h.receive.sampling_frequency_hz = *fs;
        auto st = readDoubles(g.get(), "start_time_s", 1, CaptureLimits::max_transmits, dims, err);
        if (!st) add("/receive/start_time_s", err); else h.receive.start_time_s = *st;
    }

    // Medium
    if (Hid g = openGroup(file, "/medium", true, P); g) {
        auto c = readDoubleAttr(g.get(), "speed_of_sound_m_s", err);
        if (!c) add("/medium@speed_of_sound_m_s", err.empty() ? "is missing" : err); else h.medium.speed_of_sound_m_s = *c;
        if (auto v = readDoubleAttr(g.get(), "shear_speed_m_s", err)) h.medium.shear_speed_m_s = *v;
        else if (!err.empty()) add("/medium@shear_speed_m_s", err);
        if (auto v = readDoubleAttr(g.get(), "attenuation_db_per_cm_mhz", err)) h.medium.attenuation_db_per_cm_mhz = *v;
        else if (!err.empty()) add("/medium@attenuation_db_per_cm_mhz", err);
        if (auto v = readDoubleAttr(g.get(), "thickness_m", err)) h.medium.thickness_m = *v;
        else if (!err.empty()) add("/medium@thickness_m", err);
        if (Hid w = openGroup(file, "/medium/wedge", false, P); w) {
            WedgeInfo wi;
            auto wc = readDoubleAttr(w.get(), "speed_of_sound_m_s", err);
            if (!wc) add("/medium/wedge@speed_of_sound_m_s", err.empty() ? "is missing" : err); else wi.speed_of_sound_m_s = *wc;
            auto so = readDoubleArrayAttr(w.get(), "surface_origin_m", 3, err);
            if (!so) add("/medium/wedge@surface_origin_m", err.empty() ? "is missing" : err); else wi.surface_origin_m = {(*so)[0], (*so)[1], (*so)[2]};
            auto tilt = readDoubleAttr(w.get(), "surface_tilt_rad", err);
            if (!tilt) add("/medium/wedge@surface_tilt_rad", err.empty() ? "is missing" : err); else wi.surface_tilt_rad = *tilt;
            h.medium.wedge = wi;
        }
    }

    // Scan, truth, provenance (optional)
    if (Hid g = openGroup(file, "/scan", false, P); g) {
        ScanInfo s;
        if (exists(g.get(), "position_m")) {
            auto v = readDoubles(g.get(), "position_m", 1, CaptureLimits::max_frames, dims, err);
            if (!v) add("/scan/position_m", err); else s.position_m = *v;
        }
        if (exists(g.get(), "time_s")) {
            auto v = readDoubles(g.get(), "time_s", 1, CaptureLimits::max_frames, dims, err);
            if (!v) add("/scan/time_s", err); else s.time_s = *v;
        }
        h.scan = s;
    }
    if (Hid g = openGroup(file, "/truth", false, P); g) {
        TruthInfo t;
        if (exists(g.get(), "scatterer_position_m")) {
            auto v = readDoubles(g.get(), "scatterer_position_m", 2, 3 * CaptureLimits::max_truth, dims, err);
            if (!v) add("/truth/scatterer_position_m", err);
            else if (dims[1] != 3) add("/truth/scatterer_position_m", "must have shape [K, 3]");
            else t.scatterer_position_m = toVec3(*v);
        }
        if (exists(g.get(), "scatterer_amplitude")) {
            auto v = readDoubles(g.get(), "scatterer_amplitude", 1, CaptureLimits::max_truth, dims, err);
            if (!v) add("/truth/scatterer_amplitude", err); else t.scatterer_amplitude = *v;
        }
        if (auto f = readStringAttr(g.get(), "frame", err)) t.frame = *f;
        if (auto rj = readStringAttr(g.get(), "regions_json", err)) t.regions_json = *rj;
        else if (!err.empty()) add("/truth@regions_json", err + " (expected a string holding a JSON list of regions)");
        h.truth = t;
    }
    if (Hid g = openGroup(file, "/provenance", false, P); g) {
        H5O_info_t info;
        if (H5Oget_info2(g.get(), &info, H5O_INFO_NUM_ATTRS) >= 0 && info.num_attrs < 1000) {
            for (hsize_t i = 0; i < info.num_attrs; ++i) {
                char name[256] = {0};
                if (H5Aget_name_by_idx(g.get(), ".", H5_INDEX_NAME, H5_ITER_INC, i, name, sizeof(name), H5P_DEFAULT) < 0) continue;
                if (auto s = readStringAttr(g.get(), name, err)) h.provenance[name] = *s;
                else if (auto d = readDoubleAttr(g.get(), name, err)) h.provenance[name] = std::to_string(*d);
            }
        }
    }

    // Data
    if (!exists(file, "/data/rf")) { add("/data/rf", "dataset is missing"); }
    else {
        Hid ds(H5Dopen2(file, "/data/rf", H5P_DEFAULT));
        if (!ds) { add("/data/rf", "is not a dataset"); return; }
        Hid t(H5Dget_type(ds.get()));
        auto cls = H5Tget_class(t.get());
        size_t sz = H5Tget_size(t.get());
        if (cls == H5T_INTEGER && sz == 2 && H5Tget_sign(t.get()) == H5T_SGN_2) h.sample_type = SampleType::Int16;
        else if (cls == H5T_FLOAT && sz == 4) h.sample_type = SampleType::Float32;
        else { add("/data/rf", "must be int16 or float32"); return; }
        auto d = datasetDims(ds.get(), err);
        if (!d) { add("/data/rf", err); return; }
        if (d->size() != 4) { add("/data/rf", "has rank " + std::to_string(d->size()) + "; expected [N_frames, N_tx, N_rx, N_samples]"); return; }
        h.frames = (*d)[0];
        h.samples = (*d)[3];
        {
            // A chunk is decompressed whole: bound it so a crafted layout cannot force gigabytes.
            Hid dcpl(H5Dget_create_plist(ds.get()));
            if (dcpl && H5Pget_layout(dcpl.get()) == H5D_CHUNKED) {
                hsize_t chunk[4] = {0, 0, 0, 0};
                if (H5Pget_chunk(dcpl.get(), 4, chunk) == 4) {
                    double bytes = double(sz);
                    for (hsize_t c : chunk) bytes *= double(c);
                    if (bytes > double(CaptureLimits::max_block_bytes))
                        add("/data/rf", "chunks of " + std::to_string(static_cast<long long>(bytes / (1 << 20))) + " MiB exceed the limit of " +
                                            std::to_string(CaptureLimits::max_block_bytes >> 20) + " MiB");
                }
            }
        }
        {
            // Traces that were never written read back as fill values, slowly for a large claim
            // (a damaged file may claim 2^20 frames of which nothing is stored): refuse at once.
            // Sizes beyond CaptureLimits are reported by checkHeader with their own message.
            const bool within_limits = (*d)[0] <= CaptureLimits::max_frames && (*d)[3] <= CaptureLimits::max_samples;
            if (within_limits)
                if (auto problem = unwrittenData(ds.get(), *d, sz, "of traces")) add("/data/rf", *problem);
        }
        if (tx_ok && (*d)[1] != h.transmit.count())
            add("/data/rf", "has " + std::to_string((*d)[1]) + " transmit events; /transmit lists " + std::to_string(h.transmit.count()));
        if (rx_ok && (*d)[2] != h.receive.element_index.size())
            add("/data/rf", "has " + std::to_string((*d)[2]) + " receive channels; /receive/element_index lists " + std::to_string(h.receive.element_index.size()));
        if (auto s = readDoubleAttr(ds.get(), "scale", err)) h.rf_scale = *s;
        else if (!err.empty()) add("/data/rf@scale", err);
        if (auto u = readStringAttr(ds.get(), "units", err)) h.rf_units = *u;
        out.rf = std::move(ds);
    }
    if (!P.empty()) return;
    for (auto& p : checkHeader(h)) P.push_back(p);
}

Hid openFile(const std::string& path) {
    std::error_code ec;
    if (!std::filesystem::exists(path, ec)) throw InputError(path, "", "file does not exist");
    if (std::filesystem::is_directory(path, ec)) throw InputError(path, "", "is a directory, not a capture file");
    if (H5Fis_hdf5(path.c_str()) <= 0)
        throw InputError(path, "", "is not an HDF5 file (or is truncated or damaged)");
    Hid f(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT));
    if (!f) throw InputError(path, "", "cannot be opened as HDF5 (truncated or damaged?)");
    return f;
}
}  // namespace

struct CaptureReader::Impl {
    Hid file;
    Hid rf;
};

CaptureReader::CaptureReader(const std::string& path) : impl_(std::make_unique<Impl>()), path_(path) {
    std::lock_guard lock(h5Mutex());
    silenceHdf5();
    impl_->file = openFile(path);
    HeaderParse hp;
    parseHeader(impl_->file.get(), hp);
    if (!hp.problems.empty()) throw InputError(path, hp.problems);
    header_ = std::move(hp.h);
    impl_->rf = std::move(hp.rf);
}

CaptureReader::~CaptureReader() {
    if (!impl_) return;
    std::lock_guard lock(h5Mutex());
    impl_.reset();
}
CaptureReader::CaptureReader(CaptureReader&&) noexcept = default;
CaptureReader& CaptureReader::operator=(CaptureReader&&) noexcept = default;

void CaptureReader::readBlock(size_t frame, size_t transmit, float* out) const {
    const auto& h = header_;
    if (frame >= h.frames || transmit >= h.transmits())
        throw InputError(path_, "/data/rf", "block (frame " + std::to_string(frame) + ", transmit " +
                                                std::to_string(transmit) + ") is outside the capture");
    std::lock_guard lock(h5Mutex());
    Hid space(H5Dget_space(impl_->rf.get()));
    hsize_t start[4] = {frame, transmit, 0, 0};
    hsize_t count[4] = {1, 1, h.receives(), h.samples};
    if (H5Sselect_hyperslab(space.get(), H5S_SELECT_SET, start, nullptr, count, nullptr) < 0)
        throw InputError(path_, "/data/rf", "cannot select a block");
    hsize_t mdims[2] = {h.receives(), h.samples};
    Hid mem(H5Screate_simple(2, mdims, nullptr));
    if (H5Dread(impl_->rf.get(), H5T_NATIVE_FLOAT, mem.get(), space.get(), H5P_DEFAULT, out) < 0)
        throw InputError(path_, "/data/rf", "cannot read frame " + std::to_string(frame) + ", transmit " +
                                                std::to_string(transmit) + " (file truncated or damaged?)");
    if (h.rf_scale != 1.0) {
        const float s = float(h.rf_scale);
        for (size_t i = 0, n = h.blockSize(); i < n; ++i) out[i] *= s;
    }
}

std::vector<float> CaptureReader::readFrame(size_t frame) const {
    std::vector<float> all(header_.transmits() * header_.blockSize());
    for (size_t t = 0; t < header_.transmits(); ++t) readBlock(frame, t, all.data() + t * header_.blockSize());
    return all;
}

std::vector<Problem> CaptureReader::validate(const std::string& path) {
    try {
        CaptureReader r(path);
        // Check the traces themselves: every block readable and finite.
        std::vector<float> block(r.header().blockSize());
        for (size_t f = 0; f < r.header().frames; ++f)
            for (size_t t = 0; t < r.header().transmits(); ++t) {
                r.readBlock(f, t, block.data());
                for (float v : block)
                    if (!std::isfinite(v))
                        return {{"/data/rf", "frame " + std::to_string(f) + ", transmit " + std::to_string(t) +
                                                 " holds a non-finite sample"}};
            }
        return {};
    } catch (const InputError& e) {
        return e.problems();
    } catch (const std::exception& e) {
        return {{"", e.what()}};
    }
}

// ---------------------------------------------------------------------------------------------
struct CaptureWriter::Impl {
    std::string path, partial;
    CaptureHeader h;
    Hid file, rf;
    bool finished = false;
};

CaptureWriter::CaptureWriter(const std::string& path, const CaptureHeader& header) : impl_(std::make_unique<Impl>()) {
    auto problems = checkHeader(header);
    if (!problems.empty()) throw InputError(path, problems);
    std::lock_guard lock(h5Mutex());
    silenceHdf5();
    auto& I = *impl_;
    I.path = path;
    I.partial = path + ".partial";
    I.h = header;
    const auto& h = header;
    // File-format objects of HDF5 1.8 and later: object headers and other metadata carry
    // checksums, so damage to them is detected when read instead of being interpreted
    // (readable by HDF5 1.8 and later, h5py included).
    Hid fapl(H5Pcreate(H5P_FILE_ACCESS));
    H5Pset_libver_bounds(fapl.get(), H5F_LIBVER_V18, H5F_LIBVER_V18);
    I.file = Hid(H5Fcreate(I.partial.c_str(), H5F_ACC_TRUNC, H5P_DEFAULT, fapl.get()));
    if (!I.file) throw InputError(path, "", "cannot create the file (directory missing or not writable?)");
    try {
        hid_t f = I.file.get();
        writeStringAttr(f, "umbra_format", "capture");
        writeIntAttr(f, "umbra_format_version", 1);
        writeStringAttr(f, "title", h.title);
        writeStringAttr(f, "created_utc", h.created_utc);

        const size_t nel = h.array.elementCount(), ntx = h.transmits(), nrx = h.receives();
        {
            Hid g = createGroup(f, "array");
            std::vector<double> pos;
            for (auto& p : h.array.element_position_m) pos.insert(pos.end(), p.begin(), p.end());
            writeDoubles(g.get(), "element_position_m", pos.data(), {nel, 3});
            writeDoubleAttr(g.get(), "centre_frequency_hz", h.array.centre_frequency_hz);
            writeDoubleAttr(g.get(), "fractional_bandwidth", h.array.fractional_bandwidth);
            writeDoubleAttr(g.get(), "element_width_m", h.array.element_width_m);
            if (h.array.element_height_m) writeDoubleAttr(g.get(), "element_height_m", *h.array.element_height_m);
            if (h.array.elevation_beam_width_m) writeDoubleAttr(g.get(), "elevation_beam_width_m", *h.array.elevation_beam_width_m);
        }
        {
            Hid g = createGroup(f, "transmit");
            writeStringAttr(g.get(), "kind", toString(h.transmit.kind));
            if (h.transmit.kind == TransmitKind::SingleElement)
                writeInts(g.get(), "source_element", h.transmit.source_element.data(), {ntx});
            else if (h.transmit.kind == TransmitKind::PlaneWave)
                writeDoubles(g.get(), "angle_rad", h.transmit.angle_rad.data(), {ntx});
            else {
                std::vector<double> v;
                for (auto& p : h.transmit.virtual_source_m) v.insert(v.end(), p.begin(), p.end());
                writeDoubles(g.get(), "virtual_source_m", v.data(), {ntx, 3});
            }
            if (!h.transmit.delay_s.empty()) writeDoubles(g.get(), "delay_s", h.transmit.delay_s.data(), {ntx, nel});
            if (!h.transmit.apodization.empty()) writeFloats(g.get(), "apodization", h.transmit.apodization.data(), {ntx, nel});
        }
        {
            Hid g = createGroup(f, "receive");
            writeInts(g.get(), "element_index", h.receive.element_index.data(), {nrx});
            writeDoubleAttr(g.get(), "sampling_frequency_hz", h.receive.sampling_frequency_hz);
            writeDoubles(g.get(), "start_time_s", h.receive.start_time_s.data(), {ntx});
        }
        {
            Hid g = createGroup(f, "medium");
            writeDoubleAttr(g.get(), "speed_of_sound_m_s", h.medium.speed_of_sound_m_s);
            if (h.medium.shear_speed_m_s) writeDoubleAttr(g.get(), "shear_speed_m_s", *h.medium.shear_speed_m_s);
            if (h.medium.attenuation_db_per_cm_mhz) writeDoubleAttr(g.get(), "attenuation_db_per_cm_mhz", *h.medium.attenuation_db_per_cm_mhz);
            if (h.medium.thickness_m) writeDoubleAttr(g.get(), "thickness_m", *h.medium.thickness_m);
            if (h.medium.wedge) {
                Hid w = createGroup(g.get(), "wedge");
                writeDoubleAttr(w.get(), "speed_of_sound_m_s", h.medium.wedge->speed_of_sound_m_s);
                const auto& o = h.medium.wedge->surface_origin_m;
                writeDoubleArrayAttr(w.get(), "surface_origin_m", {o[0], o[1], o[2]});
                writeDoubleAttr(w.get(), "surface_tilt_rad", h.medium.wedge->surface_tilt_rad);
            }
        }
        if (h.scan) {
            Hid g = createGroup(f, "scan");
            if (!h.scan->position_m.empty()) writeDoubles(g.get(), "position_m", h.scan->position_m.data(), {h.scan->position_m.size()});
            if (!h.scan->time_s.empty()) writeDoubles(g.get(), "time_s", h.scan->time_s.data(), {h.scan->time_s.size()});
        }
        if (h.truth) {
            Hid g = createGroup(f, "truth");
            std::vector<double> v;
            for (auto& p : h.truth->scatterer_position_m) v.insert(v.end(), p.begin(), p.end());
            writeDoubles(g.get(), "scatterer_position_m", v.data(), {h.truth->scatterer_position_m.size(), 3});
            writeDoubles(g.get(), "scatterer_amplitude", h.truth->scatterer_amplitude.data(), {h.truth->scatterer_amplitude.size()});
            if (!h.truth->frame.empty()) writeStringAttr(g.get(), "frame", h.truth->frame);
            if (!h.truth->regions_json.empty()) writeStringAttr(g.get(), "regions_json", h.truth->regions_json);
        }
        if (!h.provenance.empty()) {
            Hid g = createGroup(f, "provenance");
            for (auto& [k, v] : h.provenance) writeStringAttr(g.get(), k, v);
        }
        {
            Hid g = createGroup(f, "data");
            hsize_t dims[4] = {h.frames, ntx, nrx, h.samples};
            hsize_t chunk[4] = {1, 1, nrx, h.samples};
            Hid sp(H5Screate_simple(4, dims, nullptr));
            Hid dcpl(H5Pcreate(H5P_DATASET_CREATE));
            H5Pset_chunk(dcpl.get(), 4, chunk);
            hid_t ft = h.sample_type == SampleType::Int16 ? H5T_STD_I16LE : H5T_IEEE_F32LE;
            I.rf = Hid(H5Dcreate2(g.get(), "rf", ft, sp.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT));
            if (!I.rf) throw std::runtime_error("cannot create /data/rf");
            if (h.rf_scale != 1.0 || h.sample_type == SampleType::Int16) writeDoubleAttr(I.rf.get(), "scale", h.rf_scale);
            if (!h.rf_units.empty()) writeStringAttr(I.rf.get(), "units", h.rf_units);
        }
    } catch (const std::exception& e) {
        I.rf.reset();
        I.file.reset();
        std::remove(I.partial.c_str());
        throw InputError(path, "", e.what());
    }
}

CaptureWriter::~CaptureWriter() {
    if (!impl_) return;
    std::lock_guard lock(h5Mutex());
    if (!impl_->finished) {
        impl_->rf.reset();
        impl_->file.reset();
        std::remove(impl_->partial.c_str());
    }
}

void CaptureWriter::writeBlock(size_t frame, size_t transmit, const float* data) {
    auto& I = *impl_;
    const auto& h = I.h;
    if (frame >= h.frames || transmit >= h.transmits())
        throw InputError(I.path, "/data/rf", "block outside the declared shape");
    const size_t n = h.blockSize();
    std::vector<int16_t> q;
    const void* src = data;
    hid_t mt = H5T_NATIVE_FLOAT;
    std::vector<float> scaled;
    if (h.sample_type == SampleType::Float32 && h.rf_scale != 1.0) {
        // Stored values are in units of `scale` for float32 too (the reader multiplies back).
        scaled.resize(n);
        const double inv = 1.0 / h.rf_scale;
        for (size_t i = 0; i < n; ++i) scaled[i] = float(double(data[i]) * inv);
        src = scaled.data();
    }
    if (h.sample_type == SampleType::Int16) {
        q.resize(n);
        const double inv = 1.0 / h.rf_scale;
        for (size_t i = 0; i < n; ++i) {
            double v = std::round(double(data[i]) * inv);
            q[i] = int16_t(std::clamp(v, -32768.0, 32767.0));
        }
        src = q.data();
        mt = H5T_NATIVE_INT16;
    }
    std::lock_guard lock(h5Mutex());
    Hid space(H5Dget_space(I.rf.get()));
    hsize_t start[4] = {frame, transmit, 0, 0};
    hsize_t count[4] = {1, 1, h.receives(), h.samples};
    H5Sselect_hyperslab(space.get(), H5S_SELECT_SET, start, nullptr, count, nullptr);
    hsize_t mdims[2] = {h.receives(), h.samples};
    Hid mem(H5Screate_simple(2, mdims, nullptr));
    if (H5Dwrite(I.rf.get(), mt, mem.get(), space.get(), H5P_DEFAULT, src) < 0)
        throw InputError(I.path, "/data/rf", "write failed (disk full?)");
}

void CaptureWriter::finish() {
    auto& I = *impl_;
    {
        std::lock_guard lock(h5Mutex());
        I.rf.reset();
        if (H5Fflush(I.file.get(), H5F_SCOPE_GLOBAL) < 0) throw InputError(I.path, "", "flush failed (disk full?)");
        I.file.reset();
    }
    std::error_code ec;
    std::filesystem::rename(I.partial, I.path, ec);
    if (ec) throw InputError(I.path, "", "cannot move the finished file into place: " + ec.message());
    I.finished = true;
}

std::string fileSha256(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path, "", "cannot be read");
    Sha256 s;
    std::vector<char> buf(1 << 20);
    while (in) {
        in.read(buf.data(), std::streamsize(buf.size()));
        s.update(buf.data(), size_t(in.gcount()));
    }
    return s.hexDigest();
}

}  // namespace umbra::core
