// SPDX-License-Identifier: MIT
#pragma once
// The images a report needs, made from a case without the workstation: each capture opened
// (after its SHA-256 is checked), frames reconstructed with the capture's recipe by the
// Reconstructor and mapped by the display chain, measurements evaluated with the same sizing
// setup (recon::sizingSetup) as the workstation, and annotated images painted by the shared
// scene painter. Qt Gui only.
#include <QImage>
#include <QString>
#include <QStringList>

#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "core/capture.h"
#include "core/case_file.h"
#include "core/frame.h"
#include "core/measurement.h"
#include "core/parameters.h"
#include "core/sizing.h"
#include "reconstruction/sizing_setup.h"
#include "ui/viewer/scene_painter.h"

namespace umbra::core {
class CaptureReader;
}

namespace umbra::ui::report {

/// An 8-bit RGB image [nz][nx][3] (as recon::colourise gives) as a QImage; black when `rgb` is
/// shorter than nx × nz × 3.
QImage rgbImage(const std::vector<uint8_t>& rgb, size_t nx, size_t nz);

/// One reconstructed frame and what the display chain and the sizing tools make of it.
struct FrameImage {
    core::Frame envelope;            ///< linear envelope before TCG
    std::vector<float> tgc;          ///< linear envelope after TCG, [N_z][N_x]
    std::vector<float> db;           ///< displayed dB, [N_z][N_x]
    QImage colour;                   ///< N_x by N_z pixels
    double fidelity_db = 0;          ///< worst-case amplitude loss of the grid
    std::optional<recon::SizingSetup> setup;
    core::UncertaintyModel model;    ///< for measurements that are not image sizings
};

struct CaptureInfo {
    QString path;
    std::string sha256_recorded;
    core::CaptureStatus status = core::CaptureStatus::Missing;
    QString problem;                         ///< why there are no images ("" when there are)
    std::optional<core::CaptureHeader> header;
    core::Recipe recipe;                     ///< defaults with the case's recipe merged in
    bool recipe_default = true;              ///< the case holds no recipe for it (null)
};

class CaseImages {
public:
    CaseImages(const core::CaseDocument& doc, bool isolated_check, int threads);
    ~CaseImages();
    CaseImages(const CaseImages&) = delete;
    CaseImages& operator=(const CaseImages&) = delete;

    size_t captureCount() const { return captures_.size(); }
    const CaptureInfo& capture(size_t i) const { return captures_.at(i); }
    /// The frame reconstructed (cached); nullptr when the capture cannot be read (capture(i).problem).
    /// Throws core::SettingError when the recipe cannot be used with the capture.
    const FrameImage* frame(size_t capture, size_t frame);
    /// Quantities of a measurement on its frame: the image sizing for −6 dB / −20 dB / tip
    /// boxes, else core::evaluate with the frame's uncertainty model. Empty when no image.
    std::vector<core::Quantity> quantities(size_t capture, const core::Measurement& m,
                                           std::optional<core::SizingResult>* sizing = nullptr);
    /// Annotated image of one frame in `theme`, `width_px` wide, showing `measurements`
    /// (finding numbers by measurement id) over the region `region_mm` (x, depth; empty = whole
    /// image) with `caption` lines (wrapped). Null image when the frame is not available.
    QImage annotated(size_t capture, size_t frame, const std::vector<core::Measurement>& measurements,
                     const std::map<std::string, int>& finding_numbers, const QStringList& caption, int width_px,
                     Theme theme, QRectF region_mm = {});
    /// Top view of an encoded scan: peak over depth in [z0_mm, z1_mm] per frame (rows = scan
    /// positions), in dB re its maximum over the dynamic range of the recipe, coloured with the
    /// recipe's colour map, axes painted in `theme`. Null when not an encoded scan, the capture is
    /// not available or frames × pixels exceeds `max_pixels` (`why` says which).
    QImage topView(size_t capture, double z0_mm, double z1_mm, int width_px, Theme theme, size_t max_pixels,
                   QString* why = nullptr);

private:
    core::CaptureReader* reader(size_t capture);
    const core::CaseDocument& doc_;
    int threads_;
    std::vector<CaptureInfo> captures_;
    std::vector<std::unique_ptr<core::CaptureReader>> readers_;
    std::map<std::pair<size_t, size_t>, std::unique_ptr<FrameImage>> frames_;
};

}  // namespace umbra::ui::report
