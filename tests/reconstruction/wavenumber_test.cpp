// SPDX-License-Identifier: MIT
// Wavenumber imaging (das.method = wavenumber) against delay-and-sum and against the truth of
// analytic point captures: full-matrix f-k migration (Hunter, Drinkwater & Wilcox, IEEE TUFFC
// 55(11), 2008) and plane-wave Stolt migration (Garcia et al., IEEE TUFFC 60(9), 2013).
// The captures hold Gaussian-modulated echoes at the exact geometric travel times of point
// reflectors (recon_test_util.h), so the true positions are known; each point's echo has the
// same amplitude on every trace, so the true amplitude ratio of two points is the ratio of their
// amplitudes (20 log10(0.5) = -6.02 dB here).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>

#include "core/capture.h"
#include "core/error.h"
#include "recon_test_util.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/wavenumber_stage.h"

using namespace umbra;

namespace {

using Peak = testutil::PeakAt;

// Largest pixel within +-half_m of (x, z), refined to sub-pixel position.
Peak peakNear(const core::Frame& f, double x, double z, double half_m) { return testutil::framePeak(f, x, z, half_m); }

// Full matrix in steel (5920 m/s, ISO 2400 calibration practice, from memory), 5 MHz, 60 %
// bandwidth, pitch 0.5 mm, sampled at 40 MHz down to depth_m.
testutil::SynthSpec steelFmc(size_t elements, double depth_m) {
    testutil::SynthSpec s;
    s.elements = elements;
    s.pitch = 0.5e-3;
    s.c = 5920;
    s.fs = 40e6;
    s.samples = size_t(std::ceil(2 * depth_m / s.c * s.fs));
    return s;
}

core::Frame image(const std::string& path, core::Recipe r, const char* method, double x0_mm, double x1_mm, double z0_mm, double z1_mm,
                  double step_mm) {
    r.setText("das.method", method);
    r.setNumber("grid.x_min_mm", x0_mm);
    r.setNumber("grid.x_max_mm", x1_mm);
    r.setNumber("grid.z_min_mm", z0_mm);
    r.setNumber("grid.z_max_mm", z1_mm);
    r.setNumber("grid.step_mm", step_mm);
    core::CaptureReader cap(path);
    recon::Reconstructor rec(cap, r, 2);
    return rec.run(0);
}

double db(double v) { return 20 * std::log10(v); }

// Both methods image both points; wavenumber positions within lambda/10 of the truth and of the
// delay-and-sum peaks (total focusing method / coherent compounding, Holmes, Drinkwater & Wilcox,
// NDT&E Int. 38, 2005; Montaldo et al., IEEE TUFFC 56(3), 2009), the ratio of the two points
// within 1 dB of delay-and-sum's, and each point within 1.5 dB of its echo amplitude (the
// delay-and-sum amplitude convention).
void compare(const std::string& path, const std::vector<testutil::Point>& pts, double lambda, const core::Recipe& r, double x0, double x1,
             double z0, double z1, double step) {
    const core::Frame das = image(path, r, "delay_and_sum", x0, x1, z0, z1, step);
    const core::Frame fk = image(path, r, "wavenumber", x0, x1, z0, z1, step);
    std::vector<Peak> pd, pf;
    for (const auto& p : pts) {
        pd.push_back(peakNear(das, p.x, p.z, 1.5e-3));
        pf.push_back(peakNear(fk, p.x, p.z, 1.5e-3));
        std::printf("point (%.2f, %.2f) mm, amplitude %.2f: delay-and-sum (%.4f, %.4f) mm %.3f; wavenumber (%.4f, %.4f) mm %.3f\n", p.x * 1e3,
                    p.z * 1e3, p.amp, pd.back().x_m * 1e3, pd.back().z_m * 1e3, pd.back().v, pf.back().x_m * 1e3, pf.back().z_m * 1e3,
                    pf.back().v);
        EXPECT_NEAR(pf.back().x_m, p.x, lambda / 10) << "wavenumber x of point at z = " << p.z;
        EXPECT_NEAR(pf.back().z_m, p.z, lambda / 10) << "wavenumber z of point at z = " << p.z;
        EXPECT_NEAR(pf.back().x_m, pd.back().x_m, lambda / 10) << "x against delay-and-sum";
        EXPECT_NEAR(pf.back().z_m, pd.back().z_m, lambda / 10) << "z against delay-and-sum";
        EXPECT_NEAR(db(pf.back().v), db(p.amp), 1.5) << "amplitude convention: reads the echo amplitude";
    }
    const double rd = db(pd[1].v / pd[0].v), rf = db(pf[1].v / pf[0].v);
    std::printf("ratio: truth %+.2f dB, delay-and-sum %+.2f dB, wavenumber %+.2f dB\n", db(pts[1].amp / pts[0].amp), rd, rf);
    EXPECT_NEAR(rf, rd, 1.0);
}

}  // namespace

