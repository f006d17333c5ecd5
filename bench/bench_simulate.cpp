// SPDX-License-Identifier: MIT
// Forward simulator throughput. Counters (per second of wall time):
//   scatterer_traces  scatterer x trace pairs evaluated,
//   samples_written   pulse samples actually accumulated (short support of each pulse),
//   nominal_samples   scatterers x traces x N_samples (what a whole-trace evaluation would cost).
#include <benchmark/benchmark.h>

#include <nlohmann/json.hpp>

#include "reconstruction/simulate/scene.h"
#include "reconstruction/simulate/simulator.h"

namespace {
using umbra::recon::sim::parseScene;

/// 64-element full-matrix capture, 2000 samples, 50 point reflectors, no noise.
nlohmann::json fmcScene() {
    nlohmann::json j = {
        {"title", "bench fmc (synthetic)"}, {"scenario", "bench"}, {"seed", 1},
        {"array", {{"elements", 64}, {"pitch_mm", 0.6}, {"element_width_mm", 0.5}, {"centre_frequency_mhz", 5}, {"fractional_bandwidth", 0.6}}},
        {"transmit", {{"kind", "single_element"}}},
        {"sampling", {{"frequency_mhz", 50}, {"samples", 2000}}},
        {"medium", {{"speed_m_s", 5920}}}};
    nlohmann::json pts = nlohmann::json::array();
    for (int i = 0; i < 50; ++i) pts.push_back({{"position_mm", {-15 + 0.6 * i, 0, 5 + 0.9 * i}}, {"amplitude", 1}});
    j["reflectors"]["points"] = pts;
    return j;
}

/// 128 elements, 11 plane waves, 40 MHz, 46 mm: speckle block with 20 000 scatterers.
nlohmann::json speckleScene() {
    return {{"title", "bench speckle (synthetic)"}, {"scenario", "bench"}, {"seed", 1},
            {"array", {{"elements", 128}, {"pitch_mm", 0.3}, {"element_width_mm", 0.27}, {"centre_frequency_mhz", 5}, {"fractional_bandwidth", 0.7}}},
            {"transmit", {{"kind", "plane_wave"}, {"angle_range_deg", {{"from", -10}, {"to", 10}, {"count", 11}}}}},
            {"sampling", {{"frequency_mhz", 40}, {"max_depth_mm", 46}}},
            {"medium", {{"speed_m_s", 1540}, {"attenuation_db_per_cm_mhz", 0.5}}},
            {"speckle", {{"x_range_mm", {-20, 20}}, {"z_range_mm", {3, 43}}, {"density_per_mm2", 12.5}}}};
}

void run(benchmark::State& state, const nlohmann::json& j) {
    const auto scene = parseScene(j.dump(), "bench.json");
    umbra::recon::sim::SimOptions o;
    o.threads = unsigned(state.range(0));
    umbra::recon::sim::SimStats st;
    for (auto _ : state) {
        auto cap = umbra::recon::sim::simulate(scene, o);
        benchmark::DoNotOptimize(cap.rf.data());
        st = cap.stats;
    }
    state.counters["scatterers"] = double(st.scatterers);
    state.counters["scatterer_traces"] = benchmark::Counter(st.scatterer_traces, benchmark::Counter::kIsIterationInvariantRate);
    state.counters["samples_written"] = benchmark::Counter(st.samples_written, benchmark::Counter::kIsIterationInvariantRate);
    state.counters["nominal_samples"] = benchmark::Counter(st.nominal_samples, benchmark::Counter::kIsIterationInvariantRate);
}

void BM_Fmc64_2000samples_50points(benchmark::State& s) { run(s, fmcScene()); }
void BM_PlaneWave128x11_20000speckle(benchmark::State& s) { run(s, speckleScene()); }

}  // namespace

BENCHMARK(BM_Fmc64_2000samples_50points)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_PlaneWave128x11_20000speckle)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(2);
BENCHMARK_MAIN();
