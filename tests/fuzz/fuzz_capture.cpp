// SPDX-License-Identifier: MIT
// libFuzzer target: the capture reader (HDF5 header, checks, first trace block). Any input must
// end in a clean InputError or a readable capture; a crash, hang, sanitizer report or allocation
// beyond the fuzzer's limit is a finding.
#include <cstdint>
#include <vector>

#include "core/capture_file.h"
#include "core/error.h"
#include "fuzz_support.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
    static umbra::fuzz::ScratchCleanup cleanup;
    const std::string& path = umbra::fuzz::scratchFile(data, size, ".h5");
    cleanup.path = path;
    try {
        umbra::core::CaptureReader r(path);
        const auto& h = r.header();
        // Read the first and last block when they are small (the reader's own bound is 1 GiB).
        if (h.frames > 0 && h.transmits() > 0 && h.blockSize() <= (size_t(1) << 22)) {
            std::vector<float> block(h.blockSize());
            r.readBlock(0, 0, block.data());
            r.readBlock(h.frames - 1, h.transmits() - 1, block.data());
        }
    } catch (const umbra::core::InputError&) {
    }
    return 0;
}
