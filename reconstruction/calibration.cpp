// SPDX-License-Identifier: MIT
#include "reconstruction/calibration.h"

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <sstream>

#include "core/error.h"
#include "reconstruction/analytic_stage.h"
#include "reconstruction/ray_path.h"

namespace umbra::recon {
namespace {

constexpr size_t kUpsample = 8;  // band-limited upsampling of the analytic signal for peak times

double median(std::vector<double> v) {
    if (v.empty()) return std::numeric_limits<double>::quiet_NaN();
    const size_t m = v.size() / 2;
    std::nth_element(v.begin(), v.begin() + long(m), v.end());
    double hi = v[m];
    if (v.size() % 2) return hi;
    const double lo = *std::max_element(v.begin(), v.begin() + long(m));
    return (lo + hi) / 2;
}

double mad(const std::vector<double>& v, double med) {
    std::vector<double> d;
    d.reserve(v.size());
    for (double x : v) d.push_back(std::abs(x - med));
    return median(d);
}

std::string fmt(double v, int decimals) {
    std::ostringstream s;
    s.setf(std::ios::fixed);
    s.precision(decimals);
    s << v;
    return s.str();
}

// Pulse-echo traces (transmit i, receive i) of a full matrix, read one block at a time.
struct PulseEcho {
    const core::CaptureReader& cap;
    const core::CaptureHeader& h;
    std::vector<std::pair<size_t, size_t>> pairs;  // (transmit, receive index) per element with both
    std::vector<int> element;                       // the element of each pair
    explicit PulseEcho(const core::CaptureReader& c) : cap(c), h(c.header()) {
        if (h.transmit.kind != core::TransmitKind::SingleElement)
            throw core::SettingError(c.path() + ": calibration needs pulse-echo traces: a full-matrix capture (single-element "
                                                "transmits), not " + std::string(core::toString(h.transmit.kind)));
        for (size_t t = 0; t < h.transmits(); ++t)
            for (size_t r = 0; r < h.receives(); ++r)
                if (h.receive.element_index[r] == h.transmit.source_element[t]) {
                    pairs.emplace_back(t, r);
                    element.push_back(h.transmit.source_element[t]);
                }
        if (pairs.empty()) throw core::SettingError(c.path() + ": no element both transmits and receives: no pulse-echo traces");
    }
};

// Envelope of every pulse-echo trace of a frame, upsampled: env[k][j], time of sample j is
// start[k] + j / (fs U).
struct Envelopes {
    std::vector<std::vector<float>> env;
    std::vector<double> start_s;
    std::vector<double> floor;  // per trace: median envelope (the noise level of a sparse trace)
    double fs_up = 0;
    double record_end_s = 0;  // latest time every trace holds
};

Envelopes envelopes(const PulseEcho& pe, size_t frame) {
    const auto& h = pe.h;
    if (frame >= h.frames)
        throw core::SettingError("frame " + std::to_string(frame + 1) + " does not exist (the capture has " + std::to_string(h.frames) +
                                 " frames)");
    const size_t ns = h.samples;
    if (ns < 8) throw core::InputError(pe.cap.path(), "/data/rf", "traces are too short to find an echo");
    Envelopes out;
    out.fs_up = h.receive.sampling_frequency_hz * double(kUpsample);
    AnalyticSignal an(ns, kUpsample);
    std::vector<float> block(h.blockSize()), iq(2 * ns * kUpsample);
    out.record_end_s = std::numeric_limits<double>::infinity();
    size_t last_t = size_t(-1);
    for (auto [t, r] : pe.pairs) {
        if (t != last_t) {
            pe.cap.readBlock(frame, t, block.data());
            last_t = t;
        }
        an.run(block.data() + r * ns, iq.data());
        std::vector<float> e(ns * kUpsample);
        for (size_t j = 0; j < e.size(); ++j) e[j] = std::hypot(iq[2 * j], iq[2 * j + 1]);
        out.floor.push_back(median(std::vector<double>(e.begin(), e.end())));
        out.env.push_back(std::move(e));
        const double st = h.receive.start_time_s[t];
        out.start_s.push_back(st);
        out.record_end_s = std::min(out.record_end_s, st + double(ns - 1) / h.receive.sampling_frequency_hz);
    }
    return out;
}

struct Peak {
    double time_s = 0, amplitude = 0;
    bool found = false;
};

// Largest envelope sample in [t0, t1], refined by a parabola through it and its neighbours.
// An echo must stand kEchoOverFloor above the trace's median envelope (12 dB) to count.
constexpr double kEchoOverFloor = 4;

Peak peakIn(const std::vector<float>& env, double start_s, double fs_up, double t0, double t1, double floor) {
    const long n = long(env.size());
    const long a = std::max(1L, long(std::ceil((t0 - start_s) * fs_up)));
    const long b = std::min(n - 2, long(std::floor((t1 - start_s) * fs_up)));
    Peak p;
    if (b < a) return p;
    long k = a;
    for (long j = a; j <= b; ++j)
        if (env[size_t(j)] > env[size_t(k)]) k = j;
    const double y0 = env[size_t(k - 1)], y1 = env[size_t(k)], y2 = env[size_t(k + 1)];
    const double d = y0 - 2 * y1 + y2;
    const double delta = d < 0 ? std::clamp(0.5 * (y0 - y2) / d, -0.5, 0.5) : 0.0;
    p.time_s = start_s + (double(k) + delta) / fs_up;
    p.amplitude = y1;
    p.found = y1 > 0 && y1 > kEchoOverFloor * floor;
    return p;
}

// Sampling part of an echo time's uncertainty: the peak is picked on a grid of 1 / (fs U) and
// refined; taken as rectangular over one upsampled step (conservative), u = step / √12.
double pickingU(double fs_up) { return 1 / (fs_up * std::sqrt(12.0)); }

// Back-wall-like echo (same time for every element): median over the elements whose peak is
// within 12 dB of the median peak.
EchoTime flatEcho(const Envelopes& E, double t0, double t1, const std::string& path, const std::string& what) {
    std::vector<Peak> peaks;
    std::vector<double> amps;
    for (size_t k = 0; k < E.env.size(); ++k) {
        peaks.push_back(peakIn(E.env[k], E.start_s[k], E.fs_up, t0, t1, E.floor[k]));
        if (peaks.back().found) amps.push_back(peaks.back().amplitude);
    }
    if (amps.empty()) throw core::InputError(path, "/data/rf", "no " + what + " echo (12 dB above the noise) between " + fmt(t0 * 1e6, 2) + " and " + fmt(t1 * 1e6, 2) + " µs");
    const double amed = median(amps);
    std::vector<double> times, used_amps;
    for (const auto& p : peaks)
        if (p.found && p.amplitude >= amed / 4) {
            times.push_back(p.time_s);
            used_amps.push_back(p.amplitude);
        }
    EchoTime e;
    e.time_s = median(times);
    e.elements = times.size();
    e.amplitude = median(used_amps);
    // Spread over elements (robust standard deviation 1.4826 MAD; the median's standard error is
    // about 1.25 s / √N for normal data) and peak picking.
    const double s = 1.4826 * mad(times, e.time_s);
    const double u_spread = 1.2533 * s / std::sqrt(double(times.size()));
    e.u_time_s = std::hypot(u_spread, pickingU(E.fs_up));
    return e;
}

// Hole echo: times of the elements about the strongest one, hyperbola vertex. The strongest
// element's echo is searched for in [t0, t1]; its neighbours' only where the hyperbola through
// it can put theirs, so that other reflectors' echoes do not enter the fit.
EchoTime holeEcho(const PulseEcho& pe, const Envelopes& E, double t0, double t1, double c_nominal, const std::string& what) {
    std::vector<Peak> peaks;
    size_t best = 0;
    for (size_t k = 0; k < E.env.size(); ++k) {
        peaks.push_back(peakIn(E.env[k], E.start_s[k], E.fs_up, t0, t1, E.floor[k]));
        if (peaks[k].amplitude > peaks[best].amplitude) best = k;
    }
    if (!peaks[best].found)
        throw core::InputError(pe.cap.path(), "/data/rf", "no " + what + " echo (12 dB above the noise) between " + fmt(t0 * 1e6, 2) + " and " + fmt(t1 * 1e6, 2) + " µs");
    const double pitch = std::max(pe.h.array.pitch_m(), 1e-6), reach = 4.5 * pitch;
    const double tb = peaks[best].time_s, zb = tb * c_nominal / 2, period = 1 / std::max(pe.h.array.centre_frequency_hz, 1.0);
    const double rise = 2 * (std::hypot(zb, reach) - zb) / c_nominal;  // largest hyperbola rise over the fit's reach
    std::vector<double> x, t2;
    const double xb = pe.h.array.element_position_m[size_t(pe.element[best])][0];
    for (size_t k = 0; k < peaks.size(); ++k) {
        const double xk = pe.h.array.element_position_m[size_t(pe.element[k])][0];
        if (std::abs(xk - xb) > reach) continue;
        const Peak p = k == best ? peaks[k] : peakIn(E.env[k], E.start_s[k], E.fs_up, tb - period, tb + 1.2 * rise + period, E.floor[k]);
        if (!p.found || p.amplitude < peaks[best].amplitude / 2) continue;  // within 6 dB of the strongest
        x.push_back(xk - xb);
        t2.push_back(p.time_s * p.time_s);
    }
    EchoTime e;
    e.amplitude = peaks[best].amplitude;
    e.elements = x.size();
    double tv = peaks[best].time_s, u_fit = 0;
    if (x.size() >= 3) {
        Eigen::MatrixXd A(x.size(), 3);
        Eigen::VectorXd b(x.size());
        for (size_t i = 0; i < x.size(); ++i) {
            A(long(i), 0) = x[i] * x[i];
            A(long(i), 1) = x[i];
            A(long(i), 2) = 1;
            b(long(i)) = t2[i];
        }
        const Eigen::Vector3d q = A.colPivHouseholderQr().solve(b);
        const double v2 = q(2) - q(1) * q(1) / (4 * q(0));
        if (q(0) > 0 && v2 > 0) {
            tv = std::sqrt(v2);
            if (x.size() > 3) {
                const double rss = (A * q - b).squaredNorm();
                // residual standard deviation of t² over the dof, as a time near the vertex
                u_fit = std::sqrt(rss / double(x.size() - 3)) / (2 * tv) / std::sqrt(double(x.size()));
            }
        }
    }
    e.time_s = tv;
    e.u_time_s = std::hypot(u_fit, pickingU(E.fs_up));
    return e;
}

// Largest side-drilled hole radius the search allows for (reference blocks: Ø1–3 mm, common practice).
constexpr double kMaxHoleRadius = 2e-3;

void speedWindow(const core::CaptureHeader& h, double& c_min, double& c_max) {
    const double c = h.medium.speed_of_sound_m_s;
    if (!(c_min > 0)) c_min = c > 0 ? 0.6 * c : 1000;
    if (!(c_max > 0)) c_max = c > 0 ? 1.6 * c : 10000;
    if (!(c_max > c_min)) throw core::SettingError("speed search range: the largest speed must exceed the smallest");
}

}  // namespace

SpeedCalibration speedFromBackWall(const core::CaptureReader& capture, double d, double tol, size_t frame, double c_min,
                                   double c_max) {
    if (!(d > 0) || !std::isfinite(d)) throw core::SettingError("thickness must be a positive number of millimetres");
    if (!(tol >= 0) || !std::isfinite(tol) || tol >= d) throw core::SettingError("thickness tolerance must be at least 0 and below the thickness");
    PulseEcho pe(capture);
    speedWindow(pe.h, c_min, c_max);
    const Envelopes E = envelopes(pe, frame);
    const double lo = 2 * d / c_max, hi = std::min(2 * d / c_min, E.record_end_s);
    if (hi <= lo)
        throw core::InputError(capture.path(), "/data/rf", "the record ends at " + fmt(E.record_end_s * 1e6, 2) +
                                                               " µs, before a back wall at " + fmt(d * 1e3, 2) + " mm could echo");
    const EchoTime e1 = flatEcho(E, lo, hi, capture.path(), "back-wall");

    SpeedCalibration out;
    out.echoes.push_back(e1);
    const double u_d = tol / std::sqrt(3.0);
    auto single = [&] {
        core::MeasuredValue c{"speed of sound", 2 * d / e1.time_s, "m/s", {}, false};
        c.budget.add("thickness", "tolerance ±" + fmt(tol * 1e3, 3) + " mm, rectangular, /√3", c.value * u_d / d);
        c.budget.add("echo time", "spread over " + std::to_string(e1.elements) + " pulse-echo traces and peak picking",
                     c.value * e1.u_time_s / e1.time_s);
        return c;
    }();
    out.method = "back wall";
    out.speed = single;
    out.notes.push_back("c = 2 d / t assumes time zero at the element face (no wedge, delay line or system delay).");

    // The repeat (second round trip) between t1 + 2d/c_max and t1 + 2d/c_min, inside the record.
    const double r_lo = e1.time_s + 2 * d / c_max, r_hi = e1.time_s + 2 * d / c_min;
    if (r_hi <= E.record_end_s) {
        try {
            const EchoTime e2 = flatEcho(E, r_lo, r_hi, capture.path(), "back-wall repeat");
            if (e2.amplitude >= e1.amplitude / 4) {
                out.echoes.push_back(e2);
                const double dt = e2.time_s - e1.time_s;
                const double u_dt = std::hypot(e1.u_time_s, e2.u_time_s);
                core::MeasuredValue c{"speed of sound", 2 * d / dt, "m/s", {}, false};
                c.budget.add("thickness", "tolerance ±" + fmt(tol * 1e3, 3) + " mm, rectangular, /√3", c.value * u_d / d);
                c.budget.add("echo interval", "first echo and repeat, " + std::to_string(e2.elements) + " traces", c.value * u_dt / dt);
                core::MeasuredValue t0{"fixed delay", 2 * e1.time_s - e2.time_s, "s", {}, false};
                t0.budget.add("echo times", "2 t1 - t2", std::hypot(2 * e1.u_time_s, e2.u_time_s));
                out.single_echo_speed = single;
                out.speed = c;
                out.fixed_delay = t0;
                out.method = "back wall and its repeat";
                out.notes.clear();
                out.notes.push_back("c = 2 d / (t2 - t1) from the back wall and its repeat: free of any fixed delay, which is t0 = 2 t1 - t2.");
            }
        } catch (const core::InputError&) {
            // no usable repeat: the single echo stands
        }
    }
    out.notes.push_back("The plate's faces are taken as parallel to the array; echo times are envelope peaks.");
    return out;
}

SpeedCalibration speedFromHoles(const core::CaptureReader& capture, double z1, double z2, double tol, size_t frame) {
    if (!(z1 > 0) || !(z2 > 0) || !std::isfinite(z1) || !std::isfinite(z2))
        throw core::SettingError("hole depths must be positive numbers of millimetres");
    if (z2 < z1) std::swap(z1, z2);
    if (!(z2 - z1 > 0)) throw core::SettingError("the two holes must be at different depths");
    if (!(tol >= 0) || !std::isfinite(tol)) throw core::SettingError("depth tolerance must be at least 0");
    PulseEcho pe(capture);
    double c_min = 0, c_max = 0;
    const double c_cap = pe.h.medium.speed_of_sound_m_s;
    if (c_cap > 0) {
        c_min = 0.9 * c_cap;  // narrower than for a back wall: the holes' windows must not hold each other's echoes
        c_max = 1.1 * c_cap;
    }
    speedWindow(pe.h, c_min, c_max);
    const double c_nominal = c_cap > 0 ? c_cap : std::sqrt(c_min * c_max);
    const Envelopes E = envelopes(pe, frame);
    auto echo = [&](double z, const std::string& what) {
        // The echo comes from the hole's near surface, above its centre: allow kMaxHoleRadius.
        const double lo = 2 * std::max(0.0, z - kMaxHoleRadius) / c_max, hi = std::min(2 * z / c_min, E.record_end_s);
        if (hi <= lo) throw core::InputError(capture.path(), "/data/rf", "the record ends before the " + what + " could echo");
        return holeEcho(pe, E, lo, hi, c_nominal, what);
    };
    const EchoTime e1 = echo(z1, "hole at " + fmt(z1 * 1e3, 2) + " mm");
    const EchoTime e2 = echo(z2, "hole at " + fmt(z2 * 1e3, 2) + " mm");
    const double dt = e2.time_s - e1.time_s;
    if (!(dt > 0))
        throw core::InputError(capture.path(), "/data/rf", "the echoes found for the two holes are not in depth order (" +
                                                               fmt(e1.time_s * 1e6, 3) + " and " + fmt(e2.time_s * 1e6, 3) + " µs)");
    SpeedCalibration out;
    out.method = "two holes";
    out.echoes = {e1, e2};
    core::MeasuredValue c{"speed of sound", 2 * (z2 - z1) / dt, "m/s", {}, false};
    const double u_dz = std::sqrt(2.0) * tol / std::sqrt(3.0);
    c.budget.add("hole depths", "tolerance ±" + fmt(tol * 1e3, 3) + " mm each, rectangular, /√3", c.value * u_dz / (z2 - z1));
    c.budget.add("echo times", "hyperbola vertices and peak picking", c.value * std::hypot(e1.u_time_s, e2.u_time_s) / dt);
    out.speed = c;
    out.notes.push_back("c = 2 (z2 - z1) / (t2 - t1): the holes' equal radius and any fixed delay cancel.");
    return out;
}

core::MeasuredValue fixedDelay(const EchoTime& echo, double d, double tol, double c, double u_c) {
    if (!(c > 0) || !(d > 0)) throw core::SettingError("fixed delay: depth and speed must be positive");
    core::MeasuredValue t0{"fixed delay", echo.time_s - 2 * d / c, "s", {}, false};
    t0.budget.add("echo time", "peak picking and spread", echo.u_time_s);
    t0.budget.add("reflector depth", "tolerance ±" + fmt(tol * 1e3, 3) + " mm, rectangular, /√3", 2 * (tol / std::sqrt(3.0)) / c);
    t0.budget.add("speed of sound", "standard uncertainty " + fmt(u_c, 1) + " m/s", 2 * d * u_c / (c * c));
    return t0;
}

DelayCalibration fixedDelayFromReflector(const core::CaptureReader& capture, double xs, double zs, double radius, double tol, Wave wave,
                                         size_t frame, double search_s) {
    if (!std::isfinite(xs) || !(zs > 0) || !std::isfinite(zs))
        throw core::SettingError("reflector position: x must be a number and the depth positive (mm)");
    if (!(radius >= 0) || !std::isfinite(radius)) throw core::SettingError("hole diameter must be 0 (a point or tip) or positive");
    if (!(tol >= 0) || !std::isfinite(tol)) throw core::SettingError("position tolerance must be at least 0");
    if (!(search_s > 0) || !std::isfinite(search_s)) throw core::SettingError("delay search range must be positive");
    PulseEcho pe(capture);
    const ViewGeometry g = ViewGeometry::fromHeader(pe.h);
    const double c = g.speed(wave);
    const char* wname = wave == Wave::L ? "longitudinal" : "shear";
    if (!(c > 0))
        throw core::SettingError(capture.path() + ": a " + std::string(wname) + "-wave delay needs the part's " +
                                 (wave == Wave::L ? "speed of sound" : "shear speed (/medium@shear_speed_m_s)"));
    if (radius > 0 && !(zs - radius > 0)) throw core::SettingError("the hole must lie below the surface (depth greater than its radius)");
    // Model round trip of every pulse-echo trace; a trace no path serves is left out.
    std::vector<double> model(pe.pairs.size(), std::numeric_limits<double>::quiet_NaN());
    size_t reachable = 0;
    for (size_t k = 0; k < pe.pairs.size(); ++k) {
        const RayPath r = g.path(pe.h.array.element_position_m[size_t(pe.element[k])], {wave}, xs, zs);
        if (!r.valid) continue;
        model[k] = 2 * r.time_s - 2 * radius / c;
        ++reachable;
    }
    const std::string what = "reflector at x = " + fmt(xs * 1e3, 2) + " mm, depth " + fmt(zs * 1e3, 2) + " mm";
    if (reachable == 0) throw core::SettingError(capture.path() + ": no " + std::string(wname) + " path reaches the " + what);
    const Envelopes E = envelopes(pe, frame);
    // Stack the pulse-echo envelopes along the model's moveout: S(d) = Σ_k env_k(model_k + d).
    // Only echoes of a reflector at the assumed place line up for one d; another reflector in
    // the window has another moveout and stacks weakly, even when it is the stronger echo.
    const long nd = long(std::ceil(search_s * E.fs_up));
    std::vector<double> stack(size_t(2 * nd + 1), 0.0);
    for (size_t k = 0; k < model.size(); ++k) {
        if (!std::isfinite(model[k])) continue;
        const auto& env = E.env[k];
        for (long i = -nd; i <= nd; ++i) {
            const double pos = (model[k] + double(i) / E.fs_up - E.start_s[k]) * E.fs_up;
            const long j = long(std::floor(pos));
            if (j < 0 || j + 1 >= long(env.size())) continue;
            const double f = pos - double(j);
            stack[size_t(i + nd)] += (1 - f) * env[size_t(j)] + f * env[size_t(j + 1)];
        }
    }
    const long ib = long(std::max_element(stack.begin(), stack.end()) - stack.begin());
    const double shift = double(ib - nd) / E.fs_up;
    // Each element's own echo near the stacked delay (one period either side).
    const double period = 1 / std::max(pe.h.array.centre_frequency_hz, 1.0);
    // A second reflector close in range to the first, seen over the same small angular aperture,
    // stacks almost as well at another delay: a delay and a range shift cannot be told apart from
    // one reflector. Say so when another stack maximum (beyond two periods) is within 12 dB.
    std::optional<double> rival;
    {
        const long guard = long(std::ceil(2 * period * E.fs_up));
        long ir = -1;
        for (long i = 1; i + 1 < long(stack.size()); ++i)
            if (std::labs(i - ib) > guard && stack[size_t(i)] >= stack[size_t(i - 1)] && stack[size_t(i)] >= stack[size_t(i + 1)] &&
                (ir < 0 || stack[size_t(i)] > stack[size_t(ir)]))
                ir = i;
        if (ir >= 0 && stack[size_t(ir)] >= stack[size_t(ib)] / 4) rival = double(ir - nd) / E.fs_up;
    }
    std::vector<Peak> peaks(model.size());
    double strongest = 0;
    for (size_t k = 0; k < model.size(); ++k) {
        if (!std::isfinite(model[k])) continue;
        peaks[k] = peakIn(E.env[k], E.start_s[k], E.fs_up, model[k] + shift - period, model[k] + shift + period, E.floor[k]);
        if (peaks[k].found) strongest = std::max(strongest, peaks[k].amplitude);
    }
    if (!(strongest > 0))
        throw core::InputError(capture.path(), "/data/rf", "no echo of the " + what + " (12 dB above the noise) within ±" +
                                                               fmt(search_s * 1e6, 2) + " µs of its model time in any pulse-echo trace");
    std::vector<double> residual;
    for (size_t k = 0; k < model.size(); ++k)
        if (std::isfinite(model[k]) && peaks[k].found && peaks[k].amplitude >= strongest / 2)  // within 6 dB of the strongest
            residual.push_back(peaks[k].time_s - model[k]);
    DelayCalibration out;
    out.x_s_m = xs;
    out.z_s_m = zs;
    out.radius_m = radius;
    out.wave = wave;
    out.elements = residual.size();
    out.amplitude = strongest;
    const double med = median(residual);
    out.spread_s = 1.4826 * mad(residual, med);
    core::MeasuredValue d{"fixed delay", med, "s", {}, false};
    d.budget.add("echo times", "spread over " + std::to_string(residual.size()) + " elements (standard error of a median)",
                 1.2533 * out.spread_s / std::sqrt(double(residual.size())));
    d.budget.add("peak picking", "one upsampled step, rectangular, /√12", pickingU(E.fs_up));
    // |grad of 2 τ| = 2 / c along the last leg; x and z each ±a, rectangular.
    d.budget.add("reflector position", "tolerance ±" + fmt(tol * 1e3, 3) + " mm in x and depth, rectangular, /√3", 2 * tol / (std::sqrt(3.0) * c));
    out.delay = d;
    if (residual.size() < 3) out.notes.push_back("Only " + std::to_string(residual.size()) + " element(s) saw the reflector within 6 dB of the strongest: the spread is not known.");
    if (out.spread_s > period / 4)
        out.notes.push_back("The echoes do not follow the moveout of a reflector at this place (spread " + fmt(out.spread_s * 1e9, 0) +
                            " ns across elements, more than a quarter period): check the reflector's position and the wave type.");
    if (rival)
        out.notes.push_back("Another echo lines up almost as well at a delay of " + fmt(*rival * 1e6, 3) +
                            " µs (within 12 dB): make sure the reflector is isolated, or narrow the search (--search-us) around "
                            "the delay expected.");
    out.notes.push_back(std::string("The part's ") + wname + " speed (" + fmt(c, 0) + " m/s)" +
                        (g.wedge ? " and the wedge's (" + fmt(g.wedge->speed_of_sound_m_s, 0) + " m/s) are" : std::string(" is")) +
                        " taken as exact: an error in " + (g.wedge ? "them" : "it") + " goes into the delay.");
    return out;
}

Wave defaultDelayWave(const core::CaptureHeader& h) { return h.medium.wedge ? Wave::T : Wave::L; }

std::vector<std::string> delayLines(const DelayCalibration& c) {
    std::vector<std::string> out;
    const std::string ref = c.radius_m > 0 ? "Ø" + fmt(2 * c.radius_m * 1e3, 2) + " mm hole" : "point reflector";
    out.push_back("Fixed delay (calibrated from a " + ref + " at x = " + fmt(c.x_s_m * 1e3, 2) + " mm, depth " + fmt(c.z_s_m * 1e3, 2) +
                  " mm, " + (c.wave == Wave::L ? "L" : "T") + " path): " +
                  core::formatWithUncertainty(c.delay.value * 1e6, c.delay.budget.expanded() * 1e6, "µs") + " (k = 2), " +
                  std::to_string(c.elements) + " elements");
    for (const auto& n : c.notes) out.push_back("  " + n);
    return out;
}

const char* elementStatusName(ElementStatus s) {
    switch (s) {
    case ElementStatus::Ok: return "ok";
    case ElementStatus::Weak: return "weak";
    case ElementStatus::Dead: return "dead";
    }
    return "ok";
}

std::vector<int> ElementHealth::flagged() const {
    std::vector<int> out;
    for (const auto& e : elements)
        if (e.status != ElementStatus::Ok) out.push_back(e.element);
    return out;
}

ElementHealth elementHealth(const core::CaptureReader& capture, size_t frame) {
    const auto& h = capture.header();
    if (frame >= h.frames)
        throw core::SettingError("frame " + std::to_string(frame + 1) + " does not exist (the capture has " + std::to_string(h.frames) +
                                 " frames)");
    const size_t nel = h.array.elementCount(), ns = h.samples;
    std::vector<double> tx(nel, 0), rx(nel, 0), pe(nel, 0);
    std::vector<bool> has_tx(nel, false), has_rx(nel, false), has_pe(nel, false);
    const bool fmc = h.transmit.kind == core::TransmitKind::SingleElement;
    std::vector<float> block(h.blockSize());
    for (size_t t = 0; t < h.transmits(); ++t) {
        capture.readBlock(frame, t, block.data());
        const int te = fmc ? h.transmit.source_element[t] : -1;
        for (size_t r = 0; r < h.receives(); ++r) {
            const float* s = block.data() + r * ns;
            double e = 0;
            for (size_t j = 0; j < ns; ++j) e += double(s[j]) * double(s[j]);
            const size_t re = size_t(h.receive.element_index[r]);
            if (re < nel) {
                rx[re] += e;
                has_rx[re] = true;
            }
            if (fmc && te >= 0 && size_t(te) < nel) {
                tx[size_t(te)] += e;
                has_tx[size_t(te)] = true;
                if (size_t(te) == re) {
                    pe[re] = e;
                    has_pe[re] = true;
                }
            }
        }
    }
    auto levels = [&](const std::vector<double>& v, const std::vector<bool>& have) {
        std::vector<double> L(nel, std::numeric_limits<double>::quiet_NaN());
        for (size_t e = 0; e < nel; ++e)
            if (have[e]) L[e] = 10 * std::log10(std::max(v[e], 1e-300));
        return L;
    };
    auto stats = [](const std::vector<double>& L) {
        std::vector<double> ok;
        for (double x : L)
            if (std::isfinite(x)) ok.push_back(x);
        const double m = median(ok);
        return std::pair{m, ok.empty() ? 0.0 : mad(ok, m)};
    };
    const auto Ltx = levels(tx, has_tx), Lrx = levels(rx, has_rx), Lpe = levels(pe, has_pe);
    const auto [mtx, madtx] = stats(Ltx);
    const auto [mrx, madrx] = stats(Lrx);
    const auto [mpe, madpe] = stats(Lpe);
    (void)madpe;
    auto z = [](double L, double m, double d) {
        if (!std::isfinite(L)) return 0.0;
        if (d > 0) return 0.6745 * (L - m) / d;
        return L < m ? -std::numeric_limits<double>::infinity() : 0.0;
    };
    ElementHealth out;
    out.transmit_known = fmc;
    out.rule = "dead: transmit or receive energy more than " + fmt(kDeadDb, 0) + " dB below the median element; weak: more than " +
               fmt(kWeakDb, 0) + " dB below it and a modified z-score 0.6745 (L - median) / MAD below -" + fmt(kWeakZ, 1) +
               " (Iglewicz & Hoaglin 1993)";
    for (size_t e = 0; e < nel; ++e) {
        if (!has_rx[e] && !has_tx[e]) continue;
        ElementReport r;
        r.element = int(e);
        r.transmit_db = std::isfinite(Ltx[e]) ? Ltx[e] - mtx : std::numeric_limits<double>::quiet_NaN();
        r.receive_db = std::isfinite(Lrx[e]) ? Lrx[e] - mrx : std::numeric_limits<double>::quiet_NaN();
        r.pulse_echo_db = std::isfinite(Lpe[e]) ? Lpe[e] - mpe : std::numeric_limits<double>::quiet_NaN();
        r.transmit_z = z(Ltx[e], mtx, madtx);
        r.receive_z = z(Lrx[e], mrx, madrx);
        auto worst = [&](double db, double zz) {
            if (!std::isfinite(db)) return ElementStatus::Ok;
            if (db < -kDeadDb) return ElementStatus::Dead;
            if (db < -kWeakDb && zz < -kWeakZ) return ElementStatus::Weak;
            return ElementStatus::Ok;
        };
        const ElementStatus a = worst(r.transmit_db, r.transmit_z), b = worst(r.receive_db, r.receive_z);
        r.status = std::max(a, b);
        out.elements.push_back(r);
    }
    return out;
}

std::vector<std::string> calibrationLines(const SpeedCalibration& c) {
    std::vector<std::string> out;
    const double U = c.speed.budget.expanded();
    std::string what = c.method == "two holes" ? "two side-drilled holes" : c.method;
    std::string times;
    for (const auto& e : c.echoes) times += (times.empty() ? "" : ", ") + core::formatWithUncertainty(e.time_s * 1e6, 2 * e.u_time_s * 1e6, "µs");
    out.push_back("Speed of sound (calibrated from the " + what + "): " + core::formatWithUncertainty(c.speed.value, U, "m/s") +
                  " (k = 2); echo times " + times);
    if (c.single_echo_speed)
        out.push_back("  from the first echo alone: " +
                      core::formatWithUncertainty(c.single_echo_speed->value, c.single_echo_speed->budget.expanded(), "m/s") + " (k = 2)");
    if (c.fixed_delay)
        out.push_back("  fixed delay (wedge, delay line, system): " +
                      core::formatWithUncertainty(c.fixed_delay->value * 1e6, c.fixed_delay->budget.expanded() * 1e6, "µs") + " (k = 2)");
    for (const auto& n : c.notes) out.push_back("  " + n);
    return out;
}

std::vector<std::string> healthLines(const ElementHealth& h) {
    std::vector<std::string> out;
    const auto f = h.flagged();
    if (f.empty()) {
        out.push_back("Elements: all " + std::to_string(h.elements.size()) + " within " + fmt(kWeakDb, 0) + " dB of the median" +
                      (h.transmit_known ? " (transmit and receive energies)" : " (receive energies)"));
    } else {
        std::string list;
        for (const auto& e : h.elements)
            if (e.status != ElementStatus::Ok) {
                if (!list.empty()) list += "; ";
                list += std::to_string(e.element + 1) + " " + elementStatusName(e.status);
                if (h.transmit_known) list += " (transmit " + fmt(e.transmit_db, 1) + " dB, receive " + fmt(e.receive_db, 1) + " dB)";
                else list += " (receive " + fmt(e.receive_db, 1) + " dB)";
            }
        out.push_back("Elements flagged (numbered from 1, dB re the median element): " + list);
    }
    out.push_back("  rule: " + h.rule);
    return out;
}

}  // namespace umbra::recon
