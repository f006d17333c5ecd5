// SPDX-License-Identifier: MIT
#include "ui_test_support.h"

#include <QCoreApplication>
#include <QElapsedTimer>
#include <QTemporaryDir>
#include <QThread>

#include <cmath>
#include <memory>
#include <vector>

#include "core/capture.h"
#include "core/capture_file.h"

namespace umbra::ui::test {

MainWindow::Options quietOptions() {
    MainWindow::Options o;
    o.interactive = false;
    o.recovery = MainWindow::Recovery::Ignore;
    o.autosave_seconds = 3600;
    return o;
}

void writePointCapture(const std::string& path, size_t elements, size_t frames) {
    core::CaptureHeader h;
    h.title = "UI test: one point reflector (synthetic)";
    h.created_utc = "2026-01-01T00:00:00Z";
    const double pitch = 0.6e-3, c = 1540.0, f0 = 5e6, fs = 25e6;
    for (size_t e = 0; e < elements; ++e)
        h.array.element_position_m.push_back({(static_cast<double>(e) - (static_cast<double>(elements) - 1) / 2) * pitch, 0, 0});
    h.array.centre_frequency_hz = f0;
    h.array.fractional_bandwidth = 0.6;
    h.array.element_width_m = 0.5e-3;
    h.transmit.kind = core::TransmitKind::SingleElement;
    for (size_t e = 0; e < elements; ++e) h.transmit.source_element.push_back(static_cast<int32_t>(e));
    for (size_t e = 0; e < elements; ++e) h.receive.element_index.push_back(static_cast<int32_t>(e));
    h.receive.sampling_frequency_hz = fs;
    h.receive.start_time_s.assign(elements, 0.0);
    h.medium.speed_of_sound_m_s = c;
    if (frames > 1) {
        h.scan = core::ScanInfo{};
        for (size_t f = 0; f < frames; ++f) h.scan->position_m.push_back(static_cast<double>(f) * 1e-3);
    }
    h.provenance["generator"] = "ui tests (synthetic point echo)";
    h.frames = frames;
    h.samples = 512;  // 20.5 µs: 15.8 mm of depth at 1540 m/s
    h.sample_type = core::SampleType::Float32;
    h.rf_scale = 1.0;
    h.rf_units = "a.u.";
    core::CaptureWriter w(path, h);
    const double zp = 10e-3, sigma = 0.6 / (2 * M_PI * f0 * 0.6 / 2.355);  // Gaussian pulse envelope
    std::vector<float> block(h.blockSize());
    for (size_t f = 0; f < frames; ++f)
        for (size_t t = 0; t < elements; ++t) {
            const auto& pt = h.array.element_position_m[t];
            // Echo strength falls off with scan position so frames differ.
            const double amp = std::exp(-std::pow((static_cast<double>(f) - (static_cast<double>(frames) - 1) / 2) / 2.0, 2));
            for (size_t r = 0; r < elements; ++r) {
                const auto& pr = h.array.element_position_m[r];
                const double tau = (std::hypot(pt[0], zp) + std::hypot(pr[0], zp)) / c;
                for (size_t k = 0; k < h.samples; ++k) {
                    const double dt = static_cast<double>(k) / fs - tau;
                    block[r * h.samples + k] = static_cast<float>(amp * std::exp(-dt * dt / (2 * sigma * sigma)) * std::cos(2 * M_PI * f0 * dt));
                }
            }
            w.writeBlock(f, t, block.data());
        }
    w.finish();
}

bool waitUntil(const std::function<bool()>& done, int timeout_ms) {
    QElapsedTimer t;
    t.start();
    while (!done() && t.elapsed() < timeout_ms) {
        QCoreApplication::processEvents(QEventLoop::AllEvents, 20);
        QThread::msleep(2);
    }
    return done();
}

QString tempDir() {
    static std::vector<std::unique_ptr<QTemporaryDir>> dirs;
    dirs.push_back(std::make_unique<QTemporaryDir>());
    return dirs.back()->path();
}

}  // namespace umbra::ui::test
