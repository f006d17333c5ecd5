// SPDX-License-Identifier: MIT
// Views (multi-mode TFM) and least-time paths through a wedge: Snell's law on solved paths,
// times against a brute-force search over entry (and back-wall) points, skip paths against the
// mirrored point, and points imaged in each view landing at their true specimen positions.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>

#include "core/capture_file.h"
#include "core/error.h"
#include "reconstruction/calibration.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/ray_path.h"
#include "reconstruction/view_delay_model.h"
#include "reconstruction/view_mode.h"
#include "recon_test_util.h"

using namespace umbra;
using namespace umbra::recon;

namespace {

constexpr double kDeg = M_PI / 180;
// Speeds of a shear-wave wedge on steel (common practice: polystyrene-like wedge 2330 m/s;
// steel 5900 / 3240 m/s, handbook values from memory).
constexpr double kCw = 2330, kCl = 5900, kCt = 3240;

ViewGeometry wedgeGeometry(double tilt = 36 * kDeg, double h0 = 10e-3, double thickness = 20e-3) {
    ViewGeometry g;
    g.wedge = core::WedgeInfo{kCw, {0, 0, h0}, tilt};
    g.c_l_m_s = kCl;
    g.c_t_m_s = kCt;
    g.thickness_m = thickness;
    return g;
}

// Minimum of f over [a, b]: a dense scan of n points, then two more dense scans of n points
// around the best one (a brute-force search, no derivative, no solver).
double bruteMin(const std::function<double(double)>& f, double a, double b, int n = 4001) {
    double best = 1e300, arg = a;
    for (int round = 0; round < 3; ++round) {
        const double h = (b - a) / (n - 1);
        for (int i = 0; i < n; ++i) {
            const double s = a + i * h, v = f(s);
            if (v < best) best = v, arg = s;
        }
        a = arg - h;
        b = arg + h;
    }
    return best;
}

// Array-frame position of a specimen point, written out here from the convention (not the solver).
std::array<double, 2> arrayPoint(const core::WedgeInfo& w, double xs, double zs) {
    const double c = std::cos(w.surface_tilt_rad), s = std::sin(w.surface_tilt_rad);
    return {w.surface_origin_m[0] + xs * c - zs * s, w.surface_origin_m[2] + xs * s + zs * c};
}

double dist(const std::array<double, 2>& a, double ex, double ez) { return std::hypot(a[0] - ex, a[1] - ez); }

// Brute-force least time from element (ex, ez) through the wedge to (xs, zs) along 1 or 2 legs.
double bruteTime(const ViewGeometry& g, double ex, double ez, const std::vector<double>& c, double xs, double zs) {
    const auto& w = *g.wedge;
    const double lo = -60e-3, hi = 120e-3;
    const auto P = arrayPoint(w, xs, zs);
    return bruteMin(
        [&](double s) {
            const auto S = arrayPoint(w, s, 0);
            const double tw = dist(S, ex, ez) / w.speed_of_sound_m_s;
            if (c.size() == 1) return tw + dist(P, S[0], S[1]) / c[0];
            return tw + bruteMin(
                            [&](double b) {
                                const auto B = arrayPoint(w, b, g.thickness_m);
                                return dist(B, S[0], S[1]) / c[0] + dist(P, B[0], B[1]) / c[1];
                            },
                            lo, hi, 401);
        },
        lo, hi, c.size() == 1 ? 40001 : 401);
}

}  // namespace

TEST(ViewMode, ParsesTheLegNotationAndRefusesOtherText) {
    const auto m = parseViewMode("TT-T");
    EXPECT_EQ(m.tx, (std::vector<Wave>{Wave::T, Wave::T}));
    EXPECT_EQ(m.rx, (std::vector<Wave>{Wave::T}));
    EXPECT_FALSE(m.symmetric());
    EXPECT_TRUE(m.usesBackWall());
    EXPECT_TRUE(parseViewMode("L-L").symmetric());
    for (const char* bad : {"", "L", "LLL-L", "X-L", "L-L-L", "L-"}) EXPECT_THROW(parseViewMode(bad), core::SettingError) << bad;
    // Every offered name parses back to itself.
    for (const auto& n : viewModeNames()) EXPECT_EQ(parseViewMode(n).name, n);
}

