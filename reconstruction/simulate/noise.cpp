// SPDX-License-Identifier: MIT
#include "reconstruction/simulate/noise.h"

#include <cmath>

#include "reconstruction/simulate/random.h"

namespace umbra::recon::sim {

NoiseGenerator::NoiseGenerator(const GaussianPulse& p, double fs) {
    const int half = int(std::ceil(3 * p.sigma() * fs));
    double e = 0;
    for (int i = -half; i <= half; ++i) {
        taps_.push_back(p(i / fs));
        e += taps_.back() * taps_.back();
    }
    for (double& t : taps_) t /= std::sqrt(e);
}

void NoiseGenerator::add(float* trace, int n, double rms, uint64_t seed, uint64_t frame, uint64_t tx, uint64_t rx) const {
    if (!(rms > 0) || n <= 0) return;
    detail::Rng rng(seed ^ 0x6e6f697365ULL, frame, tx, rx);
    const int m = int(taps_.size());
    std::vector<double> w(size_t(n + m));
    for (double& v : w) v = rng.normal();
    for (int i = 0; i < n; ++i) {
        double acc = 0;
        const double* src = w.data() + i;
        for (int k = 0; k < m; ++k) acc += taps_[size_t(k)] * src[k];
        trace[i] += float(rms * acc);
    }
}

}  // namespace umbra::recon::sim
