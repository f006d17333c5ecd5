// SPDX-License-Identifier: MIT
// The image does not depend on the number of threads or on the tile size (architecture rule:
// deterministic reduction order), for full-matrix and plane-wave captures and every option.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "recon_test_util.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/pipeline.h"

using namespace umbra;

namespace {
core::Frame run(const std::string& path, core::Recipe r, int threads, int tile) {
    r.setNumber("das.tile_pixels", tile);
    core::CaptureReader cap(path);
    recon::Reconstructor rec(cap, r, threads);
    return rec.run(0);
}
double maxRelDiff(const core::Frame& a, const core::Frame& b) {
    EXPECT_EQ(a.envelope.size(), b.envelope.size());
    const double peak = std::max(a.peak(), 1e-30f);
    double d = 0;
    for (size_t i = 0; i < a.envelope.size(); ++i) d = std::max(d, std::fabs(double(a.envelope[i]) - b.envelope[i]) / peak);
    return d;
}
}  // namespace

TEST(determinism_test, same_image_for_1_and_2_threads_and_two_tile_sizes) {
    testutil::SynthSpec s;
    s.elements = 24;
    s.samples = 700;
    const auto fmc = testutil::tempPath("det_fmc.h5");
    testutil::writePointCapture(fmc, s, {{0.3e-3, 5e-3, 1}, {-0.5e-3, 7e-3, 0.5}});
    s.kind = core::TransmitKind::PlaneWave;
    s.angles = {-0.1, 0.0, 0.1};
    const auto pw = testutil::tempPath("det_pw.h5");
    testutil::writePointCapture(pw, s, {{0.3e-3, 5e-3, 1}, {-0.5e-3, 7e-3, 0.5}});
    for (const auto& path : {fmc, pw})
        for (const char* interp : {"linear", "cubic"})
            for (int cf : {0, 1}) {
                auto r = recon::defaultRecipe();
                r.setText("das.interpolation", interp);
                r.setNumber("das.coherence_factor", cf);
                r.setNumber("grid.x_min_mm", -2);
                r.setNumber("grid.x_max_mm", 2);
                r.setNumber("grid.z_min_mm", 3);
                r.setNumber("grid.z_max_mm", 8);
                const auto a = run(path, r, 1, 1024), b = run(path, r, 2, 1024), c = run(path, r, 2, 77), d = run(path, r, 1, 77);
                EXPECT_GT(a.peak(), 0);
                EXPECT_LE(maxRelDiff(a, b), 1e-6) << path << " " << interp << " cf " << cf;
                EXPECT_LE(maxRelDiff(a, c), 1e-6) << path << " " << interp << " cf " << cf;
                EXPECT_LE(maxRelDiff(a, d), 1e-6) << path << " " << interp << " cf " << cf;
            }
}

// Reciprocity: summing each tx < rx pair once, doubled, plus the diagonal equals the full sum
// over all pairs when the data are reciprocal (as the analytic echoes are).
TEST(determinism_test, reciprocity_matches_the_full_pair_sum) {
    testutil::SynthSpec s;
    s.elements = 16;
    s.samples = 600;
    const auto fmc = testutil::tempPath("recip.h5");
    testutil::writePointCapture(fmc, s, {{0.2e-3, 5e-3, 1}});
    auto r = recon::defaultRecipe();
    r.setNumber("grid.x_min_mm", -1.5);
    r.setNumber("grid.x_max_mm", 1.5);
    r.setNumber("grid.z_min_mm", 4);
    r.setNumber("grid.z_max_mm", 6);
    auto full = r;
    full.setNumber("das.reciprocity", 0);
    EXPECT_LE(maxRelDiff(run(fmc, r, 2, 1024), run(fmc, full, 2, 1024)), 1e-4);
}