TEST(ViewMode, MissingShearSpeedOrThicknessIsASettingErrorNamingModeAndAttribute) {
    testutil::SynthSpec s;
    s.elements = 4;
    core::CaptureHeader h = testutil::makeHeader(s);
    try {
        checkViewMode(h, parseViewMode("T-T"));
        FAIL();
    } catch (const core::SettingError& e) {
        EXPECT_NE(std::string(e.what()).find("T-T"), std::string::npos);
        EXPECT_NE(std::string(e.what()).find("shear_speed_m_s"), std::string::npos);
    }
    h.medium.shear_speed_m_s = 3240;
    try {
        checkViewMode(h, parseViewMode("TT-T"));
        FAIL();
    } catch (const core::SettingError& e) {
        EXPECT_NE(std::string(e.what()).find("TT-T"), std::string::npos);
        EXPECT_NE(std::string(e.what()).find("thickness_m"), std::string::npos);
    }
    EXPECT_EQ(validViewModes(h), (std::vector<std::string>{"L-L", "T-T", "L-T", "T-L"}));
    h.medium.thickness_m = 0.02;
    EXPECT_EQ(validViewModes(h).size(), viewModeNames().size());
    // A plane-wave capture: L-L only.
    testutil::SynthSpec pw;
    pw.elements = 4;
    pw.kind = core::TransmitKind::PlaneWave;
    pw.angles = {0.0};
    auto hp = testutil::makeHeader(pw);
    hp.medium.shear_speed_m_s = 3240;
    EXPECT_EQ(validViewModes(hp), (std::vector<std::string>{"L-L"}));
}

TEST(RayPath, SnellsLawThroughTheWedge) {
    // 36 deg incidence in a 2330 m/s wedge refracts to 54.8 deg in 3240 m/s shear:
    // sin(theta2) = 3240 / 2330 sin(36 deg) (Snell's law; worked example of common practice).
    const double th2 = std::asin(kCt / kCw * std::sin(36 * kDeg));
    EXPECT_NEAR(th2 / kDeg, 54.8, 0.05);
    const ViewGeometry g = wedgeGeometry();
    // Centre element (array origin) sits 10 mm above the surface along the array normal; with the
    // array tilted 36 deg its central ray meets the surface at 36 deg at x_s = 0... so a point
    // along the refracted 54.8 deg ray at depth 15 mm must be reached through x_s = 0.
    const double zs = 15e-3, xs = zs * std::tan(th2);
    const RayPath r = g.path({0, 0, 0}, {Wave::T}, xs, zs);
    ASSERT_TRUE(r.valid);
    EXPECT_NEAR(r.entry_x_s, 0, 1e-7);
    EXPECT_NEAR(r.angle_rad[0] / kDeg, 36, 1e-4);
    EXPECT_NEAR(r.angle_rad[1] / kDeg, 54.8, 0.05);
    EXPECT_NEAR(r.element_angle_rad, 0, 1e-6);  // along the array normal
    // Snell's law on other solved paths, angles taken from the entry point's geometry.
    for (double x : {-5e-3, 8e-3, 30e-3})
        for (double e : {-6e-3, 0.0, 6e-3}) {
            const RayPath q = g.path({e, 0, 0}, {Wave::T}, x, 12e-3);
            ASSERT_TRUE(q.valid);
            const auto S = g.toArray(q.entry_x_s, 0), P = g.toArray(x, 12e-3);
            const auto ef = g.toSpecimen(e, 0);
            const double sin1 = std::fabs(q.entry_x_s - ef[0]) / std::hypot(S[0] - e, S[1]);
            const double sin2 = std::fabs(x - q.entry_x_s) / std::hypot(P[0] - S[0], P[1] - S[1]);
            EXPECT_NEAR(sin1 / kCw, sin2 / kCt, 1e-9 / kCt) << x << " " << e;
        }
}

