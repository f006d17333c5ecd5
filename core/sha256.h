// SPDX-License-Identifier: MIT
#pragma once
#include <array>
#include <cstdint>
#include <string>

namespace umbra::core {

/// Incremental SHA-256 (FIPS 180-4), computed by OpenSSL's libcrypto (which uses the CPU's SHA
/// extensions where present).
class Sha256 {
public:
    Sha256();
    ~Sha256();
    Sha256(const Sha256&) = delete;
    Sha256& operator=(const Sha256&) = delete;
    /// Adds `n` bytes. Throws std::logic_error after digest() (the hash is finished).
    void update(const void* data, size_t n);
    /// The 32-byte digest of everything added so far; finishes the hash. Calling it again
    /// returns the same digest.
    std::array<uint8_t, 32> digest();
    /// digest() as 64 lower-case hex digits.
    std::string hexDigest();

private:
    void* ctx_ = nullptr;  // EVP_MD_CTX
    bool finished_ = false;
    std::array<uint8_t, 32> digest_{};
};

}  // namespace umbra::core
