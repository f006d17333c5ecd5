// SPDX-License-Identifier: MIT
#include "core/weld_geometry.h"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "core/error.h"

namespace umbra::core {
namespace {

constexpr double kPi = 3.14159265358979323846;
double rad(double deg) { return deg * kPi / 180; }

// Groove bottom of a U or J preparation: an arc of radius R centred above the land's edge, from
// the top of the land (tangent horizontal) up to where its tangent is at the bevel angle from the
// normal; then a straight face to the surface.
struct Arc {
    double zc;     // depth of the arc centre
    double z_end;  // depth where the arc meets the straight face
};
Arc grooveArc(const WeldGeometry& w) {
    const double zc = w.thickness_mm - w.root_face_mm - w.groove_radius_mm;
    return {zc, zc + w.groove_radius_mm * std::sin(rad(w.bevel_angle_deg))};
}

bool curved(const WeldGeometry& w) { return w.shape == WeldShape::U || w.shape == WeldShape::J; }

// Distance of the prepared (+x) fusion face from the centre line at depth z in [0, T].
double preparedOffset(const WeldGeometry& w, double z) {
    const double g2 = w.root_gap_mm / 2, T = w.thickness_mm, rf = w.root_face_mm;
    const double t = std::tan(rad(w.bevel_angle_deg));
    switch (w.shape) {
    case WeldShape::V:
        return z >= T - rf ? g2 : g2 + (T - rf - z) * t;
    case WeldShape::X: {
        const double h = (T - rf) / 2;
        if (z <= h) return g2 + (h - z) * t;
        if (z <= h + rf) return g2;
        return g2 + (z - h - rf) * t;
    }
    case WeldShape::U:
    case WeldShape::J: {
        if (z >= T - rf) return g2;
        const Arc a = grooveArc(w);
        const double R = w.groove_radius_mm;
        if (z >= a.z_end) {
            const double d = z - a.zc;
            return g2 + std::sqrt(std::max(0.0, R * R - d * d));
        }
        const double u_end = g2 + R * std::cos(rad(w.bevel_angle_deg));
        return u_end + (a.z_end - z) * t;
    }
    }
    return g2;
}

double unpreparedOffset(const WeldGeometry& w, double z) {
    return w.shape == WeldShape::J ? w.root_gap_mm / 2 : preparedOffset(w, z);
}

// Depths at which the face polyline has a corner or is sampled.
std::vector<double> faceDepths(const WeldGeometry& w, double step_deg) {
    const double T = w.thickness_mm, rf = w.root_face_mm;
    std::vector<double> z{0.0, T};
    switch (w.shape) {
    case WeldShape::V:
        z.push_back(T - rf);
        break;
    case WeldShape::X:
        z.push_back((T - rf) / 2);
        z.push_back((T - rf) / 2 + rf);
        break;
    case WeldShape::U:
    case WeldShape::J: {
        const Arc a = grooveArc(w);
        const double R = w.groove_radius_mm;
        const double phi_end = rad(90 - w.bevel_angle_deg);  // from the bottom of the arc
        const int n = std::max(2, static_cast<int>(std::ceil((90 - w.bevel_angle_deg) / std::max(0.1, step_deg))));
        for (int i = 0; i <= n; ++i) z.push_back(a.zc + R * std::cos(phi_end * i / n));
        z.push_back(T - rf);
        break;
    }
    }
    std::sort(z.begin(), z.end());
    z.erase(std::unique(z.begin(), z.end(), [](double a, double b) { return std::abs(a - b) < 1e-9; }), z.end());
    return z;
}

// Reinforcement profile: parabola through the two toes with `height` at the centre line.
std::vector<WeldPoint> bead(double centre, double width, double z0, double height, int sign) {
    std::vector<WeldPoint> pts;
    const int n = height > 0 ? 16 : 1;
    for (int i = 0; i <= n; ++i) {
        const double s = -1 + 2.0 * i / n;  // -1 .. 1 across the width
        pts.push_back({centre + s * width / 2, z0 + sign * height * (1 - s * s)});
    }
    return pts;
}

std::string num(double v) {
    std::ostringstream s;
    s << std::round(v * 100) / 100;
    return s.str();
}

}  // namespace

const char* weldShapeName(WeldShape s) {
    switch (s) {
    case WeldShape::V: return "V";
    case WeldShape::X: return "X";
    case WeldShape::U: return "U";
    case WeldShape::J: return "J";
    }
    return "V";
}

std::optional<WeldShape> weldShapeFromName(const std::string& n) {
    for (WeldShape s : {WeldShape::V, WeldShape::X, WeldShape::U, WeldShape::J})
        if (n == weldShapeName(s)) return s;
    return std::nullopt;
}

void checkWeld(const WeldGeometry& w) {
    auto fail = [](const std::string& key, const std::string& what) { throw SettingError("weld." + key + ": " + what); };
    auto finite = [&](double v, const std::string& key) {
        if (!std::isfinite(v)) fail(key, "must be a finite number");
    };
    finite(w.thickness_mm, "thickness_mm");
    finite(w.centre_x_mm, "centre_x_mm");
    finite(w.bevel_angle_deg, "bevel_angle_deg");
    finite(w.root_gap_mm, "root_gap_mm");
    finite(w.root_face_mm, "root_face_mm");
    finite(w.groove_radius_mm, "groove_radius_mm");
    finite(w.cap_width_mm, "cap_width_mm");
    finite(w.cap_height_mm, "cap_height_mm");
    finite(w.root_width_mm, "root_width_mm");
    finite(w.root_height_mm, "root_height_mm");
    if (!(w.thickness_mm > 0 && w.thickness_mm <= 1000)) fail("thickness_mm", "must be in (0, 1000] mm");
    if (std::abs(w.centre_x_mm) > 10000) fail("centre_x_mm", "must be within ±10000 mm");
    if (!(w.bevel_angle_deg >= 0 && w.bevel_angle_deg < 80)) fail("bevel_angle_deg", "must be in [0, 80) degrees");
    if (!(w.root_gap_mm >= 0 && w.root_gap_mm <= 100)) fail("root_gap_mm", "must be in [0, 100] mm");
    if (!(w.root_face_mm >= 0 && w.root_face_mm < w.thickness_mm))
        fail("root_face_mm", "must be at least 0 and less than the plate thickness (" + num(w.thickness_mm) + " mm)");
    for (auto [v, key] : {std::pair{w.cap_width_mm, "cap_width_mm"}, std::pair{w.cap_height_mm, "cap_height_mm"},
                          std::pair{w.root_width_mm, "root_width_mm"}, std::pair{w.root_height_mm, "root_height_mm"}})
        if (!(v >= 0 && v <= 1000)) fail(key, "must be in [0, 1000] mm");
    if (curved(w)) {
        if (!(w.groove_radius_mm > 0 && w.groove_radius_mm <= 1000)) fail("groove_radius_mm", "must be in (0, 1000] mm");
        if (grooveArc(w).z_end <= 0)
            fail("groove_radius_mm", "the groove radius (" + num(w.groove_radius_mm) +
                                         " mm) does not fit above the root face in a " + num(w.thickness_mm) + " mm plate");
    }
}

double grooveWidthAt(const WeldGeometry& w, double z_mm) {
    const double z = std::clamp(z_mm, 0.0, w.thickness_mm);
    return preparedOffset(w, z) + unpreparedOffset(w, z);
}

double skipDepth(double z_mm, double thickness_mm, int skip) {
    if (skip == 1) return 2 * thickness_mm - z_mm;
    if (skip == 2) return 2 * thickness_mm + z_mm;
    return z_mm;
}

std::vector<WeldPolyline> weldPolylines(const WeldGeometry& w, double x_from_mm, double x_to_mm, double step_deg) {
    checkWeld(w);
    const double c = w.centre_x_mm, T = w.thickness_mm;
    std::vector<WeldPolyline> out;
    WeldPolyline left{WeldLineKind::FusionFace, 0, {}}, right{WeldLineKind::FusionFace, 0, {}};
    for (double z : faceDepths(w, step_deg)) {
        left.points.push_back({c - unpreparedOffset(w, z), z});
        right.points.push_back({c + preparedOffset(w, z), z});
    }
    out.push_back(std::move(left));
    out.push_back(std::move(right));
    const double cap_w = w.cap_width_mm > 0 ? w.cap_width_mm : grooveWidthAt(w, 0);
    out.push_back({WeldLineKind::Cap, 0, bead(c, cap_w, 0, w.cap_height_mm, -1)});
    const double root_w = w.root_width_mm > 0 ? w.root_width_mm
                          : w.shape == WeldShape::X ? grooveWidthAt(w, T)
                                                    : w.root_gap_mm + 2;
    out.push_back({WeldLineKind::Root, 0, bead(c, root_w, T, w.root_height_mm, +1)});
    out.push_back({WeldLineKind::BackWall, 0, {{x_from_mm, T}, {x_to_mm, T}}});
    return out;
}

std::vector<WeldPolyline> weldPolylines(const WeldGeometry& w, double x_from_mm, double x_to_mm, int skip,
                                        double step_deg) {
    if (skip < 0 || skip > 2) throw SettingError("weld overlay: skip must be 0, 1 or 2");
    auto lines = weldPolylines(w, x_from_mm, x_to_mm, step_deg);
    const double T = w.thickness_mm;
    for (auto& l : lines) {
        l.skip = skip;
        for (auto& p : l.points) p.z_mm = skipDepth(p.z_mm, T, skip);
        // The plate boundary a skip adds: the scanning surface mirrored (2T) after one bounce,
        // the back wall again (3T) after two.
        if (l.kind == WeldLineKind::BackWall && skip == 1) {
            l.kind = WeldLineKind::Surface;
            for (auto& p : l.points) p.z_mm = 2 * T;
        }
        if (l.kind == WeldLineKind::BackWall && skip == 2)
            for (auto& p : l.points) p.z_mm = 3 * T;
    }
    return lines;
}

std::vector<WeldPolyline> weldOverlay(const WeldGeometry& w, double x_from_mm, double x_to_mm) {
    std::vector<WeldPolyline> all;
    for (int s = 0; s <= 2; ++s) {
        auto l = weldPolylines(w, x_from_mm, x_to_mm, s);
        all.insert(all.end(), l.begin(), l.end());
    }
    return all;
}

std::string weldSummary(const WeldGeometry& w) {
    const char* shape = w.shape == WeldShape::V   ? "single V"
                        : w.shape == WeldShape::X ? "double V (X)"
                        : w.shape == WeldShape::U ? "single U"
                                                  : "single J (+x plate prepared)";
    std::string s = std::string("Weld: ") + shape + ", plate " + num(w.thickness_mm) + " mm, centre x = " +
                    num(w.centre_x_mm) + " mm, bevel " + num(w.bevel_angle_deg) + "°, root gap " + num(w.root_gap_mm) +
                    " mm, root face " + num(w.root_face_mm) + " mm";
    if (curved(w)) s += ", groove radius " + num(w.groove_radius_mm) + " mm";
    const double cap_w = w.cap_width_mm > 0 ? w.cap_width_mm : grooveWidthAt(w, 0);
    s += ", cap " + num(cap_w) + " mm wide";
    s += w.cap_height_mm > 0 ? ", " + num(w.cap_height_mm) + " mm high" : std::string(", flush");
    if (w.root_height_mm > 0) s += ", root bead " + num(w.root_height_mm) + " mm";
    s += " (as entered)";
    return s;
}

}  // namespace umbra::core
