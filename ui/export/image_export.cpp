// SPDX-License-Identifier: MIT
#include "ui/export/image_export.h"

#include <QFileInfo>
#include <QPainter>

#include <algorithm>

#include "core/error.h"
#include "ui/controller/case_controller.h"
#include "ui/viewer/image_view.h"
#include "ui/viewer/scene_painter.h"

namespace umbra::ui {

QImage renderAnnotatedImage(const ImageView& view, const CaseController& ctl, int width_px) {
    const Scene scene = view.scene();
    const ViewTransform& on_screen = view.transform();
    const double k = std::max(0.25, static_cast<double>(width_px) / std::max(1, view.width()));

    SceneStyle style;
    style.scale = k;
    style.scale_bar = true;
    QString head = ctl.displayName();
    if (ctl.hasCapture()) {
        head += QStringLiteral(" — %1, frame %2").arg(QFileInfo(ctl.capturePath()).fileName()).arg(ctl.currentFrame() + 1);
        const QString fl = ctl.frameLabel(ctl.currentFrame());
        if (!fl.isEmpty()) head += QStringLiteral(" (%1)").arg(fl);
    }
    style.caption << head;
    if (ctl.hasCapture()) style.caption << ctl.techniqueLine();
    QStringList fs;
    for (const auto& f : ctl.findings()) {
        bool here = false;
        for (const auto& id : f.indication.measurement_ids)
            for (const auto& m : scene.measurements) here = here || m.id == id;
        if (here) fs << QStringLiteral("F%1: %2").arg(f.number).arg(QString::fromStdString(f.indication.location));
    }
    if (!fs.isEmpty()) style.caption << QStringLiteral("Findings shown — ") + fs.join("; ");
    if (ctl.hasCapture() && ctl.header().isSynthetic()) style.caption << QStringLiteral("Synthetic demonstration data");

    const QRectF screen_area = on_screen.viewport();
    const QMarginsF m = sceneMargins(style, static_cast<int>(style.caption.size()));
    const QSizeF area(screen_area.width() * k, screen_area.height() * k);
    const QSize whole(static_cast<int>(area.width() + m.left() + m.right()),
                      static_cast<int>(area.height() + m.top() + m.bottom()));
    QImage out(whole, QImage::Format_RGB32);
    ViewTransform vt = on_screen;
    vt.setViewport(QRectF(QPointF(m.left(), m.top()), area));
    QPainter p(&out);
    paintScene(p, QRectF(QPointF(0, 0), QSizeF(whole)), vt, scene, style);
    p.end();
    return out;
}

void exportAnnotatedPng(const QString& path, const ImageView& view, const CaseController& ctl, int width_px) {
    const QImage img = renderAnnotatedImage(view, ctl, width_px);
    if (!img.save(path, "PNG"))
        throw core::InputError(path.toStdString(), "", "cannot write the PNG (folder missing or not writable?)");
}

}  // namespace umbra::ui
