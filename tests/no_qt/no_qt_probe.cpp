// SPDX-License-Identifier: MIT
// Linked against umbra_core only (no Qt anywhere): writes a small synthetic capture, reads it
// back and validates it. Exit 0 on success.
#include <cmath>
#include <cstdio>

#include "core/capture_file.h"

int main(int argc, char** argv) {
    using namespace umbra::core;
    if (argc != 2) {
        std::fputs("usage: no_qt_probe OUT.h5\n", stderr);
        return 2;
    }
    CaptureHeader h;
    h.title = "no-Qt probe (synthetic)";
    h.created_utc = "2026-12-01T00:00:00Z";
    for (int i = 0; i < 4; ++i) h.array.element_position_m.push_back({(i - 1.5) * 1e-3, 0, 0});
    h.array.centre_frequency_hz = 2e6;
    h.array.fractional_bandwidth = 0.5;
    h.array.element_width_m = 0.9e-3;
    h.transmit.kind = TransmitKind::PlaneWave;
    h.transmit.angle_rad = {0.0};
    h.receive.element_index = {0, 1, 2, 3};
    h.receive.sampling_frequency_hz = 20e6;
    h.receive.start_time_s = {0.0};
    h.medium.speed_of_sound_m_s = 1500;
    h.frames = 1;
    h.samples = 16;
    try {
        {
            CaptureWriter w(argv[1], h);
            std::vector<float> b(h.blockSize());
            for (size_t i = 0; i < b.size(); ++i) b[i] = std::sin(0.3f * float(i));
            w.writeBlock(0, 0, b.data());
            w.finish();
        }
        CaptureReader r(argv[1]);
        auto problems = CaptureReader::validate(argv[1]);
        std::vector<float> b(r.header().blockSize());
        r.readBlock(0, 0, b.data());
        if (!problems.empty() || std::abs(b[5] - std::sin(1.5f)) > 1e-6f) {
            std::fputs("round trip failed\n", stderr);
            return 1;
        }
    } catch (const std::exception& e) {
        std::fprintf(stderr, "%s\n", e.what());
        return 1;
    }
    std::puts("umbra_core works without Qt");
    return 0;
}
