// SPDX-License-Identifier: MIT
// Elastic paths of the simulator: arrivals through a wedge and off the back wall against a
// brute-force least-time search, side-drilled-hole echoes growing as sqrt(radius) (2-D
// Kirchhoff), crack tips of opposite phase, the Miller & Pursey directivity's known values,
// scene checks, and simulated points imaged at their true specimen positions in each view.
#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <functional>

#include "core/capture_file.h"
#include "core/error.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/simulate/directivity.h"
#include "sim_test_util.h"

using namespace simtest;

namespace {
constexpr double kCl = 5920, kCt = 3240, kCw = 2330, kFs = 50e6, kDeg = M_PI / 180;

nlohmann::json wedgeScene() {
    auto j = baseScene();
    j["array"]["elements"] = 16;
    j["sampling"]["samples"] = 2600;
    j["medium"]["shear_speed_m_s"] = kCt;
    j["medium"]["thickness_mm"] = 20;
    j["wedge"] = {{"speed_m_s", kCw}, {"angle_deg", 36}, {"height_mm", 10}};
    return j;
}

// Minimum of f on [a, b] by three rounds of dense sampling (brute force, no solver).
double bruteMin(const std::function<double(double)>& f, double a, double b, int n = 2001) {
    double best = 1e300, arg = a;
    for (int round = 0; round < 3; ++round) {
        const double h = (b - a) / (n - 1);
        for (int i = 0; i < n; ++i)
            if (const double v = f(a + i * h); v < best) best = v, arg = a + i * h;
        a = arg - h;
        b = arg + h;
    }
    return best;
}

// Least time from array-frame element x (z = 0) through the 36 deg wedge (surface origin
// (0, 10 mm)) to specimen point (xs, zs), direct (one speed) or via the back wall at 20 mm.
double bruteTime(double ex, std::vector<double> c, double xs, double zs) {
    const double t = 36 * kDeg, ox = 0, oz = 10e-3, D = 20e-3;
    auto arr = [&](double x, double z) { return std::array<double, 2>{ox + x * std::cos(t) - z * std::sin(t), oz + x * std::sin(t) + z * std::cos(t)}; };
    auto d = [](std::array<double, 2> a, std::array<double, 2> b) { return std::hypot(a[0] - b[0], a[1] - b[1]); };
    const auto P = arr(xs, zs);
    return bruteMin(
        [&](double s) {
            const auto S = arr(s, 0);
            const double tw = d(S, {ex, 0}) / kCw;
            if (c.size() == 1) return tw + d(S, P) / c[0];
            return tw + bruteMin([&](double b) { return d(S, arr(b, D)) / c[0] + d(arr(b, D), P) / c[1]; }, -40e-3, 100e-3, 301);
        },
        -40e-3, 100e-3, c.size() == 1 ? 20001 : 301);
}

double arrival(const float* tr, size_t n, double expected) {
    auto env = envelope(tr, n);
    const size_t lo = size_t(std::max(1.0, expected - 20)), hi = size_t(std::min(double(n - 2), expected + 20));
    return envelopePeak(env, lo, hi).index;
}

std::vector<double> elementX(int n, double pitch) {
    std::vector<double> x;
    for (int i = 0; i < n; ++i) x.push_back((i - (n - 1) / 2.0) * pitch);
    return x;
}
}  // namespace

