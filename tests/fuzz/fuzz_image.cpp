// SPDX-License-Identifier: MIT
// libFuzzer target: the image file reader (HDF5, as written by `umbra-cli reconstruct`).
#include <cstdint>

#include "core/error.h"
#include "core/frame.h"
#include "fuzz_support.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
    static umbra::fuzz::ScratchCleanup cleanup;
    const std::string& path = umbra::fuzz::scratchFile(data, size, ".h5");
    cleanup.path = path;
    try {
        (void)umbra::core::readImageFileHeader(path);
        (void)umbra::core::readImageFile(path);
    } catch (const umbra::core::InputError&) {
    }
    return 0;
}
