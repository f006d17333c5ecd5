// SPDX-License-Identifier: MIT
#pragma once
// Shared pieces of the libFuzzer targets: a per-process scratch file for readers that take a
// path (the HDF5 library reads files, so an input is written to disk first, on tmpfs when the
// machine has one).
#include <unistd.h>

#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <string>

namespace umbra::fuzz {

/// Writes `data` to a file private to this process and returns its path (same path each call).
inline const std::string& scratchFile(const uint8_t* data, size_t size, const char* ext) {
    static const std::string path = [&] {
        std::error_code ec;
        const std::filesystem::path dir = std::filesystem::is_directory("/dev/shm", ec) ? "/dev/shm" : std::filesystem::temp_directory_path();
        return (dir / ("umbra_fuzz_" + std::to_string(getpid()) + ext)).string();
    }();
    std::FILE* f = std::fopen(path.c_str(), "wb");
    if (!f) std::abort();
    if (size && std::fwrite(data, 1, size, f) != size) std::abort();
    std::fclose(f);
    return path;
}

/// Removes the scratch file when the fuzzer exits normally.
struct ScratchCleanup {
    std::string path;
    ~ScratchCleanup() {
        std::error_code ec;
        if (!path.empty()) std::filesystem::remove(path, ec);
    }
};

}  // namespace umbra::fuzz