TEST(elastic_test, wedge_and_skip_arrivals_match_a_brute_force_least_time_search) {
    auto j = wedgeScene();
    j["paths"] = {{"modes", {"T-T"}}};
    j["reflectors"]["points"] = {{{"position_mm", {17, 0, 12}}, {"amplitude", 1}}};
    auto cap = run(j);
    const auto ex = elementX(16, 0.6e-3);
    for (size_t t : {0, 7, 15})
        for (size_t r : {0, 9, 15}) {
            const double e = (bruteTime(ex[t], {kCt}, 17e-3, 12e-3) + bruteTime(ex[r], {kCt}, 17e-3, 12e-3)) * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, e), e, 0.1) << t << " " << r;
        }
    j["paths"] = {{"modes", {"TT-T"}}};
    j["reflectors"]["points"] = {{{"position_mm", {25, 0, 15}}, {"amplitude", 1}}};
    cap = run(j);
    for (size_t t : {0, 15})
        for (size_t r : {3, 12}) {
            const double e = (bruteTime(ex[t], {kCt, kCt}, 25e-3, 15e-3) + bruteTime(ex[r], {kCt}, 25e-3, 15e-3)) * kFs;
            EXPECT_NEAR(arrival(trace(cap, 0, t, r), cap.header.samples, e), e, 0.1) << t << " " << r;
        }
    EXPECT_EQ(cap.header.truth->frame, "specimen");
    ASSERT_TRUE(cap.header.medium.wedge.has_value());
    EXPECT_DOUBLE_EQ(cap.header.medium.wedge->surface_tilt_rad, 36 * kDeg);
}

TEST(elastic_test, side_drilled_hole_echo_grows_as_the_square_root_of_its_radius) {
    // 2-D Kirchhoff approximation of a rigid or void cylinder far from the array: the
    // pulse-echo amplitude is proportional to sqrt(a) (Schmerr, Fundamentals of Ultrasonic
    // Nondestructive Evaluation, 2nd ed., 2016, ch. 10; from memory).
    auto peakOf = [](double d_mm) {
        auto j = baseScene();
        j["paths"] = {{"modes", {"L-L"}}};
        j["reflectors"]["side_drilled_holes"] = {{{"centre_mm", {0, 15}}, {"diameter_mm", d_mm}, {"amplitude", 1}}};
        auto cap = run(j);
        const double e = 2 * (15e-3 - d_mm / 2 * 1e-3) / kCl * kFs;  // element 3/4 straddle x = 0: near enough
        auto env = envelope(trace(cap, 0, 3, 4), cap.header.samples);
        return envelopePeak(env, size_t(e - 20), size_t(e + 20)).amplitude;
    };
    EXPECT_NEAR(peakOf(4.0) / peakOf(1.0), 2.0, 0.03);
}

TEST(elastic_test, crack_tips_echo_with_opposite_phase) {
    auto j = baseScene();
    j["paths"] = {{"modes", {"L-L"}}};
    j["reflectors"]["planar_flaws"] = {{{"start_mm", {0, 8}}, {"end_mm", {0, 14}}, {"amplitude", 1e-6}, {"tip_amplitude", 1}}};
    auto cap = run(j);
    const double ex = elementX(8, 0.6e-3)[4];
    const float* tr = trace(cap, 0, 4, 4);
    // Pulse peak value at each tip's arrival: the sign of the echo (the pulse is a
    // Gaussian-windowed cosine peaking at its arrival).
    auto at = [&](double z) {
        const double s = 2 * std::hypot(ex, z) / kCl * kFs;
        const size_t i = size_t(std::lround(s));
        double best = 0;
        for (size_t k = i - 1; k <= i + 1; ++k)
            if (std::fabs(tr[k]) > std::fabs(best)) best = tr[k];
        return best;
    };
    EXPECT_GT(at(8e-3), 0);
    EXPECT_LT(at(14e-3), 0);
}

TEST(elastic_test, miller_pursey_directivity_known_values) {
    using umbra::recon::sim::millerPurseyDirectivity;
    // Normalised so that the L lobe is 1 on the normal; no shear wave along the normal or the
    // surface (sin 2t = 0); the shear lobe of steel peaks near 30-35 deg (Miller & Pursey 1954,
    // their figure for Poisson's ratio 0.25-0.3; from memory).
    EXPECT_NEAR(millerPurseyDirectivity(false, 0, kCl, kCt), 1.0, 1e-12);
    EXPECT_NEAR(millerPurseyDirectivity(true, 0, kCl, kCt), 0.0, 1e-12);
    EXPECT_NEAR(millerPurseyDirectivity(true, M_PI / 2 - 1e-9, kCl, kCt), 0.0, 1e-6);
    double best = 0, arg = 0;
    for (double d = 1; d < 89; d += 0.5)
        if (const double v = millerPurseyDirectivity(true, d * kDeg, kCl, kCt); v > best) best = v, arg = d;
    EXPECT_GT(arg, 25);
    EXPECT_LT(arg, 40);
    EXPECT_LT(millerPurseyDirectivity(false, 60 * kDeg, kCl, kCt), millerPurseyDirectivity(false, 10 * kDeg, kCl, kCt));
}

