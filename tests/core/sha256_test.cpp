// SPDX-License-Identifier: MIT
// SHA-256 against the test vectors of FIPS 180-2, appendix B (B.1 "abc", B.2 the 448-bit
// message, B.3 one million 'a'), and the empty message (FIPS 180-2 padding; digest as
// computed with Debian's sha256sum). The FIPS digests were also re-checked with sha256sum.
#include <gtest/gtest.h>

#include <stdexcept>
#include <string>

#include "core/sha256.h"

using umbra::core::Sha256;

namespace {
std::string sha(const std::string& s) {
    Sha256 h;
    h.update(s.data(), s.size());
    return h.hexDigest();
}
}  // namespace

TEST(Sha256, Fips180_2_B1_abc) {
    EXPECT_EQ(sha("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

TEST(Sha256, Fips180_2_B2_448BitMessage) {
    EXPECT_EQ(sha("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
              "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST(Sha256, Fips180_2_B3_OneMillionA) {
    // Fed in uneven pieces so that the block buffering is exercised.
    Sha256 h;
    const std::string a(1000000, 'a');
    size_t pos = 0, step = 1;
    while (pos < a.size()) {
        size_t n = std::min(step, a.size() - pos);
        h.update(a.data() + pos, n);
        pos += n;
        step = step * 3 % 1009 + 1;
    }
    EXPECT_EQ(h.hexDigest(), "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST(Sha256, EmptyMessage) {
    EXPECT_EQ(sha(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

TEST(Sha256, PaddingBoundaries55_56_64Bytes) {
    // Messages whose padding needs one or two blocks; digests from Debian's sha256sum
    // (head -c N /dev/zero | tr '\0' a | sha256sum).
    EXPECT_EQ(sha(std::string(55, 'a')), "9f4390f8d30c2dd92ec9f095b65e2b9ae9b0a925a5258e241c9f1e910f734318");
    EXPECT_EQ(sha(std::string(56, 'a')), "b35439a4ac6f0948b6d6f9e3c6af0f5f590ce20f1bde7090ef7970686ec6738a");
    EXPECT_EQ(sha(std::string(64, 'a')), "ffe054fe7ae0cb6dc65c3af9b61d5209f439851db43d0ba5997337df154668eb");
}

TEST(Sha256, DigestIsStableWhenAskedTwice) {
    // Asking twice must not pad twice: both answers are the FIPS 180-2 B.1 digest of "abc".
    Sha256 h;
    h.update("abc", 3);
    const std::string expected = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";
    EXPECT_EQ(h.hexDigest(), expected);
    EXPECT_EQ(h.hexDigest(), expected);
    EXPECT_THROW(h.update("d", 1), std::logic_error);
}
