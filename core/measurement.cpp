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
    case MeasurementKind::DropSizing:
    case MeasurementKind::Drop20Sizing:
    case MeasurementKind::TipSizing: return 2;
    }
    return 0;
}

bool isImageSizing(MeasurementKind kind) {
    return kind == MeasurementKind::DropSizing || kind == MeasurementKind::Drop20Sizing || kind == MeasurementKind::TipSizing;
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

    // Placement standard uncertainty of each point along x and z.
    std::vector<std::pair<double, double>> place(n), grid(n);
    for (size_t i = 0; i < n; ++i) {
        if (u.resolution) {
            const auto [wl, wa] = u.resolution(m.points[i].x_mm, m.points[i].z_mm);
            place[i] = {wl / (2 * std::sqrt(3.0)), wa / (2 * std::sqrt(3.0))};
            grid[i] = {u.pixel_x_mm / std::sqrt(12.0), u.pixel_z_mm / std::sqrt(12.0)};
        } else {
            place[i] = {0.5 * u.pixel_x_mm, 0.5 * u.pixel_z_mm};
        }
    }
    auto make = [&](const std::string& name, const Dual& f, const std::string& unit) {
        double place2 = 0, grid2 = 0;
        for (size_t i = 0; i < n; ++i) {
            const double px = f.d[2 * i] * place[i].first, pz = f.d[2 * i + 1] * place[i].second;
            const double gx = f.d[2 * i] * grid[i].first, gz = f.d[2 * i + 1] * grid[i].second;
            place2 += px * px + pz * pz;
            grid2 += gx * gx + gz * gz;
        }
        Quantity q;
        q.name = name;
        q.value = f.v;
        q.unit = unit;
        q.reading_part = std::sqrt(place2 + grid2);
        q.speed_part = std::abs(f.d[k_index]) * u.speed_rel;
        q.uncertainty = std::hypot(q.reading_part, q.speed_part);
        if (u.resolution) {
            q.components.push_back({"resolution (point placement)",
                                    "each point placed within +-W/2 of the echo edge (W: -6 dB point-spread width there), rectangular, "
                                    "W/(2 sqrt(3)) per point and axis", std::sqrt(place2)});
            q.components.push_back({"grid step", "pixel/sqrt(12) per point and axis", std::sqrt(grid2)});
        } else {
            q.components.push_back({"reading", "half a pixel per point and axis (point-spread widths unknown)", std::sqrt(place2)});
        }
        char pct[32];
        std::snprintf(pct, sizeof pct, "%g", u.speed_rel * 100);
        q.components.push_back({"speed of sound", std::string(pct) + " % of depth-like terms" + (u.speed_basis.empty() ? "" : " (" + u.speed_basis + ")"),
                                q.speed_part});
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
            d.speed_part = 0;
            d.uncertainty = d.reading_part;
            d.components = {{"reading", "zero length: the axis-wise placement bound", d.reading_part}};
        }
        out.push_back(d);
        break;
    }
    case MeasurementKind::DepthMarker:
        out.push_back(make("depth", p[0].z, "mm"));
        break;
    case MeasurementKind::ExtentBox:
    case MeasurementKind::DropSizing:
    case MeasurementKind::Drop20Sizing:
    case MeasurementKind::TipSizing:
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
    case MeasurementKind::Drop20Sizing: return "-20 dB sizing";
    case MeasurementKind::TipSizing: return "tip sizing";
    }
    return "unknown";
}

std::optional<MeasurementKind> kindFromName(const std::string& name) {
    for (auto k : {MeasurementKind::Caliper, MeasurementKind::DepthMarker, MeasurementKind::ExtentBox,
                   MeasurementKind::Ellipse, MeasurementKind::DropSizing, MeasurementKind::Drop20Sizing, MeasurementKind::TipSizing})
        if (kindName(k) == name) return k;
    return std::nullopt;
}


std::string formatQuantity(const Quantity& q) {
    const Rounded r = roundToUncertainty(q.value, kCoverageFactor * q.uncertainty);
    const std::string unit = q.unit.empty() ? "" : " " + q.unit;
    if (q.upper_bound) return "≤ " + r.value_text + unit;  // resolution-limited: the budget view says why
    return r.value_text + " ± " + r.uncertainty_text + unit;
}

MeasuredValue toMeasured(const Quantity& q) {
    MeasuredValue m{q.name, q.value, q.unit, {}, q.upper_bound};
    m.budget.components = q.components;
    if (m.budget.components.empty() && q.uncertainty > 0) m.budget.add("combined", "", q.uncertainty);
    return m;
}

Quantity fromMeasured(const MeasuredValue& m) {
    Quantity q;
    q.name = m.name;
    q.value = m.value;
    q.unit = m.unit;
    q.uncertainty = m.budget.combined();
    q.components = m.budget.components;
    q.upper_bound = m.upper_bound;
    double rest = 0;
    for (const auto& c : m.budget.components) {
        if (c.name == "speed of sound") q.speed_part = c.standard;
        else rest += c.standard * c.standard;
    }
    q.reading_part = std::sqrt(rest);
    return q;
}

std::string formatQuantities(const std::vector<Quantity>& qs) {
    std::string s;
    for (const auto& q : qs) {
        if (!s.empty()) s += "; ";
        s += q.name + " " + formatQuantity(q);
    }
    return s;
}

std::string quantityTooltip(const Quantity& q, const UncertaintyModel&) {
    return formatBudget(toMeasured(q));
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
