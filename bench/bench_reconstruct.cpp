// SPDX-License-Identifier: MIT
// Reconstruction throughput. Synthetic captures (noise traces; the beamformer's cost does not
// depend on the content) are written once to the temp directory.
//   full matrix: 64 elements, 2000 samples, 256 x 256 grid   (target >= 2e9 effective terms/s)
//   plane wave: 128 elements x 11 angles, 2000 samples, 400 x 400 grid (target < 100 ms/frame)
// Counters: terms_per_s = pixels x transmits x receives / wall time of the whole frame
// (read + analytic + delay-and-sum + envelope, after one warm-up frame); das_terms_per_s = the same
// over delay-and-sum time only.
#include <benchmark/benchmark.h>

#include <filesystem>
#include <random>

#include "core/capture_file.h"
#include "reconstruction/pipeline.h"

using namespace umbra;

namespace {

std::string makeCapture(bool plane_wave) {
    const size_t nel = plane_wave ? 128 : 64, ns = 2000;
    const auto path = (std::filesystem::temp_directory_path() / (plane_wave ? "umbra_bench_pw.h5" : "umbra_bench_fmc.h5")).string();
    if (std::filesystem::exists(path)) return path;
    core::CaptureHeader h;
    h.title = "benchmark capture (synthetic noise)";
    h.created_utc = "2026-01-01T00:00:00Z";
    const double pitch = plane_wave ? 0.3e-3 : 0.6e-3;
    for (size_t e = 0; e < nel; ++e) h.array.element_position_m.push_back({(double(e) - double(nel - 1) / 2) * pitch, 0, 0});
    h.array.centre_frequency_hz = 5e6;
    h.array.fractional_bandwidth = 0.6;
    h.array.element_width_m = pitch * 0.9;
    size_t ntx;
    if (plane_wave) {
        h.transmit.kind = core::TransmitKind::PlaneWave;
        for (int i = -5; i <= 5; ++i) h.transmit.angle_rad.push_back(i * 2.0 * M_PI / 180);
        ntx = 11;
    } else {
        h.transmit.kind = core::TransmitKind::SingleElement;
        for (size_t e = 0; e < nel; ++e) h.transmit.source_element.push_back(int32_t(e));
        ntx = nel;
    }
    for (size_t e = 0; e < nel; ++e) h.receive.element_index.push_back(int32_t(e));
    h.receive.sampling_frequency_hz = 50e6;
    h.receive.start_time_s.assign(ntx, 0.0);
    h.medium.speed_of_sound_m_s = plane_wave ? 1540 : 5920;
    h.frames = 1;
    h.samples = ns;
    h.sample_type = core::SampleType::Float32;
    h.provenance["source"] = "synthetic benchmark data";
    core::CaptureWriter w(path, h);
    std::mt19937 rng(1);
    std::normal_distribution<float> g;
    std::vector<float> block(h.blockSize());
    for (size_t t = 0; t < ntx; ++t) {
        for (auto& v : block) v = g(rng);
        w.writeBlock(0, t, block.data());
    }
    w.finish();
    return path;
}

void run(benchmark::State& state, bool plane_wave, const std::string& aperture, const std::string& interp, int upsampling = 0) {
    const auto path = makeCapture(plane_wave);
    core::CaptureReader cap(path);
    auto r = recon::defaultRecipe();
    const size_t n = plane_wave ? 400 : 256;
    // Region: the aperture width, depth 5 mm to 5 mm + width (square pixels).
    const double half = plane_wave ? 19.05 : 18.9;  // mm
    const double step = 2 * half / double(n - 1);
    r.setNumber("grid.x_min_mm", -half);
    r.setNumber("grid.x_max_mm", half + step / 2);
    r.setNumber("grid.z_min_mm", 5);
    r.setNumber("grid.z_max_mm", 5 + 2 * half + step / 2);
    r.setNumber("grid.step_mm", step);
    r.setText("das.aperture", aperture);
    r.setText("das.interpolation", interp);
    r.setNumber("das.upsampling", upsampling);
    recon::Reconstructor rec(cap, r, int(state.range(0)));
    if (rec.grid().nx() != n || rec.grid().nz() != n) state.SkipWithError("grid size");
    rec.run(0);  // warm-up (first-touch of buffers, capture hash): steady-state per frame is measured
    double terms = 0, das = 0, executed = 0;
    for (auto _ : state) {
        auto f = rec.run(0);
        benchmark::DoNotOptimize(f.envelope.data());
        const auto& t = rec.lastTimings();
        terms += t.effective_terms;
        executed += t.executed_terms;
        for (auto& [name, s] : t.stage_seconds)
            if (name == "delay-and-sum") das += s;
    }
    state.counters["terms_per_s"] = benchmark::Counter(terms, benchmark::Counter::kIsRate);
    state.counters["das_terms_per_s"] = das > 0 ? terms / das : 0;
    state.counters["executed_per_s"] = das > 0 ? executed / das : 0;  // kernel terms actually evaluated
    state.counters["executed_frac"] = terms > 0 ? executed / terms : 0;
}

void BM_TfmFmc64(benchmark::State& s) { run(s, false, "f_number", "linear"); }
void BM_TfmFmc64FullAperture(benchmark::State& s) { run(s, false, "full", "linear"); }
void BM_TfmFmc64Cubic(benchmark::State& s) { run(s, false, "f_number", "cubic"); }
// Without band-limited upsampling (loses 0.69 dB at fs/f0 = 8 with linear interpolation): the cost of the upsampling.
void BM_TfmFmc64LinearNoUpsampling(benchmark::State& s) { run(s, false, "f_number", "linear", 1); }
void BM_PlaneWave128x11(benchmark::State& s) { run(s, true, "f_number", "linear"); }
void BM_PlaneWave128x11FullAperture(benchmark::State& s) { run(s, true, "full", "linear"); }

}  // namespace

BENCHMARK(BM_TfmFmc64)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_TfmFmc64FullAperture)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_TfmFmc64Cubic)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_TfmFmc64LinearNoUpsampling)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_PlaneWave128x11)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_PlaneWave128x11FullAperture)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK_MAIN();
