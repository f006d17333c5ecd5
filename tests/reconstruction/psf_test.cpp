// SPDX-License-Identifier: MIT
// Point-spread function of delay-and-sum against published resolution formulas.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>

#include "core/error.h"
#include "recon_test_util.h"
#include "reconstruction/das_stage.h"
#include "reconstruction/pipeline.h"

using namespace umbra;
using testutil::setRegion;

namespace {

struct Peak {
    size_t iz, ix;
    float v;
};
Peak findPeak(const core::Frame& f) {
    Peak p{0, 0, -1};
    for (size_t iz = 0; iz < f.nz(); ++iz)
        for (size_t ix = 0; ix < f.nx(); ++ix)
            if (f.at(iz, ix) > p.v) p = {iz, ix, f.at(iz, ix)};
    return p;
}

// Full width (m) where the profile falls to half its peak, linear interpolation between samples.
double halfWidth(const std::vector<double>& axis, const std::vector<float>& prof, size_t ip) {
    const double half = prof[ip] * 0.5;
    size_t a = ip, b = ip;
    while (a > 0 && prof[a] > half) --a;
    while (b + 1 < prof.size() && prof[b] > half) ++b;
    if (prof[a] > half || prof[b] > half) return -1;  // did not fall to half inside the grid
    const double xa = axis[a] + (half - prof[a]) / (prof[a + 1] - prof[a]) * (axis[a + 1] - axis[a]);
    const double xb = axis[b - 1] + (half - prof[b - 1]) / (prof[b] - prof[b - 1]) * (axis[b] - axis[b - 1]);
    return xb - xa;
}

core::Frame reconstruct(const std::string& path, core::Recipe r) {
    core::CaptureReader cap(path);
    recon::Reconstructor rec(cap, r, 2);
    return rec.run(0);
}

}  // namespace

// TFM with transmit and receive apertures both set by the f-number (uniform apodization):
// two-way aperture, lateral -6 dB width 0.8859 lambda F# (root of sinc^2 for a uniform
// aperture; Szabo, Diagnostic Ultrasound Imaging: Inside Out, arrays chapter, from memory); axial -6 dB
// width c T/2 (common practice) with T = 4 ln2 / (pi B f0) (derived from the Gaussian Fourier pair); peak within lambda/10 of the true position.
TEST(psf_test, tfm_point_position_lateral_and_axial_widths) {
    testutil::SynthSpec s;  // 64 elements, 0.15 mm pitch, 5 MHz, B 0.6, 1540 m/s, 40 MHz
    const double x0 = 0.21e-3, z0 = 12.0e-3;
    const auto path = testutil::tempPath("psf_tfm.h5");
    testutil::writePointCapture(path, s, {{x0, z0, 1.0}});
    auto r = recon::defaultRecipe();
    const double F = 2.0;
    r.setNumber("das.f_number", F);
    r.setText("das.apodization", "rectangular");
    r.setText("das.interpolation", "cubic");
    setRegion(r, -1.5, 1.9, 11.0, 13.0, 0.01);
    const auto f = reconstruct(path, r);
    const auto pk = findPeak(f);
    const double lambda = s.c / s.f0;
    EXPECT_LT(std::fabs(f.x_m[pk.ix] - x0), lambda / 10);
    EXPECT_LT(std::fabs(f.z_m[pk.iz] - z0), lambda / 10);

    std::vector<float> row(f.nx()), col(f.nz());
    for (size_t ix = 0; ix < f.nx(); ++ix) row[ix] = f.at(pk.iz, ix);
    for (size_t iz = 0; iz < f.nz(); ++iz) col[iz] = f.at(iz, pk.ix);
    const double lat = halfWidth(f.x_m, row, pk.ix), ax = halfWidth(f.z_m, col, pk.iz);
    const double lat_ref = 0.8859 * lambda * F;
    const double ax_ref = s.c * (4 * std::log(2.0) / (M_PI * s.bw * s.f0)) / 2;  // 0.227 mm
    std::printf("TFM PSF: peak (%.4f, %.4f) mm, lateral %.4f mm (ref %.4f), axial %.4f mm (ref %.4f)\n", f.x_m[pk.ix] * 1e3,
                f.z_m[pk.iz] * 1e3, lat * 1e3, lat_ref * 1e3, ax * 1e3, ax_ref * 1e3);
    EXPECT_NEAR(lat / lat_ref, 1.0, 0.15) << "lateral " << lat * 1e3 << " mm vs " << lat_ref * 1e3;
    EXPECT_NEAR(ax / ax_ref, 1.0, 0.15) << "axial " << ax * 1e3 << " mm vs " << ax_ref * 1e3;
}