// Full matrix, 64 elements: points at (0, 15) mm, amplitude 1, and (-4, 25) mm, amplitude 0.5.
TEST(wavenumber_test, fmc_points_match_tfm) {
    const auto s = steelFmc(64, 40e-3);
    const std::vector<testutil::Point> pts = {{0, 15e-3, 1.0}, {-4e-3, 25e-3, 0.5}};
    const std::string path = testutil::tempPath("fk_fmc.h5");
    testutil::writePointCapture(path, s, pts);
    compare(path, pts, s.c / s.f0, recon::defaultRecipe(), -8, 4, 10, 30, 0.05);
}

// The same with the rectangular window and the full aperture (element window, angle limit), 48
// elements: points at (1, 12) mm, amplitude 1, and (-2, 22) mm, amplitude 0.5.
TEST(wavenumber_test, fmc_full_aperture_rectangular) {
    const auto s = steelFmc(48, 35e-3);
    const std::vector<testutil::Point> pts = {{1e-3, 12e-3, 1.0}, {-2e-3, 22e-3, 0.5}};
    const std::string path = testutil::tempPath("fk_fmc_full.h5");
    testutil::writePointCapture(path, s, pts);
    core::Recipe r = recon::defaultRecipe();
    r.setText("das.aperture", "full");
    r.setText("das.apodization", "rectangular");
    compare(path, pts, s.c / s.f0, r, -5, 4, 9, 25, 0.05);
}

// Plane waves, 64 elements, pitch 0.2 mm, 1540 m/s (soft tissue, common practice), 5 MHz, five
// angles -10 to 10 degrees: points at (0, 10) mm, amplitude 1, and (2.5, 18) mm, amplitude 0.5.
TEST(wavenumber_test, plane_wave_points_match_compounding) {
    testutil::SynthSpec s;
    s.elements = 64;
    s.pitch = 0.2e-3;
    s.c = 1540;
    s.fs = 40e6;
    s.kind = core::TransmitKind::PlaneWave;
    for (int a = -10; a <= 10; a += 5) s.angles.push_back(a * M_PI / 180);
    s.samples = size_t(std::ceil(2 * 25e-3 / s.c * s.fs));
    const std::vector<testutil::Point> pts = {{0, 10e-3, 1.0}, {2.5e-3, 18e-3, 0.5}};
    const std::string path = testutil::tempPath("fk_pw.h5");
    testutil::writePointCapture(path, s, pts);
    compare(path, pts, s.c / s.f0, recon::defaultRecipe(), -3, 5, 7, 21, 0.02);
}

// Each pixel and lateral wavenumber is computed by one worker in a fixed order: the image is the
// same, bit for bit, with one or two threads.
TEST(wavenumber_test, image_does_not_depend_on_threads) {
    const auto s = steelFmc(32, 30e-3);
    const std::string path = testutil::tempPath("fk_threads.h5");
    testutil::writePointCapture(path, s, {{0, 12e-3, 1.0}, {3e-3, 20e-3, 0.7}});
    core::Recipe r = recon::defaultRecipe();
    r.setText("das.method", "wavenumber");
    core::CaptureReader cap(path);
    recon::Reconstructor one(cap, r, 1), two(cap, r, 2);
    const core::Frame a = one.run(0), b = two.run(0);
    ASSERT_EQ(a.envelope.size(), b.envelope.size());
    EXPECT_GT(a.peak(), 0.5f);
    size_t differ = 0;
    for (size_t i = 0; i < a.envelope.size(); ++i) differ += a.envelope[i] != b.envelope[i];
    EXPECT_EQ(differ, 0u);
}

