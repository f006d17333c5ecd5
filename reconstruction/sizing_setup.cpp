// SPDX-License-Identifier: MIT
#include "reconstruction/sizing_setup.h"

#include <algorithm>

#include "core/error.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/point_spread.h"

namespace umbra::recon {

Acquisition acquisitionOf(const core::ImageStack& img) { return img.acquisition; }

Acquisition acquisitionOf(const core::CaptureHeader& h) {
    Acquisition a;
    a.centre_frequency_hz = h.array.centre_frequency_hz;
    a.fractional_bandwidth = h.array.fractional_bandwidth;
    a.speed_of_sound_m_s = h.medium.speed_of_sound_m_s;
    if (!h.array.element_position_m.empty()) {
        double lo = h.array.element_position_m[0][0], hi = lo;
        for (const auto& p : h.array.element_position_m) lo = std::min(lo, p[0]), hi = std::max(hi, p[0]);
        a.array_x_min_m = lo;
        a.array_x_max_m = hi;
        a.array_pitch_m = h.array.pitch_m() > 0 ? h.array.pitch_m() : h.array.element_width_m;
    }
    a.elevation_beam_width_m = h.array.elevation_beam_width_m;
    a.wedge = h.medium.wedge.has_value();
    return a;
}

core::Recipe recipeOfImage(const core::ImageStack& img, const std::string& path) {
    core::Recipe r = defaultRecipe();
    if (!img.recipe_json.empty()) r.mergeJson(img.recipe_json, path + ": recipe_json");
    return r;
}

SizingSetup sizingSetup(const core::Recipe& recipe, const Acquisition& acq, const std::vector<float>& envelope, const SizingSettings& s) {
    SizingSetup out;
    auto& ctx = out.context;
    double c = recipe.number("delay_model.speed_of_sound_m_s");
    if (!(c > 0)) c = acq.speed_of_sound_m_s.value_or(0);
    out.medium = s.medium.empty() ? (c > 0 ? core::mediumForSpeed(c) : "other") : s.medium;
    const auto def = core::speedUncertaintyDefault(out.medium);
    ctx.speed_rel = s.speed_rel.value_or(def.relative);
    ctx.speed_basis = s.speed_rel ? "set for this case" : out.medium + " default: " + def.source;
    ctx.noise_level = core::medianLevel(envelope);
    for (float v : envelope) ctx.frame_peak = std::max(ctx.frame_peak, double(v));
    const bool have = c > 0 && acq.centre_frequency_hz && acq.fractional_bandwidth && acq.array_x_min_m && acq.array_x_max_m;
    if (!have) {
        ctx.notes.push_back("the image does not record the array's centre frequency, bandwidth, speed or element positions: point-spread "
                            "widths unknown (re-run reconstruct to record them)");
    } else {
        if (acq.wedge)
            ctx.notes.push_back("wedge or water path: the point-spread model assumes contact and is approximate");
        const PointSpreadModel m = pointSpreadModel(recipe, c, *acq.centre_frequency_hz, *acq.fractional_bandwidth, *acq.array_x_min_m,
                                                    *acq.array_x_max_m, acq.array_pitch_m.value_or(0));
        ctx.resolution = [m](double x_mm, double z_mm) {
            const auto w = m.at(x_mm * 1e-3, z_mm * 1e-3);
            return core::LocalResolution{w.lateral_m * 1e3, w.axial_m * 1e3};
        };
    }
    if (acq.elevation_beam_width_m) out.elevation_width_mm = *acq.elevation_beam_width_m * 1e3;
    return out;
}

}  // namespace umbra::recon