// A single 0 degree plane wave focuses on receive only: one-way aperture, lateral -6 dB width
// 1.2067 lambda F# (derived: root of the one-way sinc pattern of a uniform aperture).
TEST(psf_test, plane_wave_single_angle_lateral_width_is_one_way) {
    testutil::SynthSpec s;
    s.kind = core::TransmitKind::PlaneWave;
    s.angles = {0.0};
    const double x0 = -0.13e-3, z0 = 12.0e-3;
    const auto path = testutil::tempPath("psf_pw.h5");
    testutil::writePointCapture(path, s, {{x0, z0, 1.0}});
    auto r = recon::defaultRecipe();
    const double F = 2.0;
    r.setNumber("das.f_number", F);
    r.setText("das.apodization", "rectangular");
    setRegion(r, -2.0, 2.0, 11.0, 13.0, 0.01);
    const auto f = reconstruct(path, r);
    const auto pk = findPeak(f);
    const double lambda = s.c / s.f0;
    EXPECT_LT(std::fabs(f.x_m[pk.ix] - x0), lambda / 10);
    EXPECT_LT(std::fabs(f.z_m[pk.iz] - z0), lambda / 10);
    std::vector<float> row(f.nx());
    for (size_t ix = 0; ix < f.nx(); ++ix) row[ix] = f.at(pk.iz, ix);
    const double lat = halfWidth(f.x_m, row, pk.ix);
    std::printf("plane-wave PSF: lateral %.4f mm (ref %.4f)\n", lat * 1e3, 1.2067 * lambda * F * 1e3);
    EXPECT_NEAR(lat / (1.2067 * lambda * F), 1.0, 0.15) << "lateral " << lat * 1e3 << " mm";
}

// Amplitude fidelity: <= 2 dB (ASME BPVC Section V, Article 4, TFM appendix, and ISO 23865; clause
// numbers from memory); a grid of about lambda/3.3 on an envelope image (published TFM
// amplitude-fidelity analyses; empirical).
// The automatic step with the default target (grid.max_loss_db = 1 dB) keeps the reported
// worst-case loss within the target and so well within 2 dB, is finer than lambda/3.3 (which the
// 2 dB limit alone allows), and the Gaussian model does not under-state the loss a beamformed
// point actually shows at a half-pixel offset in both axes.
TEST(psf_test, default_grid_keeps_amplitude_fidelity_within_2db) {
    testutil::SynthSpec s;
    const auto h = testutil::makeHeader(s);
    auto r = recon::defaultRecipe();  // f-number 1, Hann
    setRegion(r, -2, 2, 6, 8);
    const auto g = recon::resolveGrid(h, r);
    const double lambda = s.c / s.f0;
    const double loss = recon::amplitudeFidelityDb(h, r, g);
    EXPECT_DOUBLE_EQ(r.number("grid.max_loss_db"), 1.0);
    EXPECT_LE(loss, 1.0 + 1e-9);
    EXPECT_GT(loss, 0.9);  // not needlessly fine: the step is floored to whole micrometres only
    // Loss goes with step^2 (Gaussian model), so 1 dB instead of 2 dB is the lambda/3.3 step / sqrt(2).
    EXPECT_GT(g.step_m, lambda / 5.5);
    EXPECT_LT(g.step_m, lambda / 3.3);

    // Beamform the same point on a grid through it and on one offset by half a pixel in x and z.
    const double x0 = 0.0, z0 = 7.0e-3;
    const auto path = testutil::tempPath("fidelity.h5");
    testutil::writePointCapture(path, s, {{x0, z0, 1.0}});
    auto on = r, off = r;
    const double st = g.step_m * 1e3;
    setRegion(on, -20 * st, 20 * st, 7.0 - 10 * st, 7.0 + 10 * st, st);
    setRegion(off, -20.5 * st, 20 * st, 7.0 - 10.5 * st, 7.0 + 10 * st, st);
    const double p_on = findPeak(reconstruct(path, on)).v, p_off = findPeak(reconstruct(path, off)).v;
    const double measured = 20 * std::log10(p_on / p_off);
    std::printf("fidelity: step %.4f mm = lambda/%.2f, model %.2f dB, beamformed %.2f dB\n", g.step_m * 1e3, lambda / g.step_m, loss,
                measured);
    EXPECT_LE(measured, 2.0);
    EXPECT_LE(measured, loss + 0.25) << "Gaussian model " << loss << " dB, beamformed " << measured << " dB";
}

