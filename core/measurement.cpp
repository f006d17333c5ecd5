// SPDX-License-Identifier: MIT
#include "core/measurement.h"

#include <array>
#include <cmath>
#include <cstdio>
#include <numbers>

#include "core/error.h"

namespace umbra::core {
namespace detail {

// Forward-mode derivative: a value and its gradient with respect to up to 7 inputs
// (x and z of up to three points, and the relative speed-of-sound error k).
constexpr size_t kMaxInputs = 7;
struct Dual {
    double v = 0;
    std::array<double, kMaxInputs> d{};
};
inline Dual constant(double v) { return Dual{v, {}}; }
inline Dual variable(double v, size_t i) {
    Dual r{v, {}};
    r.d[i] = 1;
    return r;
}
inline Dual operator+(const Dual& a, const Dual& b) {
    Dual r{a.v + b.v, {}};
    for (size_t i = 0; i < kMaxInputs; ++i) r.d[i] = a.d[i] + b.d[i];
    return r;
}
inline Dual operator-(const Dual& a, const Dual& b) {
    Dual r{a.v - b.v, {}};
    for (size_t i = 0; i < kMaxInputs; ++i) r.d[i] = a.d[i] - b.d[i];
    return r;
}
inline Dual operator*(const Dual& a, const Dual& b) {
    Dual r{a.v * b.v, {}};
    for (size_t i = 0; i < kMaxInputs; ++i) r.d[i] = a.d[i] * b.v + a.v * b.d[i];
    return r;
}
inline Dual operator*(double s, const Dual& a) {
    Dual r{s * a.v, {}};
    for (size_t i = 0; i < kMaxInputs; ++i) r.d[i] = s * a.d[i];
    return r;
}
inline Dual operator/(const Dual& a, const Dual& b) {
    Dual r{a.v / b.v, {}};
    for (size_t i = 0; i < kMaxInputs; ++i) r.d[i] = (a.d[i] * b.v - a.v * b.d[i]) / (b.v * b.v);
    return r;
}
inline Dual sqrt(const Dual& a) {
    const double s = std::sqrt(a.v);
    Dual r{s, {}};
    if (s > 0)
        for (size_t i = 0; i < kMaxInputs; ++i) r.d[i] = a.d[i] / (2 * s);
    return r;
}
inline Dual abs(const Dual& a) { return a.v < 0 ? -1.0 * a : a; }
inline Dual hypot(const Dual& a, const Dual& b) { return sqrt(a * a + b * b); }

template <class T>
T ramanujan2(const T& a, const T& b) {
    // C ≈ π(a+b)(1 + 3h/(10 + √(4−3h))), h = (a−b)²/(a+b)²  (Ramanujan 1914)
    const T s = a + b;
    const T h = ((a - b) * (a - b)) / (s * s);
    const T three_h = 3.0 * h;
    return std::numbers::pi * s * (constant(1) + three_h / (constant(10) + sqrt(constant(4) - three_h)));
}

struct Point {
    Dual x, z;
};

}  // namespace detail

size_t pointCount(MeasurementKind kind) {
    switch (kind) {
    case MeasurementKind::Caliper: return 2;
    case MeasurementKind::DepthMarker: return 1;
    case MeasurementKind::ExtentBox: return 2;
    case MeasurementKind::Ellipse: return 3;
    case MeasurementKind::DropSizing: return 2;
    }
    return 0;
}

double ellipseCircumferenceRamanujan(double a, double b) {
    a = std::abs(a);
    b = std::abs(b);
    if (a + b == 0) return 0;
    const double h = (a - b) * (a - b) / ((a + b) * (a + b));
    return std::numbers::pi * (a + b) * (1 + 3 * h / (10 + std::sqrt(4 - 3 * h)));
}

std::vector<Quantity> evaluate(const Measurement& m, const UncertaintyModel& u) {
    using detail::Dual;
    const size_t n = pointCount(m.kind);
    if (m.points.size() != n) {
        throw SettingError("measurement " + (m.id.empty() ? std::string("(no id)") : m.id) + " (" +
                           kindName(m.kind) + ") has " + std::to_string(m.points.size()) +
                           " points; it needs " + std::to_string(n));
    }
    // Inputs: x0, z0, x1, z1, x2, z2 (as present), then k. The speed error k scales every depth
    // measured from the surface: z' = surface + (z − surface)(1 + k), evaluated at k = 0.
    const size_t k_index = 2 * n;
    const Dual k = detail::variable(0.0, k_index);
    std::vector<detail::Point> p;
    for (size_t i = 0; i < n; ++i) {
        const Dual x = detail::variable(m.points[i].x_mm, 2 * i);
        const Dual z0 = detail::variable(m.points[i].z_mm - u.surface_z_mm, 2 * i + 1);
        p.push_back({x, z0 * (detail::constant(1) + k)});  // z relative to the surface, scaled
    }

    auto make = [&](const std::string& name, const Dual& f, const std::string& unit) {
        double reading2 = 0;
        for (size_t i = 0; i < n; ++i) {
            const double ux = f.d[2 * i] * 0.5 * u.pixel_x_mm;
            const double uz = f.d[2 * i + 1] * 0.5 * u.pixel_z_mm;
            reading2 += ux * ux + uz * uz;
        }
        Quantity q;
        q.name = name;
        q.value = f.v;
        q.unit = unit;
        q.reading_part = std::sqrt(reading2);
        q.speed_part = std::abs(f.d[k_index]) * u.speed_rel;
        q.uncertainty = std::hypot(q.reading_part, q.speed_part);
        return q;
    };

    std::vector<Quantity> out;
    switch (m.kind) {
    case MeasurementKind::Caliper: {
        const Dual dx = p[1].x - p[0].x, dz = p[1].z - p[0].z;
        out.push_back(make("Δx", detail::abs(dx), "mm"));
        out.push_back(make("Δdepth", detail::abs(dz), "mm"));
        Quantity d = make("distance", detail::hypot(dx, dz), "mm");
        if (d.value == 0) {  // gradient undefined at zero length: use the axis-wise bound
            d.reading_part = std::hypot(out[0].reading_part, out[1].reading_part);
            d.uncertainty = d.reading_part;
        }
        out.push_back(d);
        break;
    }
    case MeasurementKind::DepthMarker:
        out.push_back(make("depth", p[0].z, "mm"));
        break;
    case MeasurementKind::ExtentBox:
    case MeasurementKind::DropSizing:
        out.push_back(make("length", detail::abs(p[1].x - p[0].x), "mm"));
        out.push_back(make("height", detail::abs(p[1].z - p[0].z), "mm"));
        break;
    case MeasurementKind::Ellipse: {
        const Dual a = detail::hypot(p[1].x - p[0].x, p[1].z - p[0].z);
        const Dual b = detail::hypot(p[2].x - p[0].x, p[2].z - p[0].z);
        out.push_back(make("axis 1", 2.0 * a, "mm"));
        out.push_back(make("axis 2", 2.0 * b, "mm"));
        out.push_back(make("area", std::numbers::pi * (a * b), "mm²"));
        if (a.v + b.v > 0)
            out.push_back(make("circumference", detail::ramanujan2(a, b), "mm"));
        else
            out.push_back(make("circumference", detail::constant(0), "mm"));
        break;
    }
    }
    return out;
}

std::string kindName(MeasurementKind kind) {
    switch (kind) {
    case MeasurementKind::Caliper: return "caliper";
    case MeasurementKind::DepthMarker: return "depth marker";
    case MeasurementKind::ExtentBox: return "extent box";
    case MeasurementKind::Ellipse: return "ellipse";
    case MeasurementKind::DropSizing: return "-6 dB sizing";
    }
    return "unknown";
}

std::optional<MeasurementKind> kindFromName(const std::string& name) {
    for (auto k : {MeasurementKind::Caliper, MeasurementKind::DepthMarker, MeasurementKind::ExtentBox,
                   MeasurementKind::Ellipse, MeasurementKind::DropSizing})
        if (kindName(k) == name) return k;
    return std::nullopt;
}

namespace {

// Decimal exponent of the rounding step for an uncertainty: its first significant digit (the
// first two when that digit is 1), never finer than 0.01 (exponent −2).
int stepExponent(double u) {
    if (!(u > 0) || !std::isfinite(u)) return -2;
    int e = static_cast<int>(std::floor(std::log10(u)));
    double lead = u / std::pow(10.0, e);
    if (lead >= 9.5) {  // rounds up to the next decade
        ++e;
        lead = 1;
    }
    if (lead < 1.95) --e;  // leading digit 1: keep two digits
    return std::max(e, -2);
}

std::string fixed(double v, int decimals) {
    if (std::abs(v) < 0.5 * std::pow(10.0, -decimals)) v = 0;  // no "-0.00"
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v + 0.0);
    return buf;
}

}  // namespace

