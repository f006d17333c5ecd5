// SPDX-License-Identifier: MIT
#pragma once
// The distance–amplitude curve (trade: DAC): echo amplitudes of equal reflectors (side-drilled
// holes of one diameter in a reference block) at several depths, and the reference level it
// gives at any depth. Fit: the level in dB (20 log10 of the linear amplitude) is interpolated
// linearly against depth between the points, which are taken in order of depth; above the
// shallowest and below the deepest point the end level is held and the reading is flagged as
// outside the curve's depth range. Points at the same depth are averaged (in dB).
//
//   DistanceAmplitudeCurve c;  // points at 5 mm (amplitude 8) and 15 mm (amplitude 2)
//   dbReCurve(c, 4.0, 10e-3)->db  // 0 dB: the curve is 20 log10 4 = 12.04 dB at 10 mm
#include <cstddef>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "core/parameters.h"

namespace umbra::core {

/// Which envelope the amplitudes were read from. New curves use the envelope before time-gain
/// compensation, so a TCG (including one made from the curve) does not change them. A case
/// file with the older single amplitude reference holds an amplitude after its recipe's TCG;
/// it is read as a one-point curve of that basis.
enum class AmplitudeBasis { BeforeTcg, AfterTcg };
const char* basisName(AmplitudeBasis b);                           ///< "before TCG", "after TCG"
std::optional<AmplitudeBasis> basisFromName(const std::string& name);

/// One point: the peak of one reflector's echo.
struct DacPoint {
    double depth_m = 0;          ///< depth of the echo's peak below the array face, m
    double x_m = 0;              ///< lateral position of the peak, m
    double amplitude = 0;        ///< linear envelope amplitude at the peak, capture units (> 0)
    std::string label;           ///< e.g. "SDH at 10 mm"
    std::string capture_sha256;  ///< the capture it was read on (lowercase hex; "" = unknown)
    size_t frame = 0;            ///< frame of that capture, counted from 0
    bool operator==(const DacPoint&) const = default;
};

struct DistanceAmplitudeCurve {
    std::string label;                          ///< the reflectors, e.g. "Ø2.5 mm SDH, reference block RB-25"
    AmplitudeBasis basis = AmplitudeBasis::BeforeTcg;
    std::string recipe_json;                    ///< the recipe every point was read with ({"stage": {"param": v}})
    std::string recipe_fingerprint;             ///< amplitudeFingerprint() of that recipe ("" = not recorded)
    std::vector<DacPoint> points;               ///< in order of depth (withPoint keeps them so)
    bool operator==(const DistanceAmplitudeCurve&) const = default;
};

/// The curve's level at a depth.
struct DacLevel {
    double level_db = 0;        ///< 20 log10 of the curve's amplitude at the depth
    bool outside = false;       ///< depth above the shallowest or below the deepest point (level held)
};

/// An amplitude relative to the curve at its depth.
struct DacReading {
    double db = 0;              ///< 20 log10(amplitude / curve amplitude at the depth)
    bool outside = false;       ///< as DacLevel::outside
};

/// Level at `depth_m`; nullopt for a curve without points. One point: that level at every
/// depth, flagged outside everywhere but at its own depth.
std::optional<DacLevel> dacLevel(const DistanceAmplitudeCurve& c, double depth_m);
/// `amplitude` (linear, same basis as the curve) relative to the curve at `depth_m`; nullopt
/// without points or for an amplitude that is not positive.
std::optional<DacReading> dbReCurve(const DistanceAmplitudeCurve& c, double amplitude, double depth_m);
/// Depth range covered by the points, m (nullopt without points).
std::optional<std::pair<double, double>> depthRange(const DistanceAmplitudeCurve& c);

/// The curve with `p` added at its place in depth order (after any point at the same depth).
/// Throws SettingError for an amplitude that is not positive or a depth that is not finite.
DistanceAmplitudeCurve withPoint(DistanceAmplitudeCurve c, const DacPoint& p);

/// Time-gain compensation that makes equal reflectors on the curve display equal: for each
/// distinct depth z_i (m), the gain G_i = L(z_shallowest) − L(z_i) dB, so the shallowest point
/// keeps its amplitude and deeper ones are raised to it. With the TCG stage's rule (linear in
/// dB between points, held beyond) this is exactly −(L(z) − L(z_shallowest)) at every depth.
/// Needs two or more distinct depths and the before-TCG basis: SettingError otherwise.
std::vector<std::pair<double, double>> tcgFromCurve(const DistanceAmplitudeCurve& c);
/// The TCG stage's curve text "mm:dB,mm:dB,..." for (m, dB) points, 4 decimals (0.1 µm, 1e-4 dB).
std::string tcgCurveText(const std::vector<std::pair<double, double>>& points_m_db);

/// Recipe keys ("stage.param") whose values change echo amplitudes read on `basis`:
/// every setting that is not display-only, except the grid's edges (they only crop), plus the
/// TCG settings when the basis is after TCG.
std::vector<std::string> amplitudeKeys(const Recipe& r, AmplitudeBasis basis);
/// Those keys whose values differ between `a` and `b` (keys only one of them has are skipped).
std::vector<std::string> amplitudeDifferences(const Recipe& a, const Recipe& b, AmplitudeBasis basis);
/// First 16 hex digits of the SHA-256 of "key=value\n" over amplitudeKeys in key order: equal
/// fingerprints mean equal amplitude settings.
std::string amplitudeFingerprint(const Recipe& r, AmplitudeBasis basis);

}  // namespace umbra::core