// grid.max_loss_db drives the automatic step: for targets 0.5, 1 and 2 dB the model loss of the
// chosen step is at (just under) the target, the step scales as sqrt(target minus the
// interpolation loss) (Gaussian model: loss proportional to step^2), and the loss a beamformed point shows at a half-pixel offset in
// both axes grows with the target, stays within the target + 0.25 dB and within the 2 dB limit
// (ASME BPVC Section V, Article 4, TFM appendix; ISO 23865; clause numbers from memory).
TEST(psf_test, achieved_loss_tracks_the_fidelity_target) {
    testutil::SynthSpec s;
    const auto h = testutil::makeHeader(s);
    const auto path = testutil::tempPath("fidelity_target.h5");
    testutil::writePointCapture(path, s, {{0.0, 7.0e-3, 1.0}});
    double prev_measured = -1, step_1db = 0;
    for (double target : {0.5, 1.0, 2.0}) {
        auto r = recon::defaultRecipe();
        r.setNumber("grid.max_loss_db", target);
        setRegion(r, -2, 2, 6, 8);
        const auto g = recon::resolveGrid(h, r);
        const double model = recon::amplitudeFidelityDb(h, r, g);
        EXPECT_LE(model, target + 1e-9) << "target " << target;
        EXPECT_GT(model, 0.97 * target) << "target " << target;
        if (target == 1.0) step_1db = g.step_m;
        auto on = r, off = r;
        const double st = g.step_m * 1e3;
        setRegion(on, -20 * st, 20 * st, 7.0 - 10 * st, 7.0 + 10 * st, st);
        setRegion(off, -20.5 * st, 20 * st, 7.0 - 10.5 * st, 7.0 + 10 * st, st);
        const double measured = 20 * std::log10(findPeak(reconstruct(path, on)).v / findPeak(reconstruct(path, off)).v);
        std::printf("fidelity target %.2f dB: step %.4f mm, model %.2f dB, beamformed %.2f dB\n", target, g.step_m * 1e3, model,
                    measured);
        EXPECT_LE(measured, target + 0.25) << "target " << target;
        EXPECT_LE(measured, 2.0) << "target " << target;
        EXPECT_GT(measured, prev_measured) << "target " << target;
        prev_measured = measured;
        if (target == 2.0) {
            // The grid's share of the target is what the interpolation loss leaves.
            const double i = recon::interpolationLossDb(recon::dasParams(r), s.fs, s.f0);
            EXPECT_NEAR(g.step_m / step_1db, std::sqrt((2.0 - i) / (1.0 - i)), 0.01);
        }
    }
    EXPECT_THROW(
        [&] {
            auto r = recon::defaultRecipe();
            r.setNumber("grid.max_loss_db", 3.0);
            recon::resolveGrid(h, r);
        }(),
        core::SettingError);
}

// Virtual-source captures (diverging sources behind the array, and a converging one in front):
// the image peak of a point lies within lambda/10 of its true position (time zero at the
// origin, capture format v1).
TEST(psf_test, virtual_source_point_position) {
    for (double zv : {-6e-3, 25e-3}) {
        testutil::SynthSpec s;
        s.kind = core::TransmitKind::VirtualSource;
        for (double xv : {-2e-3, 0.0, 2e-3}) s.sources.push_back({xv, 0, zv});
        const double x0 = 0.37e-3, z0 = 10.0e-3;
        const auto path = testutil::tempPath("psf_vs.h5");
        testutil::writePointCapture(path, s, {{x0, z0, 1.0}});
        auto r = recon::defaultRecipe();
        setRegion(r, -1.5, 1.5, 9, 11, 0.01);
        const auto f = reconstruct(path, r);
        const auto pk = findPeak(f);
        const double lambda = s.c / s.f0;
        EXPECT_LT(std::fabs(f.x_m[pk.ix] - x0), lambda / 10) << "z_v " << zv;
        EXPECT_LT(std::fabs(f.z_m[pk.iz] - z0), lambda / 10) << "z_v " << zv;
    }
}
