// SPDX-License-Identifier: MIT
#pragma once
// Interface between core/dicom_image.cpp and the DICOM module libumbra_dicom.so (DCMTK inside),
// which is loaded with dlopen on the first DICOM file. Built by the same compiler from the same
// tree, so the request carries C++ objects; the module never lets an exception out.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "core/dicom_image.h"
#include "core/error.h"

#define UMBRA_DICOM_MODULE_VERSION 1
#define UMBRA_DICOM_CALL_SYMBOL "umbra_dicom_call"

enum class UmbraDicomOp { ReadFile, ReadBuffer, Write };

struct UmbraDicomRequest {
    int version = UMBRA_DICOM_MODULE_VERSION;
    UmbraDicomOp op = UmbraDicomOp::ReadFile;
    const std::string* path = nullptr;  ///< file (ReadFile, Write) or the name used in messages (ReadBuffer)
    const uint8_t* data = nullptr;      ///< ReadBuffer
    size_t size = 0;
    umbra::core::DicomImage* image = nullptr;  ///< ReadFile, ReadBuffer: filled
    const std::vector<double>* x_m = nullptr;  ///< Write
    const std::vector<double>* z_m = nullptr;
    size_t frames = 0, samples = 1;
    const std::vector<uint8_t>* pixels = nullptr;
    const umbra::core::DicomExportInfo* info = nullptr;
};

/// kind 0 success, 1 InputError (file, problems), 2 SettingError (message), 3 other (message).
struct UmbraDicomResult {
    int kind = 0;
    std::string file, message;
    std::vector<umbra::core::Problem> problems;
};

/// Returns UmbraDicomResult::kind, or -1 for a request of another version.
extern "C" {
typedef int (*UmbraDicomCallFn)(UmbraDicomRequest* req, UmbraDicomResult* res);
}
