// SPDX-License-Identifier: MIT
#include "reconstruction/simulate/pulse.h"

#include <algorithm>
#include <stdexcept>

namespace umbra::recon::sim {

GaussianPulse::GaussianPulse(double f0, double bw) : f0_(f0), bw_(bw) {
    if (!(f0 > 0) || !(bw > 0) || !(bw <= 2)) throw std::invalid_argument("GaussianPulse: need f0 > 0 and 0 < B <= 2");
    sigma_ = std::sqrt(2 * std::log(2.0)) / (M_PI * bw * f0);
}

PulseTable::PulseTable(const GaussianPulse& p, double fs, int fractions) : m_(fractions) {
    half_ = int(std::ceil(p.halfSupport() * fs)) + 1;
    width_ = 2 * half_ + 1;
    rows_.resize(size_t(m_ + 1) * width_);
    for (int j = 0; j <= m_; ++j) {
        const double frac = double(j) / m_;
        // sample i of row j is at offset (i - half - frac) samples from the pulse centre
        for (int i = 0; i < width_; ++i) rows_[size_t(j) * width_ + i] = float(p((i - half_ - frac) / fs));
    }
}

__attribute__((target_clones("avx2", "default")))
int PulseTable::add(float* trace, int n, double delay_samples, float amplitude) const {
    const double fl = std::floor(delay_samples);
    if (!(fl >= -half_ - 1 && fl <= n + half_)) return 0;  // also refuses a NaN delay
    const long base = long(fl);                 // sample index of row element i = half
    const double fpos = (delay_samples - fl) * m_;
    int j = int(fpos);
    if (j >= m_) j = m_ - 1;
    const float w = float(fpos - j);
    const float a1 = amplitude * w, a0 = amplitude - a1;
    const float* r0 = rows_.data() + size_t(j) * width_;
    const float* r1 = r0 + width_;
    const long first = base - half_;
    const int i0 = int(std::max(0L, -first));
    const int i1 = int(std::min<long>(width_, long(n) - first));
    float* out = trace + first;
    for (int i = i0; i < i1; ++i) out[i] += a0 * r0[i] + a1 * r1[i];
    return std::max(0, i1 - i0);
}

}  // namespace umbra::recon::sim
