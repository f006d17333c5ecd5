// SPDX-License-Identifier: MIT
#include "core/capture.h"

#include <cmath>
#include <cstdio>
#include <string>

#include "core/error.h"

namespace umbra::core {

const char* toString(TransmitKind k) {
    switch (k) {
        case TransmitKind::SingleElement: return "single_element";
        case TransmitKind::PlaneWave: return "plane_wave";
        case TransmitKind::VirtualSource: return "virtual_source";
    }
    return "?";
}

const char* transmitLabel(TransmitKind k) {
    switch (k) {
        case TransmitKind::SingleElement: return "full matrix";
        case TransmitKind::PlaneWave: return "plane waves";
        case TransmitKind::VirtualSource: return "virtual sources";
    }
    return "?";
}

std::optional<TransmitKind> transmitKindFromString(const std::string& s) {
    if (s == "single_element") return TransmitKind::SingleElement;
    if (s == "plane_wave") return TransmitKind::PlaneWave;
    if (s == "virtual_source") return TransmitKind::VirtualSource;
    return std::nullopt;
}

double ArrayInfo::pitch_m() const {
    if (element_position_m.size() < 2) return 0.0;
    return std::abs(element_position_m.back()[0] - element_position_m.front()[0]) /
           double(element_position_m.size() - 1);
}

size_t TransmitInfo::count() const {
    switch (kind) {
        case TransmitKind::SingleElement: return source_element.size();
        case TransmitKind::PlaneWave: return angle_rad.size();
        case TransmitKind::VirtualSource: return virtual_source_m.size();
    }
    return 0;
}

bool CaptureHeader::isSynthetic() const {
    for (auto& [k, v] : provenance) {
        if (v.find("synthetic") != std::string::npos || v.find("simulat") != std::string::npos) return true;
    }
    return false;
}

std::vector<Problem> checkHeader(const CaptureHeader& h) {
    std::vector<Problem> p;
    auto add = [&](std::string where, std::string what) { p.push_back({std::move(where), std::move(what)}); };
    auto finite = [](double v) { return std::isfinite(v); };
    auto finite3 = [&](const Vec3& v) { return finite(v[0]) && finite(v[1]) && finite(v[2]); };

    const size_t nel = h.array.elementCount();
    if (nel == 0) add("/array/element_position_m", "no elements");
    if (nel > CaptureLimits::max_elements)
        add("/array/element_position_m", std::to_string(nel) + " elements exceeds the limit of " +
                                             std::to_string(CaptureLimits::max_elements));
    for (size_t i = 0; i < nel; ++i)
        if (!finite3(h.array.element_position_m[i])) {
            add("/array/element_position_m", "element " + std::to_string(i) + " has a non-finite coordinate");
            break;
        }
    if (!finite(h.array.centre_frequency_hz) || h.array.centre_frequency_hz <= 0)
        add("/array@centre_frequency_hz", "must be a finite positive frequency");
    if (!finite(h.array.fractional_bandwidth) || h.array.fractional_bandwidth <= 0 || h.array.fractional_bandwidth > 2)
        add("/array@fractional_bandwidth", "must be in (0, 2]");
    if (!finite(h.array.element_width_m) || h.array.element_width_m <= 0 || h.array.element_width_m > 1)
        add("/array@element_width_m", "must be a finite width in (0, 1] m");
    if (h.array.element_height_m && (!finite(*h.array.element_height_m) || *h.array.element_height_m <= 0))
        add("/array@element_height_m", "must be finite and positive");
    if (h.array.elevation_beam_width_m && (!finite(*h.array.elevation_beam_width_m) || *h.array.elevation_beam_width_m <= 0))
        add("/array@elevation_beam_width_m", "must be finite and positive");

    const size_t ntx = h.transmit.count();
    if (ntx == 0) add("/transmit", "the transmit list is empty");
    if (ntx > CaptureLimits::max_transmits) add("/transmit", "too many transmit events (" + std::to_string(ntx) + ")");
    switch (h.transmit.kind) {
        case TransmitKind::SingleElement:
            for (size_t i = 0; i < h.transmit.source_element.size(); ++i) {
                int32_t e = h.transmit.source_element[i];
                if (e < 0 || size_t(e) >= nel) {
                    add("/transmit/source_element", "entry " + std::to_string(i) + " = " + std::to_string(e) +
                                                        " is not an element index in [0, " + std::to_string(nel) + ")");
                    break;
                }
            }
            break;
        case TransmitKind::PlaneWave:
            for (double a : h.transmit.angle_rad)
                if (!finite(a) || std::abs(a) >= M_PI / 2) {
                    add("/transmit/angle_rad", "angles must be finite and within (-pi/2, pi/2)");
                    break;
                }
            break;
        case TransmitKind::VirtualSource:
            for (auto& v : h.transmit.virtual_source_m)
                if (!finite3(v)) {
                    add("/transmit/virtual_source_m", "non-finite coordinate");
                    break;
                }
            break;
    }
    if (!h.transmit.delay_s.empty()) {
        if (h.transmit.delay_s.size() != ntx * nel)
            add("/transmit/delay_s", "shape must be [N_tx, N_el] = [" + std::to_string(ntx) + ", " + std::to_string(nel) + "]");
        for (double d : h.transmit.delay_s)
            if (!finite(d)) { add("/transmit/delay_s", "non-finite delay"); break; }
    }
    if (!h.transmit.apodization.empty() && h.transmit.apodization.size() != ntx * nel)
        add("/transmit/apodization", "shape must be [N_tx, N_el] = [" + std::to_string(ntx) + ", " + std::to_string(nel) + "]");
    for (float w : h.transmit.apodization)
        if (!std::isfinite(w)) { add("/transmit/apodization", "non-finite weight"); break; }

    const size_t nrx = h.receives();
    if (nrx == 0) add("/receive/element_index", "no receive channels");
    for (size_t i = 0; i < nrx; ++i) {
        int32_t e = h.receive.element_index[i];
        if (e < 0 || size_t(e) >= nel) {
            add("/receive/element_index", "entry " + std::to_string(i) + " = " + std::to_string(e) +
                                              " is not an element index in [0, " + std::to_string(nel) + ")");
            break;
        }
    }
    if (!finite(h.receive.sampling_frequency_hz) || h.receive.sampling_frequency_hz <= 0)
        add("/receive@sampling_frequency_hz", "must be a finite positive frequency");
    else if (h.array.centre_frequency_hz > 0 && h.receive.sampling_frequency_hz < 2 * h.array.centre_frequency_hz)
        add("/receive@sampling_frequency_hz", "is below twice the centre frequency");
    if (h.receive.start_time_s.size() != ntx)
        add("/receive/start_time_s", "has " + std::to_string(h.receive.start_time_s.size()) +
                                         " entries; expected one per transmit event (" + std::to_string(ntx) + ")");
    for (double t : h.receive.start_time_s)
        if (!finite(t)) { add("/receive/start_time_s", "non-finite start time"); break; }

    const double c = h.medium.speed_of_sound_m_s;
    if (!finite(c) || c < 100 || c > 20000) add("/medium@speed_of_sound_m_s", "must be a finite speed in [100, 20000] m/s");
    if (h.medium.shear_speed_m_s && (!finite(*h.medium.shear_speed_m_s) || *h.medium.shear_speed_m_s <= 0 || *h.medium.shear_speed_m_s > 20000))
        add("/medium@shear_speed_m_s", "must be a finite positive speed");
    if (h.medium.attenuation_db_per_cm_mhz && (!finite(*h.medium.attenuation_db_per_cm_mhz) || *h.medium.attenuation_db_per_cm_mhz < 0 || *h.medium.attenuation_db_per_cm_mhz > 100))
        add("/medium@attenuation_db_per_cm_mhz", "must be finite and in [0, 100]");
    if (h.medium.thickness_m && (!finite(*h.medium.thickness_m) || *h.medium.thickness_m <= 0 || *h.medium.thickness_m > 10))
        add("/medium@thickness_m", "must be finite and in (0, 10] m");
    if (h.medium.wedge) {
        const auto& w = *h.medium.wedge;
        if (!finite(w.speed_of_sound_m_s) || w.speed_of_sound_m_s < 100 || w.speed_of_sound_m_s > 20000)
            add("/medium/wedge@speed_of_sound_m_s", "must be a finite speed in [100, 20000] m/s");
        if (!finite3(w.surface_origin_m)) add("/medium/wedge@surface_origin_m", "non-finite coordinate");
        if (!finite(w.surface_tilt_rad) || std::abs(w.surface_tilt_rad) >= M_PI / 2)
            add("/medium/wedge@surface_tilt_rad", "must be finite and within (-pi/2, pi/2)");
    }

    if (h.frames == 0) add("/data/rf", "no frames");
    if (h.frames > CaptureLimits::max_frames) add("/data/rf", "claims " + std::to_string(h.frames) + " frames (limit " + std::to_string(CaptureLimits::max_frames) + ")");
    if (h.samples < 2) add("/data/rf", "traces must have at least 2 samples");
    if (h.samples > CaptureLimits::max_samples)
        add("/data/rf", "claims " + std::to_string(h.samples) + " samples per trace (limit " + std::to_string(CaptureLimits::max_samples) + ")");
    else if (nrx <= CaptureLimits::max_elements && h.samples * nrx * sizeof(float) > CaptureLimits::max_block_bytes)
        add("/data/rf", "one transmit event would need more than 1 GiB");
    if (!finite(h.rf_scale) || h.rf_scale <= 0) add("/data/rf@scale", "must be finite and positive");

    if (h.scan) {
        if (!h.scan->position_m.empty() && h.scan->position_m.size() != h.frames)
            add("/scan/position_m", "has " + std::to_string(h.scan->position_m.size()) + " entries; expected one per frame (" + std::to_string(h.frames) + ")");
        if (!h.scan->time_s.empty() && h.scan->time_s.size() != h.frames)
            add("/scan/time_s", "has " + std::to_string(h.scan->time_s.size()) + " entries; expected one per frame (" + std::to_string(h.frames) + ")");
        for (double v : h.scan->position_m) if (!finite(v)) { add("/scan/position_m", "non-finite position"); break; }
        for (double v : h.scan->time_s) if (!finite(v)) { add("/scan/time_s", "non-finite time"); break; }
    }
    if (h.truth) {
        if (h.truth->scatterer_amplitude.size() != h.truth->scatterer_position_m.size())
            add("/truth/scatterer_amplitude", "length differs from /truth/scatterer_position_m");
        for (auto& v : h.truth->scatterer_position_m)
            if (!finite3(v)) { add("/truth/scatterer_position_m", "non-finite coordinate"); break; }
        for (double a : h.truth->scatterer_amplitude)
            if (!finite(a)) { add("/truth/scatterer_amplitude", "non-finite amplitude"); break; }
    }
    return p;
}

std::vector<Problem> headerWarnings(const CaptureHeader& h) {
    std::vector<Problem> w;
    const double f0 = h.array.centre_frequency_hz, B = h.array.fractional_bandwidth, fs = h.receive.sampling_frequency_hz;
    if (std::isfinite(f0) && f0 > 0 && std::isfinite(B) && B > 0 && std::isfinite(fs) && fs > 0) {
        const double upper = f0 * (1 + B / 2);
        if (fs < 2 * upper) {
            char buf[256];
            std::snprintf(buf, sizeof buf,
                          "%.2f MHz is below twice the probe's upper -6 dB edge (2 x %.2f MHz = %.2f MHz): the upper part of the "
                          "echo spectrum aliases",
                          fs / 1e6, upper / 1e6, 2 * upper / 1e6);
            w.push_back({"/receive@sampling_frequency_hz", buf});
        }
    }
    return w;
}

}  // namespace umbra::core