TEST(RayPath, TimesMatchABruteForceSearchOverEntryAndBackWallPoints) {
    const ViewGeometry g = wedgeGeometry();
    struct Case {
        std::vector<Wave> legs;
        std::vector<double> c;
    };
    const std::vector<Case> cases = {{{Wave::L}, {kCl}},
                                     {{Wave::T}, {kCt}},
                                     {{Wave::T, Wave::T}, {kCt, kCt}},
                                     {{Wave::L, Wave::T}, {kCl, kCt}},
                                     {{Wave::T, Wave::L}, {kCt, kCl}}};
    for (const auto& cs : cases)
        for (double e : {-4.5e-3, 4.5e-3})
            for (auto [xs, zs] : {std::pair{2e-3, 5e-3}, std::pair{25e-3, 12e-3}, std::pair{-10e-3, 18e-3}}) {
                const RayPath r = g.path({e, 0, 0}, cs.legs, xs, zs);
                ASSERT_TRUE(r.valid);
                EXPECT_NEAR(r.time_s, bruteTime(g, e, 0, cs.c, xs, zs), 1e-9) << cs.c.size() << " " << e << " " << xs << " " << zs;
            }
}

TEST(RayPath, SameTypeSkipEqualsTheDirectPathToTheMirroredPoint) {
    const ViewGeometry g = wedgeGeometry();
    for (double zs : {3e-3, 11e-3, 19e-3}) {
        const RayPath skip = g.path({1e-3, 0, 0}, {Wave::T, Wave::T}, 30e-3, zs);
        const RayPath mirror = g.path({1e-3, 0, 0}, {Wave::T}, 30e-3, 2 * g.thickness_m - zs);
        EXPECT_NEAR(skip.time_s, mirror.time_s, 1e-13);
    }
    // Below the back wall or inside the wedge: no path.
    EXPECT_FALSE(g.path({0, 0, 0}, {Wave::T, Wave::T}, 30e-3, 21e-3).valid);
    EXPECT_FALSE(g.path({0, 0, 0}, {Wave::T}, 30e-3, -1e-3).valid);
}

TEST(RayPath, ContactDirectPathsAreStraightLines) {
    ViewGeometry g;
    g.c_l_m_s = kCl;
    g.c_t_m_s = kCt;
    g.thickness_m = 20e-3;
    for (auto [x, z] : {std::pair{0.0, 10e-3}, std::pair{15e-3, 4e-3}, std::pair{-3e-3, 19e-3}}) {
        EXPECT_NEAR(g.path({2e-3, 0, 0}, {Wave::T}, x, z).time_s, std::hypot(x - 2e-3, z) / kCt, 1e-14);
        // LL skip: the straight line to the point mirrored in the back wall at 2 d - z.
        EXPECT_NEAR(g.path({2e-3, 0, 0}, {Wave::L, Wave::L}, x, z).time_s, std::hypot(x - 2e-3, 40e-3 - z) / kCl, 1e-14);
    }
}

TEST(ViewDelayModel, WedgeGeometryErrorsAreSettingErrors) {
    testutil::SynthSpec s;
    s.elements = 8;
    s.pitch = 0.6e-3;
    core::CaptureHeader h = testutil::makeHeader(s);
    h.medium.speed_of_sound_m_s = kCl;
    h.medium.shear_speed_m_s = kCt;
    h.medium.wedge = core::WedgeInfo{kCw, {0, 0, -2e-3}, 0.2};  // surface above the array: the array would be inside the part
    EXPECT_THROW(ViewGeometry::fromHeader(h), core::SettingError);
    h.medium.wedge = core::WedgeInfo{kCw, {0, 0, 10e-3}, 95 * kDeg};
    EXPECT_THROW(ViewGeometry::fromHeader(h), core::SettingError);
    h.medium.wedge = core::WedgeInfo{50, {0, 0, 10e-3}, 0.2};
    EXPECT_THROW(ViewGeometry::fromHeader(h), core::SettingError);
    h.medium.wedge = core::WedgeInfo{kCw, {0, 0, 10e-3}, 0.2};
    EXPECT_NO_THROW(ViewGeometry::fromHeader(h));
    h.medium.shear_speed_m_s = 7000;  // faster than longitudinal
    EXPECT_THROW(ViewGeometry::fromHeader(h), core::SettingError);
}

