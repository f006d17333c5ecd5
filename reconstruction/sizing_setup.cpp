// SPDX-License-Identifier: MIT
#include "reconstruction/sizing_setup.h"

#include <algorithm>

#include "core/error.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/point_spread.h"
#include "reconstruction/view_mode.h"
#include "reconstruction/view_point_spread.h"

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
    a.shear_speed_m_s = h.medium.shear_speed_m_s;
    a.thickness_m = h.medium.thickness_m;
    if (h.medium.wedge) {
        a.wedge_speed_m_s = h.medium.wedge->speed_of_sound_m_s;
        a.wedge_origin_x_m = h.medium.wedge->surface_origin_m[0];
        a.wedge_origin_z_m = h.medium.wedge->surface_origin_m[2];
        a.wedge_tilt_rad = h.medium.wedge->surface_tilt_rad;
    }
    return a;
}

namespace {
/// The view-aware model for a wedge capture or a view other than L-L, when the facts hold its
/// geometry; nullopt for contact L-L (the contact model is exact there) or missing geometry.
std::optional<ViewPointSpread> viewModel(const core::Recipe& recipe, const Acquisition& acq) {
    ViewMode mode;
    try {
        mode = parseViewMode(recipe.text("delay_model.mode"));
    } catch (const core::SettingError&) {
        return std::nullopt;
    }
    if (!acq.wedge && mode.name == "L-L") return std::nullopt;
    return viewPointSpread(recipe, acq);
}
}  // namespace

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
    } else if (const auto v = viewModel(recipe, acq)) {
        // Views other than contact L-L: the ray-traced model of view_point_spread.h; the contact
        // model where no path reaches the place.
        const PointSpreadModel m = pointSpreadModel(recipe, c, *acq.centre_frequency_hz, *acq.fractional_bandwidth, *acq.array_x_min_m,
                                                    *acq.array_x_max_m, acq.array_pitch_m.value_or(0));
        ctx.resolution = [vm = *v, m](double x_mm, double z_mm) {
            const auto w = vm.at(x_mm * 1e-3, z_mm * 1e-3);
            if (w.valid) return core::LocalResolution{w.x_m * 1e3, w.z_m * 1e3};
            const auto f = m.at(x_mm * 1e-3, z_mm * 1e-3);
            return core::LocalResolution{f.lateral_m * 1e3, f.axial_m * 1e3};
        };
    } else {
        if (acq.wedge)
            ctx.notes.push_back("wedge or water path: the point-spread model assumes contact and is approximate");
        else if (const std::string mode = recipe.text("delay_model.mode"); mode != "L-L")
            ctx.notes.push_back("view " + mode + ": the point-spread model assumes the L-L view and is approximate (the image does not "
                                "record the view's geometry; re-run reconstruct to record it)");
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
