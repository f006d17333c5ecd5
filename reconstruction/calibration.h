// SPDX-License-Identifier: MIT
#pragma once
// Calibration and data quality from a full-matrix capture (no Qt):
//   - speed of sound from the back-wall echo of a plate of known thickness (c = 2 d / t), and,
//     when the record holds the back wall's repeat, from the echo and its repeat
//     (c = 2 d / (t2 - t1), free of any fixed delay) with that fixed delay t0 = 2 t1 - t2;
//   - speed of sound from two side-drilled holes of equal diameter at known depths
//     (c = 2 (z2 - z1) / (t2 - t1));
//   - fixed delay (wedge or delay line, at normal incidence) from a reflector of known depth
//     and speed: t0 = t - 2 d / c;
//   - fixed delay from a reflector at a known place seen at an angle, through the wedge or on
//     contact: the median over elements of (echo time - least-time model of the round trip);
//   - weak or dead elements from the transmit and receive energies of the full matrix.
// Echo times are envelope peaks of the pulse-echo traces (transmit i, receive i), found on the
// band-limited upsampled analytic signal and refined by a parabola through the peak.
// Uncertainties follow the GUM (JCGM 100:2008): relative components of a quotient add in
// quadrature (5.1.6); a tolerance ±a is a rectangular distribution, u = a / √3 (4.3.7).
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "core/capture_file.h"
#include "core/uncertainty.h"
#include "reconstruction/view_mode.h"

