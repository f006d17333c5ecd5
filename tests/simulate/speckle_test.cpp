// SPDX-License-Identifier: MIT
// Fully developed speckle: envelope of many random scatterers with Gaussian amplitudes is
// Rayleigh distributed, mean/std = sqrt(pi / (4 - pi)) = 1.913, and the std of the
// log-compressed envelope is 5.57 dB (Burckhardt 1978; Wagner et al., IEEE Trans. Sonics
// Ultrason. 30(3), 1983). Checked within 3 % over a large region.
#include <gtest/gtest.h>

#include "reconstruction/simulate/scatterers.h"
#include "sim_test_util.h"

using namespace simtest;

namespace {
struct Stats {
    double snr = 0, log_std_db = 0;
    size_t n = 0;
};

/// Envelope statistics over the traces of a plane-wave (0 deg) capture of a speckle block,
/// each depth normalised by the rms across traces near that depth (removes the slow depth
/// trend of spreading and directivity, which would otherwise mix Rayleigh scales).
Stats speckleStats(const umbra::recon::sim::SimulatedCapture& cap, size_t k0, size_t k1) {
    const size_t nr = cap.header.receives(), ns = cap.header.samples;
    std::vector<std::vector<double>> env(nr);
    for (size_t r = 0; r < nr; ++r) env[r] = envelope(trace(cap, 0, 0, r), ns);
    const size_t half = 40;
    double s1 = 0, s2 = 0, l1 = 0, l2 = 0;
    size_t n = 0;
    for (size_t k = k0; k < k1; ++k) {
        double p = 0;
        size_t m = 0;
        for (size_t r = 0; r < nr; ++r)
            for (size_t q = k - half; q <= k + half; ++q) { p += env[r][q] * env[r][q]; ++m; }
        const double norm = std::sqrt(p / double(m));
        for (size_t r = 0; r < nr; ++r) {
            const double e = env[r][k] / norm;
            s1 += e; s2 += e * e;
            const double l = 20 * std::log10(e);
            l1 += l; l2 += l * l;
            ++n;
        }
    }
    const double mean = s1 / double(n), var = s2 / double(n) - mean * mean;
    const double lm = l1 / double(n);
    return {mean / std::sqrt(var), std::sqrt(l2 / double(n) - lm * lm), n};
}
}  // namespace

TEST(speckle_test, envelope_snr_is_rayleigh_1_913_within_3_percent) {
    auto j = baseScene();
    j["array"] = {{"elements", 64}, {"pitch_mm", 1.0}, {"element_width_mm", 0.3},
                  {"centre_frequency_mhz", 5}, {"fractional_bandwidth", 0.6}};
    j["medium"] = {{"speed_m_s", 1540}};
    j["transmit"] = {{"kind", "plane_wave"}, {"angles_deg", {0}}};
    j["sampling"] = {{"frequency_mhz", 40}, {"samples", 2600}};
    j["speckle"] = {{"x_range_mm", {-34, 34}}, {"z_range_mm", {4, 48}}, {"density_per_mm2", 20}, {"amplitude_rms", 0.05}};
    auto cap = run(j);
    // Receive times 2*z/c for z = 15 .. 40 mm (inside the block, away from its edges).
    const size_t k0 = size_t(2 * 15e-3 / 1540 * 40e6), k1 = size_t(2 * 40e-3 / 1540 * 40e6);
    auto st = speckleStats(cap, k0, k1);
    const double rayleigh = std::sqrt(M_PI / (4 - M_PI));  // 1.9131
    EXPECT_NEAR(rayleigh, 1.913, 1e-3);
    EXPECT_NEAR(st.snr, rayleigh, 0.03 * rayleigh) << st.n << " samples";
    EXPECT_NEAR(st.log_std_db, 5.57, 0.03 * 5.57);
}

// Anechoic regions hold no scatterers; a +6 dB region has twice the amplitude rms.
TEST(speckle_test, regions_scale_or_remove_scatterers) {
    umbra::recon::sim::SpeckleSpec s;
    s.enabled = true;
    s.x_min_m = -10e-3; s.x_max_m = 10e-3; s.z_min_m = 0; s.z_max_m = 20e-3;
    s.density_per_m2 = 200e6;
    s.amplitude_rms = 1.0;
    umbra::recon::sim::SpeckleRegion cyst, hyper;
    cyst.shape = hyper.shape = umbra::recon::sim::RegionShape::Circle;
    cyst.cx_m = -5e-3; cyst.cz_m = 10e-3; cyst.a_m = cyst.b_m = 3e-3; cyst.anechoic = true;
    hyper.cx_m = 5e-3; hyper.cz_m = 10e-3; hyper.a_m = hyper.b_m = 3e-3; hyper.contrast_db = 6;
    s.regions = {cyst, hyper};
    auto pts = umbra::recon::sim::makeSpeckle(s, 3);
    double in2 = 0, out2 = 0;
    size_t nin = 0, nout = 0, ncyst = 0;
    for (auto& p : pts) {
        if (cyst.contains(p.x_m, p.z_m)) ++ncyst;
        else if (hyper.contains(p.x_m, p.z_m)) { in2 += p.amplitude * p.amplitude; ++nin; }
        else { out2 += p.amplitude * p.amplitude; ++nout; }
    }
    EXPECT_EQ(ncyst, 0u);
    // Expected count in a 3 mm radius circle: 200 per mm^2 * 28.27 mm^2 = 5655.
    EXPECT_NEAR(double(nin), 200 * M_PI * 9, 4 * std::sqrt(200 * M_PI * 9));
    EXPECT_NEAR(std::sqrt(in2 / double(nin)) / std::sqrt(out2 / double(nout)), std::pow(10.0, 6 / 20.0), 0.05);
}
