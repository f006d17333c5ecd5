// SPDX-License-Identifier: MIT
#pragma once
// Scene description for the forward simulator: what is in the specimen, which array looks at
// it, how it is fired and sampled. Parsed from a JSON scene file (schema: docs/scene-format.md).
// In memory everything is SI (m, s, Hz, rad); the file uses the unit named in each key.
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "core/capture.h"

namespace umbra::recon::sim {

/// Linear array along x, centred on the origin, element centres at z = 0, y = 0.
struct ArraySpec {
    int elements = 0;
    double pitch_m = 0;
    double element_width_m = 0;                ///< active width along x (directivity)
    std::optional<double> element_height_m;    ///< elevation size (written to the capture)
    double elevation_beam_width_m = 2e-3;      ///< -6 dB full width of the elevation beam (encoded scans)
    double centre_frequency_hz = 0;
    double fractional_bandwidth = 0;           ///< -6 dB bandwidth / centre frequency of the received pulse
    /// Element centre x positions, m.
    std::vector<double> elementX() const;
};

struct TransmitSpec {
    core::TransmitKind kind = core::TransmitKind::SingleElement;
    std::vector<int> source_elements;      ///< single_element: firing order (default: every element)
    std::vector<double> angles_rad;        ///< plane_wave
    std::vector<core::Vec3> virtual_sources_m;  ///< virtual_source
    size_t count(int elements) const;
};

struct SamplingSpec {
    double frequency_hz = 0;
    size_t samples = 0;        ///< resolved from "samples" or "max_depth_mm" at parse time
    double start_time_s = 0;   ///< time of sample 0 (same for every transmit)
};

struct MediumSpec {
    double speed_m_s = 0;                      ///< longitudinal, used for every path
    std::optional<double> shear_speed_m_s;     ///< recorded in the capture; simulated in T legs of elastic paths
    double attenuation_db_per_cm_mhz = 0;      ///< one way, amplitude, linear in frequency
    std::optional<double> thickness_m;
};

/// Wedge under the array (scene key "wedge"): the array centre sits height_m above the part
/// surface along the array normal, the surface tilted angle_rad from the array face
/// (docs/capture-format.md: surface_origin_m = (0, 0, height_m), surface_tilt_rad = angle_rad).
/// Reflector positions are then in the specimen frame (x_s along the surface, z_s depth).
struct WedgeSpec {
    double speed_m_s = 0;
    double angle_rad = 0;
    double height_m = 0;
};

/// Elastic paths (scene key "paths", and every scene with a wedge): which views' echoes to
/// simulate (delay_model.mode notation: transmit legs, dash, receive legs), 2-D or 3-D spreading.
struct ElasticSpec {
    bool enabled = false;
    std::vector<std::string> modes;  ///< e.g. {"L-L", "T-T", "TT-T", "T-TT", "TT-TT"}
    bool spreading_3d = false;
};

/// Range along y (elevation / scan axis) over which an extended reflector exists.
struct YRange {
    double min_m = -std::numeric_limits<double>::infinity();
    double max_m = std::numeric_limits<double>::infinity();
};

struct PointReflector {
    core::Vec3 position_m{0, 0, 0};
    double amplitude = 1;
};

/// Cylinder along y (side-drilled hole); echoes come from its near surface.
struct SideDrilledHole {
    double x_m = 0, z_m = 0, diameter_m = 0;
    double amplitude = 1;
    YRange y;
};

/// Straight crack-like flaw in the x-z plane from start to end, extending over y.
/// Modelled as a dense line of reflectors (spacing <= lambda/4) plus stronger tip reflectors.
struct PlanarFlaw {
    double x0_m = 0, z0_m = 0, x1_m = 0, z1_m = 0;
    double amplitude = 1;        ///< of the face, per wavelength of length
    double tip_amplitude = 0.5;  ///< of each tip (diffraction), absolute
    YRange y;
};

/// Specular plane at depth_m, image-source model; `repeats` = 1 adds the double round trip.
struct BackWall {
    double depth_m = 0;
    double amplitude = 1;  ///< reflection coefficient (the top surface reflects with +1)
    int repeats = 1;
};

enum class RegionShape { Circle, Ellipse, Tube };

/// A speckle region whose scatterer amplitudes are scaled by contrast_db (anechoic: none).
struct SpeckleRegion {
    RegionShape shape = RegionShape::Circle;
    double cx_m = 0, cz_m = 0;          ///< circle/ellipse centre
    double a_m = 0, b_m = 0;            ///< circle: a = b = radius; ellipse: semi-axes along its own x, z
    double angle_rad = 0;               ///< ellipse rotation (from +x towards +z)
    double x0_m = 0, z0_m = 0, x1_m = 0, z1_m = 0;  ///< tube axis end points
    double radius_m = 0;                ///< tube radius
    bool anechoic = false;
    double contrast_db = 0;
    std::string label;                  ///< for answer files
    bool contains(double x, double z) const;
};

struct SpeckleSpec {
    bool enabled = false;
    double x_min_m = 0, x_max_m = 0, z_min_m = 0, z_max_m = 0;
    double density_per_m2 = 0;   ///< scatterers per unit area (2-D)
    double amplitude_rms = 0.05; ///< rms of the Gaussian scatterer amplitudes
    std::vector<SpeckleRegion> regions;  ///< later regions override earlier ones
};

enum class NoiseReference { None, BackWall, Peak, Amplitude };

/// Additive noise band-limited to the pulse spectrum; rms = reference / 10^(snr_db/20).
struct NoiseSpec {
    NoiseReference reference = NoiseReference::None;
    double snr_db = 0;
    double reference_amplitude = 0;  ///< for NoiseReference::Amplitude
};

enum class FrameKind { Single, Encoded, Cine };

struct FrameSpec {
    FrameKind kind = FrameKind::Single;
    size_t count = 1;
    double start_m = 0, step_m = 0;        ///< encoded: array y position of frame f = start + f*step
    double interval_s = 0;                 ///< cine: frame f at time f*interval
    double velocity_x_m_s = 0, velocity_z_m_s = 0;      ///< cine: steady drift of the scene
    double oscillation_x_m = 0, oscillation_z_m = 0;    ///< cine: sinusoidal displacement amplitude
    double period_s = 0;                                 ///< of the oscillation (0 = none)
    /// Array y position of frame f (encoded), else 0.
    double scanPosition(size_t f) const;
    /// Time of frame f (cine), s.
    double time(size_t f) const;
    /// Rigid displacement (dx, dz) of the scene at frame f, m (cine), else 0.
    std::pair<double, double> displacement(size_t f) const;
};

struct OutputSpec {
    core::SampleType sample_type = core::SampleType::Float32;
    std::optional<double> scale;   ///< int16: value per count; unset = automatic from frame 0
    std::string units = "a.u.";
};

struct Scene {
    std::string source;            ///< file name (for messages)
    std::string title;
    std::string scenario;          ///< short name, e.g. "weld_coupon"
    std::vector<std::pair<std::string, std::string>> provenance;  ///< extra free attributes
    uint64_t seed = 1;
    ArraySpec array;
    TransmitSpec transmit;
    SamplingSpec sampling;
    MediumSpec medium;
    std::optional<WedgeSpec> wedge;
    ElasticSpec elastic;
    std::vector<PointReflector> points;
    std::vector<SideDrilledHole> holes;
    std::vector<PlanarFlaw> flaws;
    std::optional<BackWall> back_wall;
    SpeckleSpec speckle;
    NoiseSpec noise;
    FrameSpec frames;
    OutputSpec output;
};

/// Limits a scene must keep (checked by parseScene before anything is simulated).
inline constexpr size_t kMaxScenePoints = 100000;
inline constexpr size_t kMaxSceneHoles = 10000;
inline constexpr size_t kMaxSceneFlaws = 1000;
inline constexpr size_t kMaxSceneFlawPoints = 2000000;  ///< points of all planar flaws together (lambda/4 apart)
inline constexpr double kMaxSceneExtentM = 10.0;         ///< every reflector within 10 m of the array
inline constexpr double kMaxPulseSamples = 100000;       ///< samples of the pulse table
inline constexpr size_t kMaxSceneModes = 16;              ///< views listed in "paths.modes"
/// Elastic paths: scatterer path evaluations per frame (points x elements x leg sequences) at most.
inline constexpr double kMaxSceneElasticPaths = 2e8;

/// Parses and validates a scene from JSON text. `source` names the file in messages.
/// Throws core::InputError(source, "key.path", problem) for malformed JSON, missing or
/// unknown keys, wrong types, and values out of physical range.
///
///   auto scene = parseScene(R"({"array": {...}, ...})", "test.json");
Scene parseScene(const std::string& json, const std::string& source);

/// Reads and parses a scene file. Throws core::InputError naming the file.
Scene loadScene(const std::string& path);

}  // namespace umbra::recon::sim