std::string formatQuantity(const Quantity& q) {
    const int e = stepExponent(q.uncertainty);
    const double step = std::pow(10.0, e);
    const int decimals = std::max(0, -e);
    const double v = std::round(q.value / step) * step;
    double un = std::round(q.uncertainty / step) * step;
    if (un < step && q.uncertainty > 0) un = step;
    std::string s = fixed(v, decimals) + " ± " + fixed(un, decimals);
    if (!q.unit.empty()) s += " " + q.unit;
    return s;
}

std::string formatQuantities(const std::vector<Quantity>& qs) {
    std::string s;
    for (const auto& q : qs) {
        if (!s.empty()) s += "; ";
        s += q.name + " " + formatQuantity(q);
    }
    return s;
}

std::string quantityTooltip(const Quantity& q, const UncertaintyModel& u) {
    Quantity r = q, s = q;
    r.uncertainty = q.reading_part;
    s.uncertainty = q.speed_part;
    auto part = [](const Quantity& x) {
        const int e = stepExponent(x.uncertainty);
        const double step = std::pow(10.0, e);
        double un = std::round(x.uncertainty / step) * step;
        if (un < step && x.uncertainty > 0) un = step;
        return "±" + fixed(un, std::max(0, -e)) + " " + x.unit;
    };
    char pct[32];
    std::snprintf(pct, sizeof pct, "%g", u.speed_rel * 100);
    std::string t = q.name + " = " + formatQuantity(q) + "\n";
    t += "Uncertainty, combined root-sum-square from:\n";
    t += "  reading " + part(r) + ": each point placed to within half a pixel (" +
         fixed(u.pixel_x_mm / 2, 3) + " mm in x, " + fixed(u.pixel_z_mm / 2, 3) + " mm in depth);\n";
    t += "  speed of sound " + part(s) + ": the assumed speed is taken as uncertain by " +
         std::string(pct) + " %, which scales depths and axial distances (lateral x is unaffected).";
    return t;
}

std::string nextMeasurementId(const std::vector<std::string>& existing) {
    long best = 0;
    for (const auto& id : existing) {
        if (id.size() < 2 || id[0] != 'M') continue;
        if (id.find_first_not_of("0123456789", 1) != std::string::npos || id.size() > 10) continue;
        best = std::max(best, std::stol(id.substr(1)));
    }
    std::string id = "M";
    id += std::to_string(best + 1);
    return id;
}

}  // namespace umbra::core
