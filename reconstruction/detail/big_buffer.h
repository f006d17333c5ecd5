// SPDX-License-Identifier: MIT
#pragma once
// Uninitialised float buffer for large per-frame working memory, 2 MiB aligned and marked for
// transparent huge pages where the system offers them (far fewer page faults on first touch).
#include <cstddef>
#include <cstdlib>
#include <new>
#if defined(__linux__)
#include <sys/mman.h>
#endif

namespace umbra::recon::detail {

class BigBuffer {
public:
    BigBuffer() = default;
    ~BigBuffer() { std::free(p_); }
    BigBuffer(const BigBuffer&) = delete;
    BigBuffer& operator=(const BigBuffer&) = delete;
    /// Replaces the buffer with `n` uninitialised floats.
    void reset(size_t n) {
        std::free(p_);
        p_ = nullptr;
        n_ = 0;
        if (n == 0) return;
        constexpr size_t align = size_t(2) << 20;
        const size_t bytes = (n * sizeof(float) + align - 1) / align * align;
        p_ = static_cast<float*>(std::aligned_alloc(align, bytes));
        if (!p_) throw std::bad_alloc();
#if defined(__linux__) && defined(MADV_HUGEPAGE)
        madvise(p_, bytes, MADV_HUGEPAGE);  // advice only; failure is harmless
#endif
        n_ = n;
    }
    float* get() const { return p_; }
    size_t size() const { return n_; }

private:
    float* p_ = nullptr;
    size_t n_ = 0;
};

}  // namespace umbra::recon::detail
