// SPDX-License-Identifier: MIT
// checkHeader on values h5py fixtures do not reach: the contract (capture format v1,
// "Conventions") says a reader refuses any file whose numbers are not finite; the optional
// /transmit/apodization weights and /truth datasets are numbers too. Each check names the
// HDF5 path, as the contract requires.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "core/capture.h"
#include "core/error.h"

using namespace umbra::core;

namespace {

// A small valid header: 4 elements at 0.5 mm pitch, full-matrix transmits (all synthetic).
CaptureHeader validHeader() {
    CaptureHeader h;
    h.title = "header check (synthetic)";
    h.created_utc = "2026-12-01T00:00:00Z";
    for (int i = 0; i < 4; ++i) h.array.element_position_m.push_back({(i - 1.5) * 0.5e-3, 0, 0});
    h.array.centre_frequency_hz = 5e6;
    h.array.fractional_bandwidth = 0.6;
    h.array.element_width_m = 0.45e-3;
    h.transmit.kind = TransmitKind::SingleElement;
    h.transmit.source_element = {0, 1, 2, 3};
    h.transmit.apodization.assign(16, 1.0f);
    h.receive.element_index = {0, 1, 2, 3};
    h.receive.sampling_frequency_hz = 40e6;
    h.receive.start_time_s.assign(4, 0.0);
    h.medium.speed_of_sound_m_s = 5900;
    h.frames = 1;
    h.samples = 1000;
    h.truth.emplace();
    h.truth->scatterer_position_m = {{0, 0, 10e-3}};
    h.truth->scatterer_amplitude = {1.0};
    return h;
}

bool names(const std::vector<Problem>& ps, const std::string& where) {
    for (auto& p : ps)
        if (p.where == where) return true;
    return false;
}

TEST(CaptureHeaderCheck, ValidHeaderHasNoProblems) {
    EXPECT_TRUE(checkHeader(validHeader()).empty());
}

TEST(CaptureHeaderCheck, NonFiniteApodizationIsRefused) {
    auto h = validHeader();
    h.transmit.apodization[5] = std::numeric_limits<float>::quiet_NaN();
    EXPECT_TRUE(names(checkHeader(h), "/transmit/apodization"));
    h.transmit.apodization[5] = std::numeric_limits<float>::infinity();
    EXPECT_TRUE(names(checkHeader(h), "/transmit/apodization"));
}

TEST(CaptureHeaderCheck, NonFiniteTruthIsRefused) {
    auto h = validHeader();
    h.truth->scatterer_position_m[0][2] = std::nan("");
    EXPECT_TRUE(names(checkHeader(h), "/truth/scatterer_position_m"));
    h = validHeader();
    h.truth->scatterer_amplitude[0] = -std::numeric_limits<double>::infinity();
    EXPECT_TRUE(names(checkHeader(h), "/truth/scatterer_amplitude"));
}

}  // namespace
