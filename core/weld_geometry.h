// SPDX-License-Identifier: MIT
#pragma once
// Butt-weld geometry entered by the user and the polylines drawn over the image, in the
// specimen frame: x along the scanning surface (the image's x), z depth below that surface
// (the image's depth), millimetres. The plate is 0 <= z <= thickness; the weld is symmetric
// about x = centre (J: only the +x plate is prepared, the -x fusion face is square).
//
// Skip views are drawn on the unfolded specimen: the first skip (after one back-wall bounce) is
// the plate mirrored in the back wall, z -> 2T - z; the second skip (after a further bounce at
// the scanning surface) is the plate shifted by 2T, z -> 2T + z.
#include <optional>
#include <string>
#include <vector>

namespace umbra::core {

enum class WeldShape { V, X, U, J };
/// "V", "X", "U", "J".
const char* weldShapeName(WeldShape s);
std::optional<WeldShape> weldShapeFromName(const std::string& name);

/// Weld preparation and reinforcement. Bevel angle: angle of a fusion face from the plate normal
/// (so a single V has an included groove angle of twice the bevel angle).
struct WeldGeometry {
    WeldShape shape = WeldShape::V;
    double thickness_mm = 20;     ///< plate thickness T (> 0)
    double centre_x_mm = 0;       ///< weld centre line, x along the scanning surface
    double bevel_angle_deg = 30;  ///< fusion face from the normal, [0, 80)
    double root_gap_mm = 2;       ///< gap between the plates at the root, >= 0
    double root_face_mm = 0;      ///< land height (X: centred on mid-thickness), [0, T)
    double groove_radius_mm = 5;  ///< U and J: radius at the bottom of the groove (> 0)
    double cap_width_mm = 0;      ///< cap (face reinforcement) width; 0 = the groove width at the surface
    double cap_height_mm = 0;     ///< cap height above the surface (0 = ground flush)
    double root_width_mm = 0;     ///< root bead width; 0 = root gap + 2 mm (X: the back cap, 0 = groove width)
    double root_height_mm = 0;    ///< root bead (X: back cap) height below the back wall (0 = flush)
    bool operator==(const WeldGeometry&) const = default;
};

/// Throws SettingError naming the field ("weld.bevel_angle_deg: ...") when a value is out of
/// range or the shape does not fit the plate (e.g. a root face taller than the plate).
void checkWeld(const WeldGeometry& w);

/// A polyline in the specimen frame, mm (x, z).
struct WeldPoint {
    double x_mm = 0, z_mm = 0;
    bool operator==(const WeldPoint&) const = default;
};
enum class WeldLineKind { FusionFace, Cap, Root, BackWall, Surface };
struct WeldPolyline {
    WeldLineKind kind = WeldLineKind::FusionFace;
    int skip = 0;  ///< 0 direct, 1 first skip (mirrored in the back wall), 2 second skip
    std::vector<WeldPoint> points;
};

/// Width of the groove at depth z (distance between the fusion faces), mm; z in [0, T].
double grooveWidthAt(const WeldGeometry& w, double z_mm);

/// Fusion faces (left, right), cap, root and back wall of the plate, direct (skip 0), each
/// point of a curved face sampled at most every `step_deg` degrees of arc. The back wall and the
/// surface lines run over [x_from_mm, x_to_mm].
std::vector<WeldPolyline> weldPolylines(const WeldGeometry& w, double x_from_mm, double x_to_mm,
                                        double step_deg = 5);
/// The same geometry in skip `skip` (0, 1 or 2) of the unfolded specimen.
std::vector<WeldPolyline> weldPolylines(const WeldGeometry& w, double x_from_mm, double x_to_mm, int skip,
                                        double step_deg = 5);
/// Direct, first and second skip together (the overlay of every view).
std::vector<WeldPolyline> weldOverlay(const WeldGeometry& w, double x_from_mm, double x_to_mm);
/// Mirror of a depth into skip `skip`: 0 -> z, 1 -> 2T - z, 2 -> 2T + z.
double skipDepth(double z_mm, double thickness_mm, int skip);

/// One line for the technique block: "Weld: single V, T = 20 mm, bevel 30°, gap 2 mm, ...".
std::string weldSummary(const WeldGeometry& w);

}  // namespace umbra::core