// The vector kernels chosen at run time compute the same sums as the portable scalar ones
// (linear and 4-point Lagrange interpolation), on random traces and delays.
TEST(determinism_test, vector_kernels_match_scalar_kernels) {
    std::mt19937 rng(5);
    std::uniform_real_distribution<float> u(-1, 1), pos(-20, 700), wgt(0, 1);
    const size_t ns = 600, n = 256;
    std::vector<float> tr(2 * recon::detail::traceStride(ns), 0.0f);
    for (size_t j = 2 * recon::detail::kTracePad; j < 2 * (recon::detail::kTracePad + ns); ++j) tr[j] = u(rng);
    std::vector<float> base(n), tof(n), wt(n), wr(n);
    for (size_t p = 0; p < n; ++p) {
        base[p] = pos(rng);
        tof[p] = pos(rng) * 0.1f;
        wt[p] = wgt(rng);
        wr[p] = p % 7 == 0 ? 0.0f : wgt(rng);
    }
    const float hi = float(ns + recon::detail::kTracePad);
    const auto ref = recon::detail::scalarKernels();
    for (const auto& best : recon::detail::availableKernels()) {
    for (int cubic = 0; cubic < 2; ++cubic) {
        std::vector<float> a(2 * n, 0.5f), b(2 * n, 0.5f);
        (cubic ? best.cubic : best.linear)(base.data(), tof.data(), 0.75f, wt.data(), wr.data(), 2.0f, tr.data(), hi, n, a.data());
        (cubic ? ref.cubic : ref.linear)(base.data(), tof.data(), 0.75f, wt.data(), wr.data(), 2.0f, tr.data(), hi, n, b.data());
        for (size_t i = 0; i < 2 * n; ++i) ASSERT_NEAR(a[i], b[i], 1e-5) << best.name << " cubic " << cubic << " at " << i;
    }
    // The fused two-transmit kernel equals two single calls (second transmit: shifted delays).
    std::vector<float> base2(n);
    for (size_t p = 0; p < n; ++p) base2[p] = base[p] * 0.9f + 3;
    std::vector<float> a(2 * n, 0.25f), b(2 * n, 0.25f);
    best.linear2(base.data(), 0.75f, wt.data(), 2.0f, tr.data(), base2.data(), -1.5f, wr.data(), 1.0f, tr.data(), tof.data(), wr.data(), hi,
                 n, a.data());
    best.linear(base.data(), tof.data(), 0.75f, wt.data(), wr.data(), 2.0f, tr.data(), hi, n, b.data());
    best.linear(base2.data(), tof.data(), -1.5f, wr.data(), wr.data(), 1.0f, tr.data(), hi, n, b.data());
    for (size_t i = 0; i < 2 * n; ++i) ASSERT_EQ(a[i], b[i]) << best.name << " fused pair at " << i;
    }
}

// Progress reaches 1 and rises monotonically; a cancel request stops the run with
// core::Cancelled (architecture: plain callbacks, polled between tiles).
TEST(determinism_test, progress_and_cancellation_callbacks) {
    testutil::SynthSpec s;
    s.elements = 16;
    s.samples = 600;
    const auto path = testutil::tempPath("progress.h5");
    testutil::writePointCapture(path, s, {{0.0, 5e-3, 1}});
    auto r = recon::defaultRecipe();
    r.setNumber("grid.x_min_mm", -2);
    r.setNumber("grid.x_max_mm", 2);
    r.setNumber("grid.z_min_mm", 3);
    r.setNumber("grid.z_max_mm", 7);
    r.setNumber("das.tile_pixels", 64);
    core::CaptureReader cap(path);
    recon::Reconstructor rec(cap, r, 2);
    std::vector<double> seen;
    recon::Progress p;
    p.progress = [&](double x) { seen.push_back(x); };
    rec.run(0, p);
    ASSERT_FALSE(seen.empty());
    EXPECT_DOUBLE_EQ(seen.back(), 1.0);
    for (size_t i = 1; i < seen.size(); ++i) EXPECT_GE(seen[i], seen[i - 1]);
    int polls = 0;
    p.cancelled = [&] { return ++polls > 3; };
    EXPECT_THROW(rec.run(0, p), core::Cancelled);
    EXPECT_NO_THROW(rec.run(0));  // usable again after a cancelled run
}
