// SPDX-License-Identifier: MIT
#include "core/dicom_image.h"

#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <mutex>
#include <nlohmann/json.hpp>

#include "core/detail/module_loader.h"
#include "core/dicom/dicom_module.h"
#include "core/error.h"

namespace umbra::core {
namespace {
namespace fs = std::filesystem;

UmbraDicomCallFn loadModule(std::string& why) {
#ifdef UMBRA_DICOM_MODULE_BUILD_PATH
    const char* build_path = UMBRA_DICOM_MODULE_BUILD_PATH;
#else
    const char* build_path = "";
#endif
    const detail::ModuleSpec spec{"DICOM module", "libumbra_dicom.so", "UMBRA_DICOM_MODULE", build_path, UMBRA_DICOM_CALL_SYMBOL};
    return reinterpret_cast<UmbraDicomCallFn>(detail::loadModuleSymbol(spec, why));
}

// Runs one request in the module and turns its outcome back into the error it stands for.
void call(UmbraDicomRequest& req, const std::string& name) {
    std::string why;
    UmbraDicomCallFn fn = loadModule(why);
    if (!fn) throw InputError(name, "", "DICOM support is not available: " + why);
    UmbraDicomResult res;
    const int rc = fn(&req, &res);
    if (rc == 0) return;
    if (rc == 1) throw InputError(res.file, res.problems);
    if (rc == 2) throw SettingError(res.message);
    if (rc < 0) throw InputError(name, "", "the DICOM module does not match this program (version)");
    throw std::runtime_error(res.message);
}
}  // namespace

double DicomImage::grey(size_t f, size_t r, size_t c) const {
    const uint8_t* p = pixels.data() + ((f * rows + r) * columns + c) * samples;
    if (samples == 1) return p[0];
    // ITU-R BT.601 luma weights.
    return 0.299 * p[0] + 0.587 * p[1] + 0.114 * p[2];
}

void DicomImage::rgb(size_t f, size_t r, size_t c, uint8_t out[3]) const {
    const uint8_t* p = pixels.data() + ((f * rows + r) * columns + c) * samples;
    for (int s = 0; s < 3; ++s) out[s] = samples == 1 ? p[0] : p[s];
}

ImageStack DicomImage::toImageStack() const {
    ImageStack st;
    size_t c0 = 0, r0 = 0, nc = columns, nr = rows;
    if (calibration) {
        c0 = calibration->col0;
        r0 = calibration->row0;
        nc = calibration->cols;
        nr = calibration->rows;
        for (size_t i = 0; i < nc; ++i) st.x_m.push_back(calibration->x0_m + double(i) * calibration->dx_m);
        for (size_t i = 0; i < nr; ++i) st.z_m.push_back(calibration->z0_m + double(i) * calibration->dz_m);
    } else {
        st.axes_in_pixels = true;
        for (size_t i = 0; i < nc; ++i) st.x_m.push_back(double(i));
        for (size_t i = 0; i < nr; ++i) st.z_m.push_back(double(i));
    }
    st.frames = frames;
    st.envelope.resize(frames * nc * nr);
    for (size_t f = 0; f < frames; ++f)
        for (size_t r = 0; r < nr; ++r)
            for (size_t c = 0; c < nc; ++c) st.envelope[(f * nr + r) * nc + c] = float(grey(f, r0 + r, c0 + c));
    nlohmann::ordered_json j;
    j["source"] = "dicom";
    j["values"] = samples == 3 ? "grey level 0-255 (BT.601 luminance of RGB), display values, not a linear envelope"
                               : "grey level 0-255, display values, not a linear envelope";
    j["photometric"] = photometric;
    j["transfer_syntax"] = transfer_syntax;
    j["calibrated"] = calibration.has_value();
    if (!calibration) j["calibration_note"] = calibration_note;
    if (frame_time_s) j["frame_time_s"] = *frame_time_s;
    if (!description.empty()) j["description"] = description;
    if (synthetic) j["synthetic"] = true;
    st.recipe_json = j.dump(2, ' ', false, nlohmann::ordered_json::error_handler_t::replace);
    return st;
}

bool looksLikeDicom(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    char b[132] = {};
    if (!in.read(b, 132)) return false;
    return std::memcmp(b + 128, "DICM", 4) == 0;
}

DicomImage readDicomBuffer(const uint8_t* data, size_t size, const std::string& name) {
    DicomImage img;
    UmbraDicomRequest req;
    req.op = UmbraDicomOp::ReadBuffer;
    req.path = &name;
    req.data = data;
    req.size = size;
    req.image = &img;
    call(req, name);
    return img;
}

DicomImage readDicomFile(const std::string& path) {
    DicomImage img;
    UmbraDicomRequest req;
    req.op = UmbraDicomOp::ReadFile;
    req.path = &path;
    req.image = &img;
    call(req, path);
    return img;
}

int fuzzDicomBuffer(const uint8_t* data, size_t size) {
    try {
        DicomImage img = readDicomBuffer(data, size, "<fuzz input>");
        (void)img.toImageStack();
    } catch (const InputError&) {
    }
    return 0;
}

void writeDicomFile(const std::string& path, const std::vector<double>& x_m, const std::vector<double>& z_m, size_t frames,
                    size_t samples, const std::vector<uint8_t>& pixels, const DicomExportInfo& info) {
    UmbraDicomRequest req;
    req.op = UmbraDicomOp::Write;
    req.path = &path;
    req.x_m = &x_m;
    req.z_m = &z_m;
    req.frames = frames;
    req.samples = samples;
    req.pixels = &pixels;
    req.info = &info;
    call(req, path);
}

}  // namespace umbra::core