TEST(elastic_test, scene_checks_for_wedges_and_views) {
    auto j = wedgeScene();
    j["wedge"]["height_mm"] = 1;  // 16 elements x 0.6 mm on a 36 deg wedge: the low end would dip into the part
    EXPECT_THROW(scene(j), umbra::core::InputError);
    j = wedgeScene();
    j["wedge"]["angle_deg"] = 90;
    EXPECT_THROW(scene(j), umbra::core::InputError);
    j = wedgeScene();
    j["medium"].erase("thickness_mm");
    j["paths"] = {{"modes", {"TT-T"}}};
    EXPECT_THROW(scene(j), umbra::core::InputError);
    j = wedgeScene();
    j["paths"] = {{"modes", {"Q-T"}}};
    EXPECT_THROW(scene(j), umbra::core::InputError);
    // Default views with a wedge, shear speed and thickness: L-L, T-T and the shear skips.
    EXPECT_EQ(scene(wedgeScene()).elastic.modes, (std::vector<std::string>{"L-L", "T-T", "TT-T", "T-TT", "TT-TT"}));
}

TEST(elastic_test, simulated_points_are_imaged_at_their_true_specimen_positions_in_each_view) {
    const auto dir = std::filesystem::temp_directory_path() / ("umbra_sim_elastic_" + std::to_string(::getpid()));
    std::filesystem::create_directories(dir);
    struct Case {
        const char* mode;
        double x_mm, z_mm;
    };
    for (const Case c : {Case{"T-T", 17, 12}, Case{"TT-T", 20, 15}, Case{"TT-TT", 30, 14}}) {
        auto j = wedgeScene();
        j["paths"] = {{"modes", {c.mode}}};
        j["reflectors"]["points"] = {{{"position_mm", {c.x_mm, 0, c.z_mm}}, {"amplitude", 1}}};
        const std::string path = (dir / (std::string("view_") + c.mode + ".h5")).string();
        umbra::recon::sim::SimOptions o;
        o.threads = 2;
        o.created_utc = "2026-01-01T00:00:00Z";
        umbra::recon::sim::simulateToFile(scene(j), path, o);
        umbra::core::CaptureReader cap(path);
        auto r = umbra::recon::defaultRecipe();
        r.set("delay_model.mode", c.mode);
        r.set("das.interpolation", "cubic");
        r.setNumber("grid.x_min_mm", c.x_mm - 2);
        r.setNumber("grid.x_max_mm", c.x_mm + 2);
        r.setNumber("grid.z_min_mm", c.z_mm - 2);
        r.setNumber("grid.z_max_mm", c.z_mm + 2);
        r.setNumber("grid.step_mm", 0.04);
        umbra::recon::Reconstructor rec(cap, r, 2);
        const auto f = rec.run(0);
        size_t bi = 0;
        for (size_t i = 0; i < f.envelope.size(); ++i)
            if (f.envelope[i] > f.envelope[bi]) bi = i;
        const double x = f.x_m[bi % f.nx()], z = f.z_m[bi / f.nx()];
        const double lambda = kCt / 5e6;  // shear wavelength: lambda / 10 = 65 um
        EXPECT_NEAR(x, c.x_mm * 1e-3, lambda / 10) << c.mode;
        EXPECT_NEAR(z, c.z_mm * 1e-3, lambda / 10) << c.mode;
    }
    std::filesystem::remove_all(dir);
}
