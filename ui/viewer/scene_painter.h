// SPDX-License-Identifier: MIT
#pragma once
// Draws the frame image with mm axes, the colour bar, measurements with labels and (for
// exports) a scale bar and caption. Shared by the on-screen image view and the PNG export so
// both look the same.
#include <QColor>
#include <QLineF>
#include <QImage>
#include <QPainter>
#include <QRectF>
#include <QString>
#include <QStringList>

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "core/measurement.h"
#include "core/sizing.h"
#include "core/weld_geometry.h"
#include "ui/viewer/view_transform.h"

namespace umbra::ui {

/// Everything the painter needs, gathered by the caller.
struct Scene {
    const QImage* image = nullptr;          ///< colour frame, N_x by N_z pixels
    QRectF extent_mm;                       ///< image edges, mm (x, depth)
    double dynamic_range_db = 60;
    std::string colour_map;
    std::vector<core::Measurement> measurements;  ///< those on the shown frame
    core::UncertaintyModel uncertainty;
    QString selected;                               ///< selected measurement id
    std::map<std::string, int> finding_numbers;     ///< measurement id -> finding number
    QString message;                                ///< shown centred when there is no image
    /// Quantities per measurement id when they need the image (−6 dB sizing); else evaluate().
    std::map<std::string, std::vector<core::Quantity>> quantities;
    std::map<std::string, core::SizingResult> sizings;  ///< image sizing results (drop edges, tips) by measurement id
    std::vector<core::WeldPolyline> weld;               ///< weld overlay (specimen frame, mm); empty = none
    /// Coverage contours: level (dB re the view's best pixel) and its segments in mm.
    std::vector<std::pair<double, std::vector<QLineF>>> coverage;
    QString view_label;  ///< the image's view, e.g. "view TT-T", in its top-left corner ("" = none)
};

/// Colours around the image: dark (screen) or light (print: white paper, dark text).
enum class Theme { Dark, Light };

/// Segments (mm) of the iso-line `level` of a map v[iz][ix] on axes x_mm, z_mm: marching
/// squares with linear interpolation along each cell edge (saddles split by the cell mean).
std::vector<QLineF> isoSegments(const std::vector<double>& x_mm, const std::vector<double>& z_mm, const std::vector<float>& v,
                                float level);

/// Layout and look of one rendering.
struct SceneStyle {
    double scale = 1.0;          ///< multiplies fonts, line widths and margins (exports)
    bool colour_bar = true;
    bool scale_bar = false;
    QColor background{21, 23, 28};
    QColor axis{200, 204, 212};
    QColor label_fill{10, 12, 16, 200};  ///< box behind measurement labels
    bool label_text_dark = false;         ///< labels in darkened measurement colours (light theme)
    QStringList caption;         ///< lines under the image (exports); see wrapCaption
};

/// A style with the theme's colours (everything else at its default).
SceneStyle themedStyle(Theme theme);
/// "light" / "dark" (case-insensitive) -> theme; nullopt for anything else.
std::optional<Theme> themeFromName(const QString& name);

/// The caption lines word-wrapped to `width_px` at the style's caption font (a line longer than
/// the width is broken between words, or inside a word when one word alone is too long).
QStringList wrapCaption(const QStringList& lines, const SceneStyle& style, double width_px);

/// Margins (pixels) around the image area for axes and the colour bar.
QMarginsF sceneMargins(const SceneStyle& style, int caption_lines = 0);
/// Rectangle left for the image inside `whole`.
QRectF imageArea(const QRectF& whole, const SceneStyle& style);

/// Paints the scene into `whole` (widget or export image) using `view` (its viewport must be
/// imageArea(whole, style)).
void paintScene(QPainter& p, const QRectF& whole, const ViewTransform& view, const Scene& scene,
                const SceneStyle& style);

/// Label of a measurement on the image, naming each number: "M1  distance 12.34 ± 0.12 mm",
/// "M2  length 3.2 ± 0.4 mm, height 1.6 ± 0.4 mm" (extent box), "M3  length … (−6 dB)".
/// `q`: the measurement's quantities when known (−6 dB sizing), else core::evaluate is used.
QString measurementLabel(const core::Measurement& m, const core::UncertaintyModel& u,
                         const std::vector<core::Quantity>* q = nullptr);
/// Pen of a weld overlay line: fusion faces, cap/root and plate boundaries apart; skips dashed.
QPen weldPen(const core::WeldPolyline& l, double scale);
/// Colour of a measurement kind on the image.
QColor measurementColour(core::MeasurementKind kind);
/// "Nice" tick step (1, 2 or 5 × 10^n) for about `count` ticks over `span`.
double niceStep(double span, int count);
/// Handles (mm) a user can drag: the measurement's points.
std::vector<QPointF> measurementHandles(const core::Measurement& m);

}  // namespace umbra::ui