TEST(ViewDelayModel, TablesEqualDirectSolvesAndAreCached) {
    testutil::SynthSpec s;
    s.elements = 8;
    s.pitch = 0.6e-3;
    core::CaptureHeader h = testutil::makeHeader(s);
    h.medium.speed_of_sound_m_s = kCl;
    h.medium.shear_speed_m_s = kCt;
    h.medium.thickness_m = 20e-3;
    h.medium.wedge = core::WedgeInfo{kCw, {0, 0, 10e-3}, 36 * kDeg};
    Grid grid{0, 20e-3, 0, 20e-3, 0.5e-3};
    clearTravelTimeCache();
    const ViewGeometry g = ViewGeometry::fromHeader(h);
    ViewDelayModel m(h, g, parseViewMode("TT-T"), grid, 2);
    EXPECT_FALSE(m.reciprocal());
    EXPECT_TRUE(m.specimenFrame());
    EXPECT_EQ(m.tableBytes(), 2 * 8 * grid.nx() * grid.nz() * sizeof(float));
    EXPECT_EQ(travelTimeCacheBytes(), m.tableBytes());
    std::vector<float> x{0, 5e-3f, 10.25e-3f, 19.5e-3f}, z{0, 7.5e-3f, 3.25e-3f, 20e-3f}, tt(4), tr(4);
    m.elementTime(h.array.element_position_m[3], 3, DelayLeg::Transmit, x.data(), z.data(), 4, tt.data());
    m.elementTime(h.array.element_position_m[3], 3, DelayLeg::Receive, x.data(), z.data(), 4, tr.data());
    for (size_t i = 0; i < 4; ++i) {
        const double want_t = g.path(h.array.element_position_m[3], {Wave::T, Wave::T}, x[i], z[i]).time_s;
        const double want_r = g.path(h.array.element_position_m[3], {Wave::T}, x[i], z[i]).time_s;
        // Grid nodes exactly; between nodes (bilinear) within 1 ns.
        EXPECT_NEAR(tt[i], want_t, (i == 2 ? 1e-9 : 1e-12 + 1e-7 * want_t)) << i;
        EXPECT_NEAR(tr[i], want_r, (i == 2 ? 1e-9 : 1e-12 + 1e-7 * want_r)) << i;
    }
    // Same geometry again: from the cache (no build time, no new bytes).
    ViewDelayModel m2(h, g, parseViewMode("TT-T"), grid, 2);
    EXPECT_EQ(m2.buildSeconds(), 0);
    EXPECT_EQ(travelTimeCacheBytes(), m.tableBytes());
    clearTravelTimeCache();
}