// Geometry wavenumber imaging cannot handle is refused with a SettingError naming the reason:
// unevenly spaced elements, an element off the x axis, a wedge, start times that differ between
// transmits, virtual-source transmits.
TEST(wavenumber_test, bad_geometry_is_a_setting_error) {
    testutil::SynthSpec s;
    s.elements = 16;
    s.samples = 200;
    auto expectRefused = [](const core::CaptureHeader& h, const char* what) {
        try {
            recon::checkWavenumberCapture(h);
            ADD_FAILURE() << what << ": accepted";
        } catch (const core::SettingError& e) {
            std::printf("%s: %s\n", what, e.what());
        }
    };
    EXPECT_NO_THROW(recon::checkWavenumberCapture(testutil::makeHeader(s)));
    {
        auto h = testutil::makeHeader(s);
        h.array.element_position_m[5][0] += 0.3 * s.pitch;
        expectRefused(h, "uneven pitch");
    }
    {
        auto h = testutil::makeHeader(s);
        h.array.element_position_m[3][2] = 1e-3;
        expectRefused(h, "element off the axis");
    }
    {
        auto h = testutil::makeHeader(s);
        h.medium.wedge = core::WedgeInfo{2330, {0, 0, 0}, 0.6};
        expectRefused(h, "wedge");
    }
    {
        auto h = testutil::makeHeader(s);
        h.receive.start_time_s[4] = 1e-6;
        expectRefused(h, "start times differ");
    }
    {
        auto s2 = s;
        s2.kind = core::TransmitKind::VirtualSource;
        s2.sources = {{0, 0, -10e-3}, {1e-3, 0, -10e-3}};
        expectRefused(testutil::makeHeader(s2), "virtual sources");
    }
    // End to end: the Reconstructor refuses an uneven capture file with das.method = wavenumber,
    // and images it with delay-and-sum.
    auto h = testutil::makeHeader(s);
    h.array.element_position_m[5][0] += 0.3 * s.pitch;
    const std::string path = testutil::tempPath("fk_uneven.h5");
    {
        core::CaptureWriter w(path, h);
        std::vector<float> block(h.blockSize(), 0.0f);
        for (size_t t = 0; t < h.transmits(); ++t) w.writeBlock(0, t, block.data());
        w.finish();
    }
    core::CaptureReader cap(path);
    core::Recipe r = recon::defaultRecipe();
    EXPECT_NO_THROW(recon::Reconstructor(cap, r, 1));
    r.setText("das.method", "wavenumber");
    EXPECT_THROW(recon::Reconstructor(cap, r, 1), core::SettingError);
    // The coherence factor needs the individual delay-and-sum terms: refused, not ignored.
    const std::string even = testutil::tempPath("fk_even.h5");
    testutil::writePointCapture(even, s, {});
    core::CaptureReader cap2(even);
    EXPECT_NO_THROW(recon::Reconstructor(cap2, r, 1));
    r.setNumber("das.coherence_factor", 1);
    EXPECT_THROW(recon::Reconstructor(cap2, r, 1), core::SettingError);
}

// FFT sizes: 2, 3 and 5 smooth, not smaller than asked.
TEST(wavenumber_test, fast_fft_sizes) {
    EXPECT_EQ(recon::fastFftSize(1), 1u);
    EXPECT_EQ(recon::fastFftSize(7), 8u);
    EXPECT_EQ(recon::fastFftSize(97), 100u);
    EXPECT_EQ(recon::fastFftSize(1801), 1875u);
}