namespace umbra::recon {

/// Echo time of one reflector over the pulse-echo traces.
struct EchoTime {
    double time_s = 0;       ///< median (back wall) or hyperbola vertex (hole) over elements, s
    double u_time_s = 0;     ///< standard uncertainty of time_s (spread over elements and peak picking), s
    size_t elements = 0;     ///< pulse-echo traces used
    double amplitude = 0;    ///< median envelope peak, capture units
};

struct SpeedCalibration {
    std::string method;            ///< "back wall", "back wall and its repeat", "two holes"
    core::MeasuredValue speed;     ///< m/s, budget with k = 2
    std::vector<EchoTime> echoes;  ///< the echo times used, in order of time
    /// From the back wall and its repeat: the fixed delay in every trace (wedge, delay line,
    /// electronics) t0 = 2 t1 - t2, s.
    std::optional<core::MeasuredValue> fixed_delay;
    /// Back wall only: the speed from the first echo alone (time zero at the element face), for
    /// comparison when the repeat gave `speed`.
    std::optional<core::MeasuredValue> single_echo_speed;
    std::vector<std::string> notes;  ///< assumptions and warnings, plain sentences
};

/// Speed of sound from the back wall of a plate `thickness_m` thick (± `thickness_tol_m`, a
/// tolerance taken as rectangular) in frame `frame`. The echo is searched for between the times
/// the speeds [c_min, c_max] give (default: 0.6 to 1.6 times the capture's speed, or 1000 to
/// 10000 m/s when it records none). Uses the repeat when it lies inside the record and stands
/// 12 dB or less below the first echo. Throws SettingError for a capture without pulse-echo
/// traces or bad arguments, InputError (naming the file) when no echo is found.
SpeedCalibration speedFromBackWall(const core::CaptureReader& capture, double thickness_m, double thickness_tol_m,
                                   size_t frame = 0, double c_min_m_s = 0, double c_max_m_s = 0);

/// Speed of sound from two side-drilled holes of equal diameter at depths z1 < z2 (hole
/// centres, ± `depth_tol_m` each): each hole's echo time is the vertex of the hyperbola
/// t² = 4 ((x - x_h)² + z'²) / c² fitted to the pulse-echo times of the elements about the
/// strongest one; the holes' radius cancels in the difference. Throws like speedFromBackWall.
SpeedCalibration speedFromHoles(const core::CaptureReader& capture, double z1_m, double z2_m, double depth_tol_m,
                                size_t frame = 0);

/// Fixed delay t0 = t - 2 d / c of a reflector at depth d (± tolerance, rectangular) seen at
/// echo time t with speed c (standard uncertainty u_c): wedge or delay-line time at normal
/// incidence plus any system delay. Value in seconds, budget with k = 2.
core::MeasuredValue fixedDelay(const EchoTime& echo, double depth_m, double depth_tol_m, double c_m_s, double u_c_m_s);

/// Fixed delay from a reflector at a known place (specimen frame, through the capture's wedge
/// if it has one): for each element whose pulse-echo trace holds the reflector's echo, the
/// echo time minus the model's round trip 2 τ - 2 r / c (τ the least-time path of `ray_path.h`
/// to the reflector's centre along one leg of type `wave`, r the hole's radius, 0 for a point
/// or tip); the delay is the median over elements within 6 dB of the strongest. Use it as
/// `delay_model.fixed_delay_us`. The delay is first searched for within ±`search_s` by stacking
/// the pulse-echo envelopes along the model's moveout (only the reflector at the assumed place
/// lines up), then each element's echo is taken within one period of it.
struct DelayCalibration {
    double x_s_m = 0, z_s_m = 0, radius_m = 0;  ///< the reflector as given
    Wave wave = Wave::L;                         ///< wave type of the path in the part
    core::MeasuredValue delay;  ///< s, budget with k = 2
    size_t elements = 0;        ///< pulse-echo traces used
    double spread_s = 0;        ///< robust standard deviation of the per-element residuals, s
    double amplitude = 0;       ///< strongest echo, capture units
    std::vector<std::string> notes;
};
/// Throws SettingError for bad arguments, a capture without pulse-echo traces, a wave type whose
/// speed the capture lacks or a reflector no path reaches; InputError (naming the file) when no
/// echo is found.
DelayCalibration fixedDelayFromReflector(const core::CaptureReader& capture, double x_s_m, double z_s_m, double radius_m,
                                         double position_tol_m, Wave wave, size_t frame = 0, double search_s = 2e-6);
/// The usual wave type for a delay calibration: shear through a wedge, longitudinal on contact.
Wave defaultDelayWave(const core::CaptureHeader& h);
/// Plain-text lines for the technique block / the CLI.
std::vector<std::string> delayLines(const DelayCalibration& c);

/// Element health from the energies of a full matrix (frame `frame`).
enum class ElementStatus { Ok, Weak, Dead };
const char* elementStatusName(ElementStatus s);  ///< "ok", "weak", "dead"
struct ElementReport {
    int element = 0;                 ///< 0-based index (shown from 1)
    double transmit_db = 0;          ///< 10 log10 of the energy of its transmit event, dB re the median element
    double receive_db = 0;           ///< 10 log10 of the energy it received over every transmit, dB re the median
    double pulse_echo_db = 0;        ///< its own pulse-echo trace, dB re the median
    double transmit_z = 0, receive_z = 0;  ///< modified z-scores 0.6745 (L - median) / MAD
    ElementStatus status = ElementStatus::Ok;
};
struct ElementHealth {
    std::vector<ElementReport> elements;
    bool transmit_known = false;  ///< full matrix: transmit energies per element exist
    /// Rule, one sentence with its thresholds.
    std::string rule;
    std::vector<int> flagged() const;  ///< 0-based indices of weak or dead elements
};
/// Thresholds: dead when an element's transmit or receive level is more than kDeadDb below the
/// median element; weak when more than kWeakDb below it and its modified z-score is below
/// -kWeakZ (Iglewicz & Hoaglin, "How to detect and handle outliers", ASQC 1993: |M| > 3.5).
inline constexpr double kDeadDb = 20, kWeakDb = 6, kWeakZ = 3.5;
/// Reads frame `frame` block by block (one transmit in memory at a time). For plane-wave and
/// virtual-source captures only receive levels are known.
ElementHealth elementHealth(const core::CaptureReader& capture, size_t frame = 0);

/// Plain-text lines for the technique block / the CLI ("Speed of sound (calibrated, back wall
/// 20.00 ± 0.05 mm): 5921 ± 12 m/s (k = 2)"); numbers rounded to their uncertainty.
std::vector<std::string> calibrationLines(const SpeedCalibration& c);
std::vector<std::string> healthLines(const ElementHealth& h);

}  // namespace umbra::recon
