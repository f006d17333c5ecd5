// SPDX-License-Identifier: MIT
#include "reconstruction/grid_stage.h"

#include <cmath>

#include "reconstruction/detail/spec_helpers.h"

namespace umbra::recon {

core::StageSpec gridSpec() {
    using namespace detail;
    const char* u = "mm";
    return {"grid",
            "Image grid",
            "Region and pixel step of the image; 0/0 = automatic region, step 0 = automatic (worst-case point loss within the "
            "amplitude fidelity target).",
            {modalRealParam("x_min_mm", "x min", "Left edge of the region, mm (x_min = x_max = 0: the array's aperture).", u, -10000,
                            10000, "automatic", 1),
             modalRealParam("x_max_mm", "x max", "Right edge of the region, mm (x_min = x_max = 0: the array's aperture).", u, -10000, 10000, "automatic", 1),
             modalRealParam("z_min_mm", "z min",
                            "Top of the region (depth), mm (z_min = z_max = 0: from 0 to the recorded depth, or to 1.15 x the "
                            "medium's thickness when that is recorded and shorter).",
                            u, -10000, 10000, "automatic", 1),
             modalRealParam("z_max_mm", "z max", "Bottom of the region (depth), mm (z_min = z_max = 0: automatic, see z min).", u, -10000, 10000, "automatic", 1),
             modalRealParam("step_mm", "Pixel step", "Pixel size, mm; 0 = automatic (worst-case point loss within the fidelity target).", u,
                            0, 1000, "automatic", 0.01),
             realParam("max_loss_db", "Amplitude fidelity target",
                       "Worst-case loss, dB, of a point reflector lying between pixels, used to choose the automatic step (the "
                       "estimate is approximate: the default keeps a margin under the 2 dB limit of common practice).",
                       "dB", 0.1, 2.0, kDefaultMaxLossDb, false, 0.1)}};
}

GridParams gridParams(const core::Recipe& r) {
    GridParams p;
    p.x_min_mm = r.number("grid.x_min_mm");
    p.x_max_mm = r.number("grid.x_max_mm");
    p.z_min_mm = r.number("grid.z_min_mm");
    p.z_max_mm = r.number("grid.z_max_mm");
    p.step_mm = r.number("grid.step_mm");
    p.max_loss_db = r.number("grid.max_loss_db");
    return p;
}

PsfWidths pointSpreadWidths(double c, double f0, double B, double fnum) {
    PsfWidths w;
    const double T = 4 * std::log(2.0) / (M_PI * B * f0);
    w.axial_m = c * T / 2;
    w.lateral_m = 0.8859 * (c / f0) * fnum;
    return w;
}

double gaussianHalfPixelLossDb(const PsfWidths& w, double step) {
    const double h = step / 2;
    const double k = 20 * std::log10(std::exp(1.0)) * 4 * std::log(2.0);
    return k * h * h * (1 / (w.axial_m * w.axial_m) + 1 / (w.lateral_m * w.lateral_m));
}

double stepForLossDb(const PsfWidths& w, double limit) {
    const double k = 20 * std::log10(std::exp(1.0)) * 4 * std::log(2.0);
    const double s = 1 / (w.axial_m * w.axial_m) + 1 / (w.lateral_m * w.lateral_m);
    return 2 * std::sqrt(limit / (k * s));
}

}  // namespace umbra::recon
