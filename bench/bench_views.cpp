// SPDX-License-Identifier: MIT
// Views through a wedge: a T-T view of a 64-element, 2000-sample full matrix on 256 x 256
// pixels (36 deg wedge, 2330 m/s; steel 5920 / 3240 m/s, 20 mm plate), against homogeneous
// contact L-L on the same grid and capture content.
//   BM_TravelTimeTables   building the T-T tables (cache cleared every iteration); counter
//                         table_MiB = the tables' memory
//   BM_Frame/<view>       one frame with the tables cached (after a warm-up frame); counters
//                         das_s = delay-and-sum seconds, frame_s = whole frame
//   BM_Coverage/<view>    the coverage map of a view over the weld demo's image region (80 x 23 mm)
//                         on the workstation's 0.25 mm map grid (tells whether it may run on the
//                         GUI thread); counter pixels
// Aim: a cached T-T frame within 3 x the contact L-L frame.
#include <benchmark/benchmark.h>

#include <filesystem>
#include <random>

#include "core/capture_file.h"
#include "reconstruction/coverage.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/ray_path.h"
#include "reconstruction/view_delay_model.h"

using namespace umbra;

namespace {

std::string makeCapture(bool wedge) {
    const size_t nel = 64, ns = 2000;
    const auto path = (std::filesystem::temp_directory_path() / (wedge ? "umbra_bench_views_wedge.h5" : "umbra_bench_views_contact.h5")).string();
    if (std::filesystem::exists(path)) return path;
    core::CaptureHeader h;
    h.title = "benchmark capture (synthetic noise)";
    h.created_utc = "2026-01-01T00:00:00Z";
    for (size_t e = 0; e < nel; ++e) h.array.element_position_m.push_back({(double(e) - double(nel - 1) / 2) * 0.6e-3, 0, 0});
    h.array.centre_frequency_hz = 5e6;
    h.array.fractional_bandwidth = 0.6;
    h.array.element_width_m = 0.5e-3;
    h.transmit.kind = core::TransmitKind::SingleElement;
    for (size_t e = 0; e < nel; ++e) h.transmit.source_element.push_back(int32_t(e));
    for (size_t e = 0; e < nel; ++e) h.receive.element_index.push_back(int32_t(e));
    h.receive.sampling_frequency_hz = 50e6;
    h.receive.start_time_s.assign(nel, 0.0);
    h.medium.speed_of_sound_m_s = 5920;
    h.medium.shear_speed_m_s = 3240;
    h.medium.thickness_m = 20e-3;
    if (wedge) h.medium.wedge = core::WedgeInfo{2330, {0, 0, 16e-3}, 36 * M_PI / 180};
    h.frames = 1;
    h.samples = ns;
    h.sample_type = core::SampleType::Float32;
    h.provenance["source"] = "synthetic benchmark data";
    const std::string tmp = path + ".partial";
    {
        core::CaptureWriter w(tmp, h);
        std::mt19937 rng(1);
        std::normal_distribution<float> g;
        std::vector<float> block(h.blockSize());
        for (size_t t = 0; t < nel; ++t) {
            for (auto& v : block) v = g(rng);
            w.writeBlock(0, t, block.data());
        }
        w.finish();
    }
    std::filesystem::rename(tmp, path);
    return path;
}

core::Recipe recipe(const char* mode) {
    core::Recipe r = recon::defaultRecipe();
    r.set("delay_model.mode", mode);
    // 256 x 256 pixels of 0.1 mm in the specimen frame (or the array frame on contact).
    r.setNumber("grid.x_min_mm", 2);
    r.setNumber("grid.x_max_mm", 2 + 25.5);
    r.setNumber("grid.z_min_mm", 2);
    r.setNumber("grid.z_max_mm", 2 + 25.5);
    r.setNumber("grid.step_mm", 0.1);
    return r;
}

void BM_TravelTimeTables(benchmark::State& st) {
    core::CaptureReader cap(makeCapture(true));
    const auto g = recon::ViewGeometry::fromHeader(cap.header());
    const recon::Grid grid = recon::resolveGrid(cap.header(), recipe("T-T"));
    size_t bytes = 0;
    for (auto _ : st) {
        recon::clearTravelTimeCache();
        auto t = recon::travelTimeTable(g, cap.header().array.element_position_m, {recon::Wave::T}, grid, int(st.range(0)));
        bytes = t->bytes();
        benchmark::DoNotOptimize(t);
    }
    st.counters["table_MiB"] = double(bytes) / (1 << 20);
    st.counters["pixels"] = double(grid.nx() * grid.nz());
    recon::clearTravelTimeCache();
}
BENCHMARK(BM_TravelTimeTables)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();

void frame(benchmark::State& st, bool wedge, const char* mode, bool full = false) {
    core::CaptureReader cap(makeCapture(wedge));
    auto r = recipe(mode);
    if (full) r.set("das.aperture", "full");  // every element, as through a wedge
    recon::Reconstructor rec(cap, r, 2);
    rec.run(0);  // warm-up (tables are built by the constructor and cached)
    double das = 0, total = 0;
    for (auto _ : st) {
        auto f = rec.run(0);
        benchmark::DoNotOptimize(f);
        for (auto& [n, s] : rec.lastTimings().stage_seconds)
            if (n == "delay-and-sum") das += s;
        total += rec.lastTimings().total_seconds;
    }
    st.counters["das_s"] = das / double(st.iterations());
    st.counters["frame_s"] = total / double(st.iterations());
}
void BM_Frame_ContactLL(benchmark::State& st) { frame(st, false, "L-L"); }
void BM_Frame_ContactLL_Full(benchmark::State& st) { frame(st, false, "L-L", true); }
void BM_Frame_WedgeTT(benchmark::State& st) { frame(st, true, "T-T"); }
void BM_Frame_WedgeTT_T(benchmark::State& st) { frame(st, true, "TT-T"); }
BENCHMARK(BM_Frame_ContactLL)->Unit(benchmark::kMillisecond)->UseRealTime()->MinTime(1.0);
BENCHMARK(BM_Frame_ContactLL_Full)->Unit(benchmark::kMillisecond)->UseRealTime()->MinTime(1.0);
BENCHMARK(BM_Frame_WedgeTT)->Unit(benchmark::kMillisecond)->UseRealTime()->MinTime(1.0);
BENCHMARK(BM_Frame_WedgeTT_T)->Unit(benchmark::kMillisecond)->UseRealTime()->MinTime(1.0);

void coverage(benchmark::State& st, const char* mode) {
    core::CaptureReader cap(makeCapture(true));
    recon::Grid g;
    g.x_min_m = -56e-3;
    g.x_max_m = 24e-3;
    g.z_min_m = 0;
    g.z_max_m = 23e-3;
    g.step_m = 0.25e-3;
    size_t pixels = 0;
    for (auto _ : st) {
        auto m = recon::coverageMap(cap.header(), mode, g);
        pixels = m.db.size();
        benchmark::DoNotOptimize(m);
    }
    st.counters["pixels"] = double(pixels);
}
void BM_Coverage_TT(benchmark::State& st) { coverage(st, "T-T"); }
void BM_Coverage_TTTT(benchmark::State& st) { coverage(st, "TT-TT"); }
BENCHMARK(BM_Coverage_TT)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_Coverage_TTTT)->Unit(benchmark::kMillisecond)->UseRealTime();

}  // namespace

BENCHMARK_MAIN();
