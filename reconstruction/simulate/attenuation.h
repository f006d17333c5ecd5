// SPDX-License-Identifier: MIT
#pragma once
// Frequency-dependent attenuation, linear in frequency, applied at the centre frequency:
//     amplitude factor = exp(-alpha_np * f0 * path),  alpha_np = alpha_dB * ln(10) / 20,
// with alpha in dB/cm/MHz one way, f0 in MHz and the total path (both legs) in cm. So a
// round trip to depth z loses 2 * alpha * f0 * z dB. The spectral downshift of the pulse
// is not modelled (the pulse keeps its centre frequency and bandwidth).
#include <cmath>

namespace umbra::recon::sim {

/// Amplitude factor (<= 1) after `path_m` metres at `frequency_hz`.
inline double attenuationFactor(double db_per_cm_mhz, double frequency_hz, double path_m) {
    const double db = db_per_cm_mhz * (frequency_hz * 1e-6) * (path_m * 100.0);
    return std::pow(10.0, -db / 20.0);
}

/// Nepers per metre at `frequency_hz` for a coefficient in dB/cm/MHz.
inline double attenuationNpPerM(double db_per_cm_mhz, double frequency_hz) {
    return db_per_cm_mhz * (frequency_hz * 1e-6) * 100.0 * std::log(10.0) / 20.0;
}

}  // namespace umbra::recon::sim
