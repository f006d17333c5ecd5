// SPDX-License-Identifier: MIT
#pragma once
#include <array>
#include <cstdint>
#include <string>

namespace umbra::core {

/// Incremental SHA-256 (FIPS 180-4).
class Sha256 {
public:
    Sha256();
    /// Adds `n` bytes. Throws std::logic_error after digest() (the hash is finished).
    void update(const void* data, size_t n);
    /// The 32-byte digest of everything added so far; finishes the hash. Calling it again
    /// returns the same digest.
    std::array<uint8_t, 32> digest();
    /// digest() as 64 lower-case hex digits.
    std::string hexDigest();

private:
    void block(const uint8_t* p);
    void append(const uint8_t* p, size_t n);
    uint32_t h_[8];
    uint8_t buf_[64];
    size_t buf_len_ = 0;
    uint64_t total_ = 0;
    bool finished_ = false;
    std::array<uint8_t, 32> digest_{};
};

}  // namespace umbra::core
