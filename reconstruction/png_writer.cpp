// SPDX-License-Identifier: MIT
// PNG export of one frame. The image is colour-mapped here; layout, lettering and encoding live in
// a module (libumbra_png.so, reconstruction/png/) loaded the first time a PNG is asked for, so
// that its drawing library costs nothing at start-up of the commands that write no PNG.
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <mutex>
#include <string>
#include <vector>

#include "core/detail/module_loader.h"
#include "core/error.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/png/png_plot.h"

namespace umbra::recon {
namespace {

UmbraPngWriteFn loadModule(std::string& why) {
#ifdef UMBRA_PNG_MODULE_BUILD_PATH
    const char* build_path = UMBRA_PNG_MODULE_BUILD_PATH;
#else
    const char* build_path = "";
#endif
    const core::detail::ModuleSpec spec{"PNG module", "libumbra_png.so", "UMBRA_PNG_MODULE", build_path, UMBRA_PNG_WRITE_SYMBOL};
    return reinterpret_cast<UmbraPngWriteFn>(core::detail::loadModuleSymbol(spec, why));
}

}  // namespace

void writePng(const std::string& path, const core::Frame& f, const core::Recipe& r, const std::string& title, bool dark) {
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
    plot.dark = dark ? 1 : 0;
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
