// SPDX-License-Identifier: MIT
// The DICOM module (libumbra_dicom.so), loaded on the first DICOM file: DCMTK's parser, decoders
// and writer stay out of the start-up of every command that reads no DICOM. core/dicom_image.cpp
// forwards to it through core/dicom/dicom_module.h.
#include "core/dicom_image.h"
#include "core/dicom/dicom_module.h"

#include <dcmtk/config/osconfig.h>
#include <dcmtk/dcmdata/dcdeftag.h>
#include <dcmtk/dcmdata/dcfilefo.h>
#include <dcmtk/dcmdata/dcistrmb.h>
#include <dcmtk/dcmdata/dcpixel.h>
#include <dcmtk/dcmdata/dcrledrg.h>
#include <dcmtk/dcmdata/dcsequen.h>
#include <dcmtk/dcmdata/dcuid.h>
#include <dcmtk/dcmdata/dcxfer.h>
#include <dcmtk/dcmjpeg/djdecode.h>
#include <dcmtk/oflog/oflog.h>

#include <algorithm>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <unistd.h>
#include <cstdio>
#include <fstream>
#include <memory>
#include <mutex>
#include <nlohmann/json.hpp>
#include <sstream>

#include "core/error.h"

namespace umbra::core {
namespace {

// DCMTK's codec registry and logger are process-wide; set them up once.
void initDcmtk() {
    static std::once_flag once;
    std::call_once(once, [] {
        OFLog::configure(OFLogger::OFF_LOG_LEVEL);
        // Decoded colour frames: YCbCr converted to RGB, colour-by-pixel (interleaved).
        DJDecoderRegistration::registerCodecs(EDC_photometricInterpretation, EUC_default, EPC_colorByPixel);
        DcmRLEDecoderRegistration::registerCodecs();
    });
}

// Transfer syntaxes whose pixels Umbra can read: the uncompressed ones, deflate (handled by
// the parser), and the JPEG processes and RLE that DCMTK decodes.
bool supportedTransfer(E_TransferSyntax ts) {
    switch (ts) {
        case EXS_LittleEndianImplicit:
        case EXS_LittleEndianExplicit:
        case EXS_BigEndianExplicit:
        case EXS_DeflatedLittleEndianExplicit:
        case EXS_JPEGProcess1:
        case EXS_JPEGProcess2_4:
        case EXS_JPEGProcess14:
        case EXS_JPEGProcess14SV1:
        case EXS_RLELossless: return true;
        default: return false;
    }
}

std::string str(DcmItem* ds, const DcmTagKey& key) {
    OFString v;
    if (ds->findAndGetOFStringArray(key, v).good()) return std::string(v.c_str());
    return {};
}

std::optional<long> integer(DcmItem* ds, const DcmTagKey& key) {
    // Signed and unsigned VRs alike (US, UL, SL, IS).
    Sint32 s;
    if (ds->findAndGetSint32(key, s).good()) return s;
    Uint32 u;
    if (ds->findAndGetUint32(key, u).good()) return long(u);
    Uint16 h;
    if (ds->findAndGetUint16(key, h).good()) return h;
    Sint16 sh;
    if (ds->findAndGetSint16(key, sh).good()) return sh;
    OFString is;
    if (ds->findAndGetOFString(key, is).good() && !is.empty()) {
        try {
            size_t used = 0;
            long v = std::stol(std::string(is.c_str()), &used);
            return v;
        } catch (...) {
        }
    }
    return std::nullopt;
}

std::optional<double> real(DcmItem* ds, const DcmTagKey& key) {
    Float64 d;
    if (ds->findAndGetFloat64(key, d).good() && std::isfinite(d)) return d;
    OFString s;  // DS (decimal string) values
    if (ds->findAndGetOFString(key, s).good() && !s.empty()) {
        try {
            double v = std::stod(std::string(s.c_str()));
            if (std::isfinite(v)) return v;
        } catch (...) {
        }
    }
    return std::nullopt;
}

bool mentionsSynthetic(const std::string& s) {
    std::string l = s;
    std::transform(l.begin(), l.end(), l.begin(), [](unsigned char c) { return char(std::tolower(c)); });
    return l.find("synthetic") != std::string::npos || l.find("simulat") != std::string::npos;
}

// Region calibration (PS3.3 C.8.5.5): the largest 2D region whose X and Y units are cm, with
// positive finite deltas and a location inside the frame. Reference pixel relative to the
// region's upper left corner (Region Location Min X0, Min Y0).
std::optional<DicomCalibration> calibrationFrom(DcmItem* ds, size_t rows, size_t cols, std::string& note) {
    DcmSequenceOfItems* seq = nullptr;
    if (ds->findAndGetSequence(DCM_SequenceOfUltrasoundRegions, seq).bad() || !seq || seq->card() == 0) {
        note = "no Sequence of Ultrasound Regions (0018,6011)";
        return std::nullopt;
    }
    std::optional<DicomCalibration> best;
    std::vector<std::string> why;
    for (unsigned long i = 0; i < seq->card() && i < 256; ++i) {
        DcmItem* it = seq->getItem(i);
        const std::string tag = "region " + std::to_string(i + 1) + ": ";
        auto x0 = integer(it, DCM_RegionLocationMinX0), y0 = integer(it, DCM_RegionLocationMinY0);
        auto x1 = integer(it, DCM_RegionLocationMaxX1), y1 = integer(it, DCM_RegionLocationMaxY1);
        auto ux = integer(it, DCM_PhysicalUnitsXDirection), uy = integer(it, DCM_PhysicalUnitsYDirection);
        auto dx = real(it, DCM_PhysicalDeltaX), dy = real(it, DCM_PhysicalDeltaY);
        auto fmt = integer(it, DCM_RegionSpatialFormat);
        if (!x0 || !y0 || !x1 || !y1) { why.push_back(tag + "no region location"); continue; }
        if (!ux || !uy || *ux != 3 || *uy != 3) { why.push_back(tag + "physical units are not cm (3) in x and y"); continue; }
        if (!dx || !dy || !(*dx > 0) || !(*dy > 0) || *dx > 10 || *dy > 10) {
            why.push_back(tag + "physical delta x/y missing, not positive or beyond 10 cm");
            continue;
        }
        if (fmt && *fmt != 1) { why.push_back(tag + "not a 2D region (spatial format " + std::to_string(*fmt) + ")"); continue; }
        if (*x0 < 0 || *y0 < 0 || *x1 < *x0 || *y1 < *y0 || size_t(*x1) >= cols || size_t(*y1) >= rows) {
            why.push_back(tag + "location outside the frame");
            continue;
        }
        const long rx = integer(it, DCM_ReferencePixelX0).value_or(0), ry = integer(it, DCM_ReferencePixelY0).value_or(0);
        const double px = real(it, DCM_ReferencePixelPhysicalValueX).value_or(0.0);
        const double py = real(it, DCM_ReferencePixelPhysicalValueY).value_or(0.0);
        DicomCalibration c;
        c.col0 = size_t(*x0);
        c.row0 = size_t(*y0);
        c.cols = size_t(*x1 - *x0 + 1);
        c.rows = size_t(*y1 - *y0 + 1);
        c.dx_m = *dx * 1e-2;
        c.dz_m = *dy * 1e-2;
        // Physical value at the region's corner pixel: reference value minus the steps to it.
        c.x0_m = (px - double(rx) * *dx) * 1e-2;
        c.z0_m = (py - double(ry) * *dy) * 1e-2;
        c.region_index = i;
        if (!std::isfinite(c.x0_m) || !std::isfinite(c.z0_m) || std::abs(c.x0_m) > 100 || std::abs(c.z0_m) > 100) {
            why.push_back(tag + "reference pixel physical values out of range");
            continue;
        }
        if (c.cols < 2 || c.rows < 2) { why.push_back(tag + "smaller than 2 x 2 pixels"); continue; }
        if (!best || c.cols * c.rows > best->cols * best->rows) best = c;
    }
    if (!best) {
        note.clear();
        for (auto& w : why) note += (note.empty() ? "" : "; ") + w;
        if (note.empty()) note = "no usable region";
    }
    return best;
}

DicomImage interpret(DcmFileFormat& ff, const std::string& name, uint64_t bytes_available) {
    DcmDataset* ds = ff.getDataset();
    DicomImage img;
    img.file = name;
    const E_TransferSyntax ts = ds->getOriginalXfer();
    DcmXfer xfer(ts);
    img.transfer_syntax = xfer.getXferID();
    img.sop_class_uid = str(ds, DCM_SOPClassUID);
    if (!supportedTransfer(ts))
        throw InputError(name, "(0002,0010)", std::string("transfer syntax ") + xfer.getXferName() + " (" + xfer.getXferID() +
                                                   ") is not supported (uncompressed, deflate, JPEG baseline/extended/lossless and RLE are)");
    DcmElement* pixel = nullptr;
    if (ds->findAndGetElement(DCM_PixelData, pixel).bad() || !pixel)
        throw InputError(name, "(7FE0,0010)", "no pixel data: not an image");
    auto rows = integer(ds, DCM_Rows), cols = integer(ds, DCM_Columns);
    if (!rows || !cols || *rows <= 0 || *cols <= 0) throw InputError(name, "(0028,0010)", "rows or columns missing or zero");
    const long frames = integer(ds, DCM_NumberOfFrames).value_or(1);
    const long spp = integer(ds, DCM_SamplesPerPixel).value_or(1);
    const long bits = integer(ds, DCM_BitsAllocated).value_or(0);
    const long planar = integer(ds, DCM_PlanarConfiguration).value_or(0);
    const long pixrep = integer(ds, DCM_PixelRepresentation).value_or(0);
    img.photometric = str(ds, DCM_PhotometricInterpretation);
    if (frames <= 0) throw InputError(name, "(0028,0008)", "number of frames must be at least 1");
    if (bits != 8) throw InputError(name, "(0028,0100)", "bits allocated " + std::to_string(bits) + ": only 8-bit images are supported");
    if (pixrep != 0) throw InputError(name, "(0028,0103)", "signed pixels are not supported");
    if (spp != 1 && spp != 3) throw InputError(name, "(0028,0002)", "samples per pixel must be 1 or 3, not " + std::to_string(spp));
    if (size_t(*rows) > DicomLimits::max_rows || size_t(*cols) > DicomLimits::max_columns)
        throw InputError(name, "(0028,0010)", std::to_string(*rows) + " x " + std::to_string(*cols) + " pixels is beyond the limit of " +
                                                  std::to_string(DicomLimits::max_rows) + " x " + std::to_string(DicomLimits::max_columns));
    if (size_t(frames) > DicomLimits::max_frames)
        throw InputError(name, "(0028,0008)", std::to_string(frames) + " frames is beyond the limit of " + std::to_string(DicomLimits::max_frames));
    const uint64_t frame_bytes = uint64_t(*rows) * uint64_t(*cols) * uint64_t(spp);
    const uint64_t total = frame_bytes * uint64_t(frames);
    if (total > DicomLimits::max_pixel_bytes)
        throw InputError(name, "(7FE0,0010)", "rows x columns x frames x samples = " + std::to_string(total) + " bytes is beyond the limit of " +
                                                  std::to_string(DicomLimits::max_pixel_bytes));
    const bool encapsulated = xfer.isEncapsulated();
    if (!encapsulated) {
        // Native pixels: the declared frames must be in the file.
        const uint64_t len = pixel->getLength();
        if (len < total || total > bytes_available)
            throw InputError(name, "(7FE0,0010)", "pixel data holds " + std::to_string(len) + " bytes but rows x columns x frames x samples = " +
                                                      std::to_string(total) + " (truncated file or wrong header)");
    } else if (bytes_available < uint64_t(frames)) {
        throw InputError(name, "(7FE0,0010)", "the file is too small for " + std::to_string(frames) + " compressed frames");
    }
    if (spp == 1 && img.photometric != "MONOCHROME2" && img.photometric != "MONOCHROME1")
        throw InputError(name, "(0028,0004)", "photometric interpretation '" + img.photometric + "' with one sample is not supported");
    if (spp == 3 && !encapsulated && img.photometric != "RGB")
        throw InputError(name, "(0028,0004)", "uncompressed colour must be RGB, not '" + img.photometric + "'");
    img.rows = size_t(*rows);
    img.columns = size_t(*cols);
    img.frames = size_t(frames);
    img.samples = size_t(spp);
    img.pixels.resize(size_t(total));
    // Frame by frame: native data copied, compressed data decoded into a buffer of one frame.
    Uint32 fsize = 0;
    if (pixel->getUncompressedFrameSize(ds, fsize).bad() || fsize < frame_bytes)
        throw InputError(name, "(7FE0,0010)", "cannot determine the frame size");
    std::vector<uint8_t> buf(size_t(fsize) + 1);
    Uint32 start = 0;
    for (size_t f = 0; f < img.frames; ++f) {
        OFString model;
        OFCondition st = pixel->getUncompressedFrame(ds, Uint32(f), start, buf.data(), Uint32(buf.size()), model);
        if (st.bad())
            throw InputError(name, "(7FE0,0010)", "frame " + std::to_string(f + 1) + " cannot be read: " + st.text() +
                                                      (encapsulated ? " (damaged compressed data)" : " (truncated file?)"));
        uint8_t* out = img.pixels.data() + f * frame_bytes;
        if (spp == 3 && planar == 1 && !encapsulated) {
            const size_t n = img.rows * img.columns;
            for (size_t p = 0; p < n; ++p)
                for (size_t s = 0; s < 3; ++s) out[p * 3 + s] = buf[s * n + p];
        } else {
            std::memcpy(out, buf.data(), size_t(frame_bytes));
        }
        if (encapsulated && spp == 3 && !model.empty() && model != "RGB")
            throw InputError(name, "(0028,0004)", "decoded colour model '" + std::string(model.c_str()) + "' is not RGB");
    }
    if (img.photometric == "MONOCHROME1")
        for (auto& v : img.pixels) v = uint8_t(255 - v);
    // Cine timing: Frame Time in ms, else Cine Rate in frames per second.
    if (auto ft = real(ds, DCM_FrameTime); ft && *ft > 0 && *ft < 1e6)
        img.frame_time_s = *ft * 1e-3;
    else if (auto cr = integer(ds, DCM_CineRate); cr && *cr > 0 && *cr < 100000)
        img.frame_time_s = 1.0 / double(*cr);
    img.description = str(ds, DCM_SeriesDescription);
    if (img.description.empty()) img.description = str(ds, DCM_StudyDescription);
    img.image_comments = str(ds, DCM_ImageComments);
    img.synthetic = mentionsSynthetic(img.description) || mentionsSynthetic(img.image_comments) ||
                    mentionsSynthetic(str(ds, DCM_StudyDescription));
    img.calibration = calibrationFrom(ds, img.rows, img.columns, img.calibration_note);
    return img;
}

std::string conditionText(const OFCondition& st) { return st.text() ? std::string(st.text()) : "unknown error"; }

}  // namespace

DicomImage moduleReadBuffer(const uint8_t* data, size_t size, const std::string& name) {
    initDcmtk();
    if (size < 8) throw InputError(name, "", "is too short to be DICOM (" + std::to_string(size) + " bytes)");
    // Read through a private temporary file, not a memory stream: from a memory stream the
    // parser allocates each element's declared length before it knows whether the bytes exist
    // (a 2.8 GB request from a 300-byte input); from a file, values longer than
    // DCM_MaxReadLength are left on disk and checked against the file size before use.
    std::string tmpl = (std::filesystem::temp_directory_path() / "umbra-dicom-XXXXXX").string();
    const int fd = mkstemp(tmpl.data());
    if (fd < 0) throw InputError(name, "", "cannot be read: no temporary file");
    struct Remove {
        std::string path;
        ~Remove() { std::remove(path.c_str()); }
    } remove{tmpl};
    size_t done = 0;
    while (done < size) {
        const ssize_t w = ::write(fd, data + done, size - done);
        if (w <= 0) break;
        done += size_t(w);
    }
    ::close(fd);
    if (done != size) throw InputError(name, "", "cannot be read: temporary file not written");
    DcmFileFormat ff;
    OFCondition st = ff.loadFile(OFFilename(tmpl.c_str()), EXS_Unknown, EGL_noChange, DCM_MaxReadLength, ERM_autoDetect);
    if (st.bad()) throw InputError(name, "", "cannot be parsed as DICOM (truncated or damaged): " + conditionText(st));
    return interpret(ff, name, size);
}

DicomImage moduleReadFile(const std::string& path) {
    initDcmtk();
    std::error_code ec;
    if (!std::filesystem::exists(path, ec)) throw InputError(path, "", "file does not exist");
    if (std::filesystem::is_directory(path, ec)) throw InputError(path, "", "is a directory, not a DICOM file");
    const auto size = std::filesystem::file_size(path, ec);
    if (ec) throw InputError(path, "", "cannot be read: " + ec.message());
    if (size < 8) throw InputError(path, "", "is too short to be DICOM (" + std::to_string(size) + " bytes)");
    DcmFileFormat ff;
    OFCondition st = ff.loadFile(OFFilename(path.c_str()), EXS_Unknown, EGL_noChange, DCM_MaxReadLength, ERM_autoDetect);
    if (st.bad()) throw InputError(path, "", "cannot be parsed as DICOM (truncated or damaged): " + conditionText(st));
    return interpret(ff, path, size);
}

void moduleWrite(const std::string& path, const std::vector<double>& x_m, const std::vector<double>& z_m, size_t frames,
                    size_t samples, const std::vector<uint8_t>& pixels, const DicomExportInfo& info) {
    initDcmtk();
    const size_t nx = x_m.size(), nz = z_m.size();
    if (frames == 0) throw SettingError("export-dicom: no frames to write");
    if (samples != 1 && samples != 3) throw SettingError("export-dicom: samples per pixel must be 1 or 3");
    if (nx < 2 || nz < 2) throw SettingError("export-dicom: the image needs at least 2 x 2 pixels");
    if (nx > 65535 || nz > 65535 || nx > DicomLimits::max_columns || nz > DicomLimits::max_rows)
        throw SettingError("export-dicom: " + std::to_string(nz) + " x " + std::to_string(nx) + " pixels is beyond the DICOM limit");
    if (pixels.size() != frames * nx * nz * samples) throw SettingError("export-dicom: pixel buffer does not match the frames and grid");
    if (uint64_t(pixels.size()) > 0xFFFFFFF0ull) throw SettingError("export-dicom: more than 4 GiB of pixels");
    const double dx = (x_m.back() - x_m.front()) / double(nx - 1), dz = (z_m.back() - z_m.front()) / double(nz - 1);
    for (size_t i = 1; i < nx; ++i)
        if (std::abs((x_m[i] - x_m[i - 1]) - dx) > 1e-3 * dx) throw SettingError("export-dicom: x pixel centres are not evenly spaced");
    for (size_t i = 1; i < nz; ++i)
        if (std::abs((z_m[i] - z_m[i - 1]) - dz) > 1e-3 * dz) throw SettingError("export-dicom: z pixel centres are not evenly spaced");
    if (!(dx > 0) || !(dz > 0)) throw SettingError("export-dicom: pixel centres must increase");

    DcmFileFormat ff;
    DcmDataset* ds = ff.getDataset();
    char study[100], series[100], instance[100];
    dcmGenerateUniqueIdentifier(study, SITE_STUDY_UID_ROOT);
    dcmGenerateUniqueIdentifier(series, SITE_SERIES_UID_ROOT);
    dcmGenerateUniqueIdentifier(instance, SITE_INSTANCE_UID_ROOT);
    const bool multi = frames > 1;
    const char* sop = multi ? UID_UltrasoundMultiframeImageStorage : UID_UltrasoundImageStorage;
    auto put = [&](const DcmTagKey& k, const std::string& v) {
        OFCondition st = ds->putAndInsertString(k, v.c_str());
        if (st.bad()) throw InputError(path, "", std::string("cannot set an attribute: ") + conditionText(st));
    };
    put(DCM_SpecificCharacterSet, "ISO_IR 192");  // UTF-8
    put(DCM_SOPClassUID, sop);
    put(DCM_SOPInstanceUID, instance);
    put(DCM_StudyInstanceUID, study);
    put(DCM_SeriesInstanceUID, series);
    put(DCM_Modality, "US");
    put(DCM_ImageType, "DERIVED\\SECONDARY");
    // Identifiers: the part id (never a person's name); empty when unknown.
    put(DCM_PatientName, info.part_id);
    put(DCM_PatientID, info.part_id);
    put(DCM_PatientBirthDate, "");
    put(DCM_PatientSex, "");
    put(DCM_StudyDate, "");
    put(DCM_StudyTime, "");
    put(DCM_AccessionNumber, "");
    put(DCM_ReferringPhysicianName, "");
    put(DCM_StudyID, "");
    put(DCM_SeriesNumber, "1");
    put(DCM_InstanceNumber, "1");
    put(DCM_Manufacturer, "Umbra");
    auto clip = [](std::string s, size_t n) { return s.size() > n ? s.substr(0, n) : s; };
    const std::string title = info.title.empty() ? "Umbra image" : info.title;
    put(DCM_StudyDescription, clip(title, 64));
    put(DCM_SeriesDescription, clip(std::string(info.synthetic ? "SYNTHETIC DATA - " : "") + title, 64));
    {
        nlohmann::ordered_json j;
        if (info.synthetic) j["synthetic"] = "synthetic data, simulated; not a recording";
        j["capture_sha256"] = info.capture_sha256;
        j["recipe"] = info.recipe_json;
        std::string comments = std::string(info.synthetic ? "SYNTHETIC DATA. " : "") + "Umbra export; " +
                               j.dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace);
        put(DCM_ImageComments, clip(comments, 10240));  // LT: up to 10240 characters
    }
    put(DCM_PatientOrientation, "");
    put(DCM_LossyImageCompression, "00");
    ds->putAndInsertUint16(DCM_SamplesPerPixel, Uint16(samples));
    put(DCM_PhotometricInterpretation, samples == 3 ? "RGB" : "MONOCHROME2");
    if (samples == 3) ds->putAndInsertUint16(DCM_PlanarConfiguration, 0);
    ds->putAndInsertUint16(DCM_Rows, Uint16(nz));
    ds->putAndInsertUint16(DCM_Columns, Uint16(nx));
    ds->putAndInsertUint16(DCM_BitsAllocated, 8);
    ds->putAndInsertUint16(DCM_BitsStored, 8);
    ds->putAndInsertUint16(DCM_HighBit, 7);
    ds->putAndInsertUint16(DCM_PixelRepresentation, 0);
    if (multi) {
        put(DCM_NumberOfFrames, std::to_string(frames));
        const double ft_ms = info.frame_time_s.value_or(0.1) * 1e3;
        std::ostringstream os;
        os.precision(8);
        os << ft_ms;
        put(DCM_FrameTime, os.str());
        ds->putAndInsertTagKey(DCM_FrameIncrementPointer, DCM_FrameTime);
    }
    // One region covering the frame: 2D tissue, cm in both directions, reference pixel at the
    // upper left corner with its physical position.
    DcmItem* region = nullptr;
    if (ds->findOrCreateSequenceItem(DCM_SequenceOfUltrasoundRegions, region, -2).bad() || !region)
        throw InputError(path, "", "cannot create the Sequence of Ultrasound Regions");
    region->putAndInsertUint32(DCM_RegionLocationMinX0, 0);
    region->putAndInsertUint32(DCM_RegionLocationMinY0, 0);
    region->putAndInsertUint32(DCM_RegionLocationMaxX1, Uint32(nx - 1));
    region->putAndInsertUint32(DCM_RegionLocationMaxY1, Uint32(nz - 1));
    region->putAndInsertUint16(DCM_RegionSpatialFormat, 1);
    region->putAndInsertUint16(DCM_RegionDataType, 1);
    region->putAndInsertUint32(DCM_RegionFlags, 0);
    region->putAndInsertUint16(DCM_PhysicalUnitsXDirection, 3);
    region->putAndInsertUint16(DCM_PhysicalUnitsYDirection, 3);
    region->putAndInsertSint32(DCM_ReferencePixelX0, 0);
    region->putAndInsertSint32(DCM_ReferencePixelY0, 0);
    region->putAndInsertFloat64(DCM_ReferencePixelPhysicalValueX, x_m.front() * 1e2);
    region->putAndInsertFloat64(DCM_ReferencePixelPhysicalValueY, z_m.front() * 1e2);
    region->putAndInsertFloat64(DCM_PhysicalDeltaX, dx * 1e2);
    region->putAndInsertFloat64(DCM_PhysicalDeltaY, dz * 1e2);
    OFCondition st = ds->putAndInsertUint8Array(DCM_PixelData, pixels.data(), Uint32(pixels.size()));
    if (st.bad()) throw InputError(path, "", "cannot store the pixels: " + conditionText(st));

