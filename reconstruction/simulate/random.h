// SPDX-License-Identifier: MIT
#pragma once
// Small deterministic random source (splitmix64), identical on every platform and independent
// of thread count: each stream is seeded from (seed, purpose, indices).
#include <cmath>
#include <cstdint>

namespace umbra::recon::sim::detail {

inline uint64_t mix64(uint64_t z) {
    z += 0x9e3779b97f4a7c15ULL;
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
}

class Rng {
public:
    explicit Rng(uint64_t seed, uint64_t a = 0, uint64_t b = 0, uint64_t c = 0)
        : s_(mix64(mix64(mix64(mix64(seed) ^ a) ^ b) ^ c)) {}
    uint64_t next() { return mix64(s_ += 0x9e3779b97f4a7c15ULL); }
    /// Uniform in [0, 1).
    double uniform() { return double(next() >> 11) * 0x1.0p-53; }
    /// Standard normal (Box-Muller, both values used).
    double normal() {
        if (have_) { have_ = false; return spare_; }
        double u1 = uniform(), u2 = uniform();
        if (u1 < 1e-300) u1 = 1e-300;
        const double r = std::sqrt(-2 * std::log(u1));
        spare_ = r * std::sin(2 * M_PI * u2);
        have_ = true;
        return r * std::cos(2 * M_PI * u2);
    }

private:
    uint64_t s_;
    double spare_ = 0;
    bool have_ = false;
};

}  // namespace umbra::recon::sim::detail
