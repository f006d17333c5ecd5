// SPDX-License-Identifier: MIT
#include "core/sha256.h"

#include <openssl/evp.h>

#include <stdexcept>

namespace umbra::core {

Sha256::Sha256() {
    auto* c = EVP_MD_CTX_new();
    if (!c || EVP_DigestInit_ex(c, EVP_sha256(), nullptr) != 1) {
        EVP_MD_CTX_free(c);
        throw std::runtime_error("SHA-256: the crypto library could not start a digest");
    }
    ctx_ = c;
}

Sha256::~Sha256() { EVP_MD_CTX_free(static_cast<EVP_MD_CTX*>(ctx_)); }

void Sha256::update(const void* data, size_t n) {
    if (finished_) throw std::logic_error("Sha256::update after digest()");
    if (n == 0) return;
    if (EVP_DigestUpdate(static_cast<EVP_MD_CTX*>(ctx_), data, n) != 1) throw std::runtime_error("SHA-256: digest update failed");
}

std::array<uint8_t, 32> Sha256::digest() {
    if (!finished_) {
        unsigned int len = 0;
        if (EVP_DigestFinal_ex(static_cast<EVP_MD_CTX*>(ctx_), digest_.data(), &len) != 1 || len != digest_.size())
            throw std::runtime_error("SHA-256: digest failed");
        finished_ = true;
    }
    return digest_;
}

std::string Sha256::hexDigest() {
    static const char* hex = "0123456789abcdef";
    const auto d = digest();
    std::string s(64, '0');
    for (size_t i = 0; i < d.size(); ++i) {
        s[2 * i] = hex[d[i] >> 4];
        s[2 * i + 1] = hex[d[i] & 15];
    }
    return s;
}

}  // namespace umbra::core
