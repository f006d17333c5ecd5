// SPDX-License-Identifier: MIT
#pragma once
// In-memory description of a capture file (format v1), everything but the traces.
// Units are SI and in the field names, as in the file. See docs/capture-format.md.
#include <array>
#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <vector>

namespace umbra::core {

using Vec3 = std::array<double, 3>;

enum class TransmitKind { SingleElement, PlaneWave, VirtualSource };
/// "single_element", "plane_wave", "virtual_source"
const char* toString(TransmitKind k);
std::optional<TransmitKind> transmitKindFromString(const std::string& s);
/// Words for users (captions, reports): "full matrix", "plane waves", "virtual sources".
const char* transmitLabel(TransmitKind k);

enum class SampleType { Int16, Float32 };

struct ArrayInfo {
    std::vector<Vec3> element_position_m;  ///< [N_el] element centres, array frame
    double centre_frequency_hz = 0;
    double fractional_bandwidth = 0;      ///< -6 dB bandwidth / centre frequency
    double element_width_m = 0;           ///< active width along x
    std::optional<double> element_height_m;
    /// Optional: −6 dB full width of the elevation beam (across the image plane, along the scan
    /// axis of an encoded scan), m; used for sizing along the scan axis.
    std::optional<double> elevation_beam_width_m;
    size_t elementCount() const { return element_position_m.size(); }
    /// Mean spacing of neighbouring elements along x, m (0 for a single element).
    double pitch_m() const;
};

struct TransmitInfo {
    TransmitKind kind = TransmitKind::SingleElement;
    std::vector<int32_t> source_element;      ///< [N_tx] single_element
    std::vector<double> angle_rad;            ///< [N_tx] plane_wave
    std::vector<Vec3> virtual_source_m;       ///< [N_tx] virtual_source
    std::vector<double> delay_s;              ///< optional [N_tx * N_el], row-major
    std::vector<float> apodization;           ///< optional [N_tx * N_el], row-major
    size_t count() const;
};

struct ReceiveInfo {
    std::vector<int32_t> element_index;  ///< [N_rx] channel -> element
    double sampling_frequency_hz = 0;
    std::vector<double> start_time_s;    ///< [N_tx] time of sample 0 per transmit event
};

struct WedgeInfo {
    double speed_of_sound_m_s = 0;
    Vec3 surface_origin_m{0, 0, 0};
    double surface_tilt_rad = 0;
};

struct MediumInfo {
    double speed_of_sound_m_s = 0;
    std::optional<double> shear_speed_m_s;
    std::optional<double> attenuation_db_per_cm_mhz;
    std::optional<double> thickness_m;
    std::optional<WedgeInfo> wedge;
};

struct ScanInfo {
    std::vector<double> position_m;  ///< [N_frames] or empty
    std::vector<double> time_s;      ///< [N_frames] or empty
};

struct TruthInfo {
    std::vector<Vec3> scatterer_position_m;
    std::vector<double> scatterer_amplitude;
    std::string frame;  ///< value of attr `frame` if present
    /// Optional attr `regions_json`: JSON list of the extended structures of a simulated scene
    /// (kind, centre, axes or diameter, angle, echogenicity dB); empty when absent.
    std::string regions_json = {};
};

/// Everything in a capture but the traces.
struct CaptureHeader {
    std::string title;
    std::string created_utc;
    ArrayInfo array;
    TransmitInfo transmit;
    ReceiveInfo receive;
    MediumInfo medium;
    std::optional<ScanInfo> scan;
    std::optional<TruthInfo> truth;
    std::map<std::string, std::string> provenance;

    // /data/rf layout
    size_t frames = 0;
    size_t samples = 0;  ///< N_samples per trace
    SampleType sample_type = SampleType::Float32;
    double rf_scale = 1.0;
    std::string rf_units;

    size_t transmits() const { return transmit.count(); }
    size_t receives() const { return receive.element_index.size(); }
    /// Samples in one (frame, transmit) block: N_rx * N_samples.
    size_t blockSize() const { return receives() * samples; }
    /// True when /provenance says the data were simulated.
    bool isSynthetic() const;
};

/// Checks the header for internal consistency and physical sense (shapes agree, numbers are
/// finite and in range, indices in range, sizes not absurd). Returns every problem found,
/// each with the HDF5 path it concerns; empty when the header is good.
std::vector<struct Problem> checkHeader(const CaptureHeader& h);

/// Things in a valid header that a user should know (the capture is still read): each with the
/// HDF5 path it concerns. Today: sampling below twice the probe's upper -6 dB edge f0 (1 + B/2)
/// (B the -6 dB fractional bandwidth), where the upper part of the echo spectrum aliases
/// (Nyquist-Shannon sampling theorem).
std::vector<struct Problem> headerWarnings(const CaptureHeader& h);

/// Upper bounds that protect against absurd headers (giant allocations).
struct CaptureLimits {
    static constexpr size_t max_elements = 4096;
    static constexpr size_t max_transmits = 65536;
    static constexpr size_t max_samples = size_t(1) << 22;     // 4 Mi samples per trace
    static constexpr size_t max_frames = size_t(1) << 20;
    static constexpr size_t max_block_bytes = size_t(1) << 30;  // one (frame, transmit) block as float32
    static constexpr size_t max_truth = size_t(1) << 24;
};

}  // namespace umbra::core
