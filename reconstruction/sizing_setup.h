// SPDX-License-Identifier: MIT
#pragma once
// Builds the context of the sizing tools (core/sizing.h) for an image: the point-spread model
// at each place (point_spread.h) from the recipe and the acquisition, the speed-of-sound
// uncertainty of the medium, the noise level and the depth reference. Shared by
// `umbra-cli measure` and the workstation so that both size with the same model. No Qt.
#include <optional>
#include <string>
#include <vector>

#include "core/capture.h"
#include "core/frame.h"
#include "core/parameters.h"
#include "core/sizing.h"

namespace umbra::recon {

/// Acquisition facts the point-spread model needs; any may be missing (older image files).
using Acquisition = core::AcquisitionFacts;
/// From an image file's optional attributes.
Acquisition acquisitionOf(const core::ImageStack& img);
/// From a capture header.
Acquisition acquisitionOf(const core::CaptureHeader& h);

/// Per-case sizing settings.
struct SizingSettings {
    std::string medium;              ///< "steel", "water", "soft tissue", "other"; "" = guessed from the speed
    std::optional<double> speed_rel; ///< relative standard uncertainty of c; absent = the medium's default
};

struct SizingSetup {
    core::SizingContext context;
    double elevation_width_mm = 0;  ///< 0 = unknown
    std::string medium;             ///< medium used for the speed default
};

/// Context for sizing on one frame (`envelope`, the linear image the tools read) made with
/// `recipe` (the image's recipe JSON merged onto the defaults). Missing acquisition facts give
/// warnings in context.notes and no point-spread model (never an exception); a bad recipe
/// throws SettingError.
SizingSetup sizingSetup(const core::Recipe& recipe, const Acquisition& acq, const std::vector<float>& envelope,
                        const SizingSettings& settings = {});

/// The recipe of an image file: defaults with the file's recipe_json merged in.
core::Recipe recipeOfImage(const core::ImageStack& img, const std::string& path);

}  // namespace umbra::recon
