// SPDX-License-Identifier: MIT
// PNG export of one frame. The image is colour-mapped here; layout, lettering and encoding live in
// a module (libumbra_png.so, reconstruction/png/) loaded the first time a PNG is asked for, so
// that its drawing library costs nothing at start-up of the commands that write no PNG.
#include <dlfcn.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <mutex>
#include <string>
#include <vector>

#include "core/error.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/png/png_plot.h"

namespace umbra::recon {
namespace {

namespace fs = std::filesystem;

// Places searched for the module, in order: $UMBRA_PNG_MODULE (a file), beside the running
// executable, ../lib/umbra/ from it (installed layout), then the build tree it was built in.
std::vector<fs::path> moduleCandidates() {
    std::vector<fs::path> out;
    if (const char* env = std::getenv("UMBRA_PNG_MODULE"); env && *env) out.emplace_back(env);
    std::error_code ec;
    const fs::path exe = fs::read_symlink("/proc/self/exe", ec);
    if (!ec) {
        out.push_back(exe.parent_path() / "libumbra_png.so");
        out.push_back(exe.parent_path().parent_path() / "lib" / "umbra" / "libumbra_png.so");
    }
#ifdef UMBRA_PNG_MODULE_BUILD_PATH
    out.emplace_back(UMBRA_PNG_MODULE_BUILD_PATH);
#endif
    return out;
}

UmbraPngWriteFn loadModule(std::string& why) {
    static std::mutex m;
    static UmbraPngWriteFn fn = nullptr;
    static std::string failure;
    std::lock_guard lock(m);
    if (fn || !failure.empty()) {
        why = failure;
        return fn;
    }
    std::string tried;
    for (const auto& p : moduleCandidates()) {
        std::error_code ec;
        if (!fs::exists(p, ec)) {
            tried += (tried.empty() ? "" : ", ") + p.string();
            continue;
        }
        void* h = dlopen(p.c_str(), RTLD_NOW | RTLD_LOCAL);
        if (!h) {
            const char* e = dlerror();
            failure = "the PNG module " + p.string() + " cannot be loaded: " + (e ? e : "unknown reason");
            why = failure;
            return nullptr;
        }
        fn = reinterpret_cast<UmbraPngWriteFn>(dlsym(h, UMBRA_PNG_WRITE_SYMBOL));
        if (!fn) failure = "the PNG module " + p.string() + " has no entry point " UMBRA_PNG_WRITE_SYMBOL;
        why = failure;
        return fn;
    }
    failure = "the PNG module libumbra_png.so was not found (looked at " + tried + ")";
    why = failure;
    return nullptr;
}

}  // namespace

void writePng(const std::string& path, const core::Frame& f, const core::Recipe& r, const std::string& title) {
    const int nx = int(f.nx()), nz = int(f.nz());
    if (nx == 0 || nz == 0) throw core::SettingError("PNG: the frame is empty");
    const auto rgb = colourise(logCompress(f, r), r);
    const std::string map = r.text("colour_map.map");
    const bool invert = r.flag("colour_map.invert");

    UmbraPngPlot plot{};
    plot.version = UMBRA_PNG_PLOT_VERSION;
    plot.path = path.c_str();
    plot.title = title.c_str();
    plot.rgb = rgb.data();
    plot.nx = nx;
    plot.nz = nz;
    plot.x0_mm = f.x_m.front() * 1e3;
    plot.x1_mm = f.x_m.back() * 1e3;
    plot.z0_mm = f.z_m.front() * 1e3;
    plot.z1_mm = f.z_m.back() * 1e3;
    plot.dynamic_range_db = r.number("log_compression.dynamic_range_db");
    for (int k = 0; k < 256; ++k) {
        const double t = invert ? k / 255.0 : 1.0 - k / 255.0;  // row 0 is 0 dB
        colourAt(map, t, plot.bar_rgb[k]);
    }

    std::string why;
    const UmbraPngWriteFn write = loadModule(why);
    if (!write) throw core::InputError(path, "", "cannot write the PNG: " + why);
    char err[512] = {0};
    if (write(&plot, err, sizeof err) != 0) throw core::InputError(path, "", err);
}

}  // namespace umbra::recon
