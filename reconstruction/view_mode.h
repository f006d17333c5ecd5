// SPDX-License-Identifier: MIT
#pragma once
// Imaging views (multi-mode TFM) in the trade's leg notation: transmit legs before the dash,
// receive legs after, one letter per leg in the specimen (L longitudinal, T transverse/shear);
// the wedge leg is implicit. One letter: direct path; two letters: the first leg runs to the
// flat back wall (z_s = thickness), the second from the back wall to the pixel.
//   "L-L" direct longitudinal (the default), "TT-T" shear skip on transmit, direct shear on receive.
#include <string>
#include <vector>

#include "core/capture.h"

namespace umbra::recon {

enum class Wave { L, T };

struct ViewMode {
    std::string name = "L-L";
    std::vector<Wave> tx{Wave::L}, rx{Wave::L};  ///< legs of the transmit and receive paths (1 or 2 each)
    /// True when transmit and receive paths are the same kind (times are reciprocal).
    bool symmetric() const { return tx == rx; }
    bool usesShear() const;
    bool usesBackWall() const { return tx.size() > 1 || rx.size() > 1; }
};

/// The view in words: "transmit shear via the back wall, receive shear direct" (legs only;
/// the name is not repeated).
std::string describeViewMode(const ViewMode& m);

/// Every mode the delay_model.mode parameter offers, in menu order (L-L first).
const std::vector<std::string>& viewModeNames();

/// Parses a mode name ("TT-T"); SettingError for anything else than 1-2 letters L/T on each side.
ViewMode parseViewMode(const std::string& name);

/// Shear speed (m/s) for the view: the recipe's override when > 0, else the capture's; 0 when none.
double viewShearSpeed(const core::CaptureHeader& h, double recipe_shear_m_s);

/// Throws core::SettingError naming the mode and the missing /medium attribute when the capture
/// lacks what the mode needs (shear_speed_m_s for a T leg, thickness_m for a back-wall skip),
/// or when the capture is not a full matrix (single_element) and the mode is not L-L, or has a wedge.
void checkViewMode(const core::CaptureHeader& h, const ViewMode& m, double recipe_shear_m_s = 0);

/// The modes of viewModeNames() that this capture supports (its header has what they need).
std::vector<std::string> validViewModes(const core::CaptureHeader& h);

}  // namespace umbra::recon