namespace {

// Full-matrix capture of one point seen in one view through the wedge (or on contact), times
// from the brute-force search (independent of the solver); Gaussian-modulated echoes as in
// recon_test_util.h.
std::string writeViewCapture(const std::string& name, const core::CaptureHeader& h0, const ViewGeometry& g, const ViewMode& mode,
                             double xs, double zs, double fixed_delay_s = 0) {
    core::CaptureHeader h = h0;
    const std::string path = testutil::tempPath(name);
    const size_t nel = h.array.elementCount();
    auto speeds = [&](const std::vector<Wave>& legs) {
        std::vector<double> c;
        for (auto w : legs) c.push_back(g.speed(w));
        return c;
    };
    std::vector<double> ttx(nel), trx(nel);
    for (size_t e = 0; e < nel; ++e) {
        const auto& p = h.array.element_position_m[e];
        if (g.wedge) {
            ttx[e] = bruteTime(g, p[0], p[2], speeds(mode.tx), xs, zs);
            trx[e] = bruteTime(g, p[0], p[2], speeds(mode.rx), xs, zs);
        } else {  // contact: straight lines to the point or its mirror image in the back wall
            auto t = [&](const std::vector<Wave>& legs) {
                if (legs.size() == 1) return std::hypot(xs - p[0], zs) / g.speed(legs[0]);
                return std::hypot(xs - p[0], 2 * g.thickness_m - zs) / g.speed(legs[0]);  // same-type skips only here
            };
            ttx[e] = t(mode.tx);
            trx[e] = t(mode.rx);
        }
    }
    const double f0 = h.array.centre_frequency_hz, fs = h.receive.sampling_frequency_hz;
    const double sig = testutil::sigmaFor(f0, h.array.fractional_bandwidth);
    core::CaptureWriter w(path, h);
    std::vector<float> block(h.blockSize());
    for (size_t t = 0; t < nel; ++t) {
        std::fill(block.begin(), block.end(), 0.0f);
        for (size_t r = 0; r < nel; ++r) {
            const double tau = ttx[t] + trx[r] + fixed_delay_s;
            for (size_t k = 0; k < h.samples; ++k) {
                const double dt = double(k) / fs - tau;
                if (std::fabs(dt) < 5 * sig) block[r * h.samples + k] = float(std::exp(-dt * dt / (2 * sig * sig)) * std::cos(2 * M_PI * f0 * dt));
            }
        }
        w.writeBlock(0, t, block.data());
    }
    w.finish();
    return path;
}

core::CaptureHeader wedgeHeader(bool wedge) {
    testutil::SynthSpec s;
    s.elements = 16;
    s.pitch = 0.6e-3;
    s.f0 = 5e6;
    s.fs = 50e6;
    s.samples = 2000;
    core::CaptureHeader h = testutil::makeHeader(s);
    h.medium.speed_of_sound_m_s = kCl;
    h.medium.shear_speed_m_s = kCt;
    h.medium.thickness_m = 20e-3;
    if (wedge) h.medium.wedge = core::WedgeInfo{kCw, {0, 0, 10e-3}, 36 * kDeg};
    return h;
}

void expectImagedAt(const std::string& tag, const core::CaptureHeader& h, const std::string& mode, double xs, double zs) {
    const ViewGeometry g = ViewGeometry::fromHeader(h);
    const std::string path = writeViewCapture("view_" + tag + ".h5", h, g, parseViewMode(mode), xs, zs);
    core::CaptureReader cap(path);
    core::Recipe r = defaultRecipe();
    r.set("delay_model.mode", mode);
    r.set("das.interpolation", "cubic");
    testutil::setRegion(r, xs * 1e3 - 2, xs * 1e3 + 2, zs * 1e3 - 2, zs * 1e3 + 2, 0.04);
    Reconstructor rec(cap, r, 2);
    const core::Frame f = rec.run(0);
    const auto pk = testutil::framePeak(f);
    // Within a tenth of the shortest wavelength of the view's legs (the positioning target).
    const double lambda = (parseViewMode(mode).usesShear() ? kCt : kCl) / h.array.centre_frequency_hz;
    EXPECT_NEAR(pk.x_m, xs, lambda / 10) << tag << " " << mode;
    EXPECT_NEAR(pk.z_m, zs, lambda / 10) << tag << " " << mode;
    std::filesystem::remove(path);
}

}  // namespace

TEST(ViewImaging, APointLandsAtItsTrueSpecimenPositionInEachWedgeView) {
    const auto h = wedgeHeader(true);
    expectImagedAt("wedge_tt", h, "T-T", 17e-3, 12e-3);
    expectImagedAt("wedge_ll", h, "L-L", 4e-3, 10e-3);
    expectImagedAt("wedge_tt_t", h, "TT-T", 20e-3, 15e-3);
    expectImagedAt("wedge_tttt", h, "TT-TT", 30e-3, 14e-3);
    expectImagedAt("wedge_lt_t", h, "LT-T", 18e-3, 12e-3);
}

TEST(ViewImaging, ContactViewsUseTheShearSpeedAndTheBackWall) {
    const auto h = wedgeHeader(false);
    expectImagedAt("contact_tt", h, "T-T", 1e-3, 10e-3);
    expectImagedAt("contact_tt_t", h, "TT-T", -1e-3, 15e-3);
    expectImagedAt("contact_llll", h, "LL-LL", 0.5e-3, 12e-3);
}

TEST(ViewImaging, ASkipViewWithTheGridBelowTheBackWallHasNoPath) {
    const auto h = wedgeHeader(true);
    core::Recipe r = defaultRecipe();
    r.set("delay_model.mode", "TT-T");
    testutil::setRegion(r, 0, 10, 25, 30, 0.5);
    const Grid grid = resolveGrid(h, r);
    EXPECT_THROW(makeDelayModel(h, r, &grid), core::SettingError);
}

