// SPDX-License-Identifier: MIT
#pragma once
// Reader and writer for capture files, format v1 (HDF5). See docs/capture-format.md.
#include <memory>
#include <string>
#include <vector>

#include "core/capture.h"
#include "core/error.h"

namespace umbra::core {

/// Reads a capture. Opening reads and checks the header only; traces are streamed one
/// (frame, transmit) block at a time, so a capture larger than memory can be reconstructed.
///
///   CaptureReader r("weld.h5");            // throws InputError naming the file and problems
///   std::vector<float> block(r.header().blockSize());
///   r.readBlock(0, 3, block.data());       // frame 0, transmit 3: [N_rx][N_samples], scaled
class CaptureReader {
public:
    explicit CaptureReader(const std::string& path);
    ~CaptureReader();
    CaptureReader(CaptureReader&&) noexcept;
    CaptureReader& operator=(CaptureReader&&) noexcept;

    const CaptureHeader& header() const { return header_; }
    const std::string& path() const { return path_; }

    /// Reads traces of one transmit event of one frame into `out` (blockSize() floats,
    /// row-major [N_rx][N_samples]) with `scale` applied. Not thread-safe: one reader per thread,
    /// or serialise calls.
    void readBlock(size_t frame, size_t transmit, float* out) const;
    /// Convenience: all transmits of one frame, [N_tx][N_rx][N_samples].
    std::vector<float> readFrame(size_t frame) const;

    /// Opens, reads and checks everything; returns every problem found (empty = valid).
    /// Never throws for bad files.
    static std::vector<Problem> validate(const std::string& path);

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
    CaptureHeader header_;
    std::string path_;
};

/// Writes a capture. The file is written to "PATH.partial" and renamed on `finish()`, so a
/// reader never sees a half-written file.
///
///   CaptureWriter w("out.h5", header);      // header.frames/samples/sample_type set
///   for (f...) for (t...) w.writeBlock(f, t, block.data());
///   w.finish();
class CaptureWriter {
public:
    CaptureWriter(const std::string& path, const CaptureHeader& header);
    ~CaptureWriter();  ///< removes the partial file if finish() was not called
    CaptureWriter(const CaptureWriter&) = delete;
    CaptureWriter& operator=(const CaptureWriter&) = delete;

    /// Writes one block [N_rx][N_samples] of physical values (in rf_units). They are stored
    /// divided by header.rf_scale (the file holds counts; physical = count x scale); for int16
    /// captures also rounded and saturated to the int16 range.
    void writeBlock(size_t frame, size_t transmit, const float* data);
    void finish();

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
};

/// SHA-256 of a file's bytes, lowercase hex. Throws InputError if the file cannot be read.
std::string fileSha256(const std::string& path);

}  // namespace umbra::core
