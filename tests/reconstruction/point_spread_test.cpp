// SPDX-License-Identifier: MIT
// Point-spread model of the sizing tools against published window figures, numpy, and the
// beamformer itself.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>

#include "recon_test_util.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/point_spread.h"

using namespace umbra;

// Rectangular aperture, two-way: sinc² falls to 0.5 at ±0.443 λF#, full width 0.886 λF#
// (sinc² root; Szabo, Diagnostic Ultrasound Imaging: Inside Out, arrays chapter; from memory).
TEST(point_spread_test, rectangular_factor_0886_sinc_squared_root) {
    EXPECT_NEAR(recon::lateralWidthFactor("rectangular"), 0.886, 0.002);
}

// Hann aperture: the two-way −6 dB width is the one-way −3 dB width, 1.44 bins for the Hann
// window (Harris, "On the use of windows for harmonic analysis with the discrete Fourier
// transform", Proc. IEEE 66(1), 1978, Table I); checked also against numpy's FFT of a Hann
// window (Debian's /usr/bin/python3).
TEST(point_spread_test, hann_factor_144_harris_and_numpy) {
    const double k = recon::lateralWidthFactor("hann");
    EXPECT_NEAR(k, 1.44, 0.01);
    const std::string out = testutil::tempPath("hann_width.txt");
    const std::string cmd =
        "/usr/bin/python3 -c \"import numpy as np; n=4000; u=(np.arange(n)+0.5)/n-0.5; w=0.5*(1+np.cos(2*np.pi*u)); "
        "s=np.linspace(0,2,200001); p=np.array([np.sum(w*np.cos(2*np.pi*q*u)) for q in s[::100]])/np.sum(w); "
        "i=np.argmax(p<2**-0.5); s0=s[::100][i-1]; s1=s[::100][i]; "
        "f=lambda q: np.sum(w*np.cos(2*np.pi*q*u))/np.sum(w)-2**-0.5; "
        "import scipy.optimize as o; print(2*o.brentq(f,s0,s1))\" > " + out;
    ASSERT_EQ(std::system(cmd.c_str()), 0) << "needs Debian's /usr/bin/python3 with numpy and scipy";
    std::ifstream in(out);
    double ref = 0;
    in >> ref;
    EXPECT_NEAR(k, ref, 1e-4);
    // Tukey windows lie between the two.
    const double t = recon::lateralWidthFactor("tukey", 0.5);
    EXPECT_GT(t, 0.886);
    EXPECT_LT(t, k);
}

// The dynamic aperture z/F# is clipped at the array's ends: at the last element the aperture is
// half as wide, so the effective f-number and the lateral width double (geometry).
TEST(point_spread_test, aperture_clipped_at_the_array_end) {
    recon::PointSpreadModel m;
    m.c_m_s = 5920;
    m.f0_hz = 5e6;
    m.fractional_bandwidth = 0.6;
    m.array_x_min_m = -10e-3;
    m.array_x_max_m = 10e-3;
    m.pitch_m = 0.6e-3;
    m.f_number = 2;
    m.width_factor = 0.886;
    const auto centre = m.at(0, 20e-3), edge = m.at(10e-3, 20e-3);
    EXPECT_NEAR(centre.f_number, 2.0, 1e-9);
    EXPECT_NEAR(edge.f_number, 4.0, 1e-9);
    EXPECT_NEAR(centre.lateral_m, 0.886 * 5920 / 5e6 * 2, 1e-9);
    EXPECT_NEAR(edge.lateral_m, 2 * centre.lateral_m, 1e-9);
    // Axial: c T/2 with T = 4 ln2 / (π B f0), the −6 dB duration of a Gaussian pulse (Gaussian
    // Fourier pair).
    EXPECT_NEAR(centre.axial_m, 5920 * 4 * std::log(2.0) / (M_PI * 0.6 * 5e6) / 2, 1e-12);
}

// The model's Hann lateral width agrees with the beamformer's: a point imaged by TFM with Hann
// apodization at F# 2 has a −6 dB lateral width within 12 % of 1.44 λ F#.
TEST(point_spread_test, hann_width_matches_the_beamformer) {
    testutil::SynthSpec s;  // 64 elements, 0.15 mm pitch, 5 MHz, B 0.6, 1540 m/s
    const auto path = testutil::tempPath("psf_hann.h5");
    testutil::writePointCapture(path, s, {{0.0, 12e-3, 1.0}});
    auto r = recon::defaultRecipe();
    r.setNumber("das.f_number", 2.0);
    r.setText("das.apodization", "hann");
    testutil::setRegion(r, -2.5, 2.5, 11.5, 12.5, 0.01);
    core::CaptureReader cap(path);
    recon::Reconstructor rec(cap, r, 2);
    const auto f = rec.run(0);
    size_t bi = 0;
    for (size_t i = 0; i < f.envelope.size(); ++i)
        if (f.envelope[i] > f.envelope[bi]) bi = i;
    const size_t iz = bi / f.nx(), ix = bi % f.nx();
    const float half = f.at(iz, ix) * 0.5f;
    size_t a = ix, b = ix;
    while (a > 0 && f.at(iz, a) > half) --a;
    while (b + 1 < f.nx() && f.at(iz, b) > half) ++b;
    const double width = f.x_m[b] - f.x_m[a];
    const auto m = recon::pointSpreadModel(r, s.c, s.f0, s.bw, -31.5 * s.pitch, 31.5 * s.pitch, s.pitch);
    const double model = m.at(0, 12e-3).lateral_m;
    std::printf("Hann F#2: beamformer -6 dB lateral width %.3f mm, model 1.44 lambda F# = %.3f mm\n", width * 1e3, model * 1e3);
    EXPECT_NEAR(width, model, 0.12 * model);
}