    // Written beside the target, then renamed into place.
    const std::string partial = path + ".partial";
    st = ff.saveFile(OFFilename(partial.c_str()), EXS_LittleEndianExplicit, EET_ExplicitLength, EGL_recalcGL, EPD_noChange);
    if (st.bad()) {
        std::remove(partial.c_str());
        throw InputError(path, "", "cannot be written (folder missing or not writable?): " + conditionText(st));
    }
    std::error_code ec;
    std::filesystem::rename(partial, path, ec);
    if (ec) {
        std::remove(partial.c_str());
        throw InputError(path, "", "cannot move the finished file into place: " + ec.message());
    }
}

}  // namespace umbra::core

namespace {
using namespace umbra::core;
template <class F>
int guarded(UmbraDicomResult* res, F&& f) {
    try {
        f();
        return 0;
    } catch (const InputError& e) {
        res->kind = 1;
        res->file = e.file();
        res->problems = e.problems();
    } catch (const SettingError& e) {
        res->kind = 2;
        res->message = e.what();
    } catch (const std::exception& e) {
        res->kind = 3;
        res->message = e.what();
    }
    return res->kind;
}
}  // namespace

extern "C" __attribute__((visibility("default"))) int umbra_dicom_call(UmbraDicomRequest* req, UmbraDicomResult* res) {
    if (!req || !res || req->version != UMBRA_DICOM_MODULE_VERSION) return -1;
    return guarded(res, [&] {
        switch (req->op) {
            case UmbraDicomOp::ReadFile: *req->image = moduleReadFile(*req->path); break;
            case UmbraDicomOp::ReadBuffer: *req->image = moduleReadBuffer(req->data, req->size, *req->path); break;
            case UmbraDicomOp::Write:
                moduleWrite(*req->path, *req->x_m, *req->z_m, req->frames, req->samples, *req->pixels, *req->info);
                break;
        }
    });
}
