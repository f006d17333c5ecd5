// SPDX-License-Identifier: MIT
#pragma once
// Annotated image export: the current view (same region, zoom and measurements) rendered at a
// chosen width with axes, colour bar, scale bar, measurement labels, finding numbers, a
// technique line and, for simulated captures, "synthetic demonstration data".
#include <QImage>
#include <QString>

#include "ui/viewer/scene_painter.h"

namespace umbra::ui {

class CaseController;
class ImageView;

/// Renders the view at `width_px` pixels wide (height follows the view's aspect and the
/// caption, which is word-wrapped to the image width). `theme`: Light for print (white paper).
QImage renderAnnotatedImage(const ImageView& view, const CaseController& controller, int width_px,
                            Theme theme = Theme::Dark);
/// Renders and writes a PNG; throws core::InputError naming the file if it cannot be written.
void exportAnnotatedPng(const QString& path, const ImageView& view, const CaseController& controller, int width_px,
                        Theme theme = Theme::Dark);

}  // namespace umbra::ui