// A fixed delay in every trace (a wedge whose delay differs from its model, a system delay) is
// found from a reflector at a known place seen through the wedge, and removed by
// delay_model.fixed_delay_us. The echoes are placed by the brute-force search (not the solver)
// 0.40 µs late; the calibration must give 0.40 µs within its expanded uncertainty and 5 ns.
TEST(WedgeDelay, FoundFromAKnownReflectorAndRemovedBeforeImaging) {
    const auto h = wedgeHeader(true);
    const ViewGeometry g = ViewGeometry::fromHeader(h);
    const double xs = 17e-3, zs = 12e-3, d = 0.40e-6;
    const std::string late = writeViewCapture("delay_late.h5", h, g, parseViewMode("T-T"), xs, zs, d);
    const std::string exact = writeViewCapture("delay_exact.h5", h, g, parseViewMode("T-T"), xs, zs, 0);
    {
        core::CaptureReader cap(late);
        const DelayCalibration c = fixedDelayFromReflector(cap, xs, zs, 0, 0.05e-3, Wave::T);
        EXPECT_NEAR(c.delay.value, d, 5e-9);
        EXPECT_LE(std::fabs(c.delay.value - d), c.delay.budget.expanded());
        EXPECT_GE(c.elements, 3u);
        for (const auto& n : c.notes) EXPECT_EQ(n.find("Another echo"), std::string::npos) << n;  // one isolated point
        // Position tolerance ±0.05 mm: 2 a / (√3 c_T) = 17.8 ns standard, the largest component.
        EXPECT_NEAR(c.delay.budget.components.back().standard, 2 * 0.05e-3 / (std::sqrt(3.0) * kCt), 1e-12);
        // The same reflector with a 1 mm hole radius assumed: the model's echo comes 2 r / c_T
        // earlier, so the delay found grows by that much.
        const DelayCalibration hole = fixedDelayFromReflector(cap, xs, zs, 1e-3, 0.05e-3, Wave::T);
        EXPECT_NEAR(hole.delay.value - c.delay.value, 2 * 1e-3 / kCt, 2e-9);
        // A longitudinal path to the same place gives a different model time: no echo in range.
        EXPECT_THROW(fixedDelayFromReflector(cap, xs, zs, 0, 0.05e-3, Wave::L, 0, 0.2e-6), core::InputError);
    }
    {
        core::CaptureReader cap(exact);
        EXPECT_NEAR(fixedDelayFromReflector(cap, xs, zs, 0, 0.05e-3, Wave::T).delay.value, 0, 5e-9);
    }
    // Imaging the late capture: 0.40 µs of round trip is about 0.65 mm along the shear ray;
    // with the delay removed the point lands within λ/10 again.
    core::CaptureReader cap(late);
    core::Recipe r = defaultRecipe();
    r.set("delay_model.mode", "T-T");
    r.set("das.interpolation", "cubic");
    testutil::setRegion(r, xs * 1e3 - 2, xs * 1e3 + 2, zs * 1e3 - 2, zs * 1e3 + 2, 0.04);
    const double lambda = kCt / h.array.centre_frequency_hz;
    const auto off = testutil::framePeak(Reconstructor(cap, r, 2).run(0));
    EXPECT_GT(std::hypot(off.x_m - xs, off.z_m - zs), lambda / 2);
    r.setNumber("delay_model.fixed_delay_us", 0.40);
    const auto on = testutil::framePeak(Reconstructor(cap, r, 2).run(0));
    EXPECT_NEAR(on.x_m, xs, lambda / 10);
    EXPECT_NEAR(on.z_m, zs, lambda / 10);
    // The wavenumber method takes no fixed delay: a setting error, not a silent wrong image.
    r.set("das.method", "wavenumber");
    r.set("delay_model.mode", "L-L");
    EXPECT_THROW(Reconstructor(cap, r, 2), core::SettingError);
    std::filesystem::remove(late);
    std::filesystem::remove(exact);
}
