// SPDX-License-Identifier: MIT
#include "ui/export/image_export.h"

#include <QFile>
#include <QFileInfo>
#include <QPainter>

#include <algorithm>

#include "core/error.h"
#include "ui/controller/case_controller.h"
#include "ui/viewer/image_view.h"
#include "ui/viewer/scene_painter.h"

namespace umbra::ui {

QImage renderAnnotatedImage(const ImageView& view, const CaseController& ctl, int width_px, Theme theme) {
    const Scene scene = view.scene();
    const ViewTransform& on_screen = view.transform();
    // Scale so that the visible image part plus margins is about width_px wide.
    const ViewTransform& vt0 = view.transform();
    QRectF vis0 = QRectF(vt0.toMm(vt0.viewport().topLeft()), vt0.toMm(vt0.viewport().bottomRight())).normalized();
    if (!scene.extent_mm.isEmpty() && vis0.intersects(scene.extent_mm)) vis0 = vis0.intersected(scene.extent_mm);
    const double vis_px = std::max(1.0, vis0.width() * vt0.pixelsPerMm());
    const double k = std::max(0.25, static_cast<double>(width_px) / (vis_px + 58 + 84));

    SceneStyle style = themedStyle(theme);
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
        if (!here) continue;
        QString t = QStringLiteral("F%1: %2").arg(f.number).arg(QString::fromStdString(f.indication.location));
        if (f.indication.peak_db)
            t += QStringLiteral(", peak %1 dB re %2")
                     .arg(*f.indication.peak_db, 0, 'f', 1)
                     .arg(ctl.curve() ? QStringLiteral("DAC") : QStringLiteral("frame peak (0 dB = the frame's strongest echo)"));
        fs << t;
    }
    if (!fs.isEmpty()) style.caption << QStringLiteral("Findings shown — ") + fs.join("; ");
    if (const auto& c = ctl.curve()) {
        style.caption << QStringLiteral("Peaks in dB re DAC at their depth; DAC: %1")
                             .arg(QString::fromStdString(c->label));
        if (const auto r = core::depthRange(*c))
            style.caption << QStringLiteral("DAC from %1 point(s), %2–%3 mm, amplitudes read %4; outside that range the end level is held")
                                 .arg(c->points.size())
                                 .arg(r->first * 1e3, 0, 'f', 1)
                                 .arg(r->second * 1e3, 0, 'f', 1)
                                 .arg(QString::fromUtf8(core::basisName(c->basis)));
        if (!ctl.curveWarning().isEmpty()) style.caption << ctl.curveWarning();
    }
    if (!ctl.curve() && ctl.hasCapture())
        style.caption << QStringLiteral("Image amplitudes in dB re the frame peak (0 dB = the frame's strongest echo)");
    if (ctl.hasCapture() && ctl.header().isSynthetic()) style.caption << QStringLiteral("Synthetic demonstration data");

    // The part of the image visible on screen (empty margins around the image are left out).
    const QRectF screen_area = on_screen.viewport();
    QRectF visible = QRectF(on_screen.toMm(screen_area.topLeft()), on_screen.toMm(screen_area.bottomRight())).normalized();
    if (!scene.extent_mm.isEmpty()) visible = visible.intersected(scene.extent_mm);
    if (visible.isEmpty()) visible = QRectF(on_screen.toMm(screen_area.topLeft()), on_screen.toMm(screen_area.bottomRight()));
    const double ppm = on_screen.pixelsPerMm() * k;  // export pixels per mm
    const QSizeF area(visible.width() * ppm, visible.height() * ppm);
    // Caption lines wrap at the picture's right edge instead of being cut off.
    {
        const QMarginsF m0 = sceneMargins(style, 0);
        style.caption = wrapCaption(style.caption, style, area.width() + m0.right() - 8 * k);
    }
    const QMarginsF m = sceneMargins(style, static_cast<int>(style.caption.size()));
    const QSize whole(static_cast<int>(area.width() + m.left() + m.right()),
                      static_cast<int>(area.height() + m.top() + m.bottom()));
    QImage out(whole, QImage::Format_RGB32);
    ViewTransform vt = on_screen;
    vt.setViewport(QRectF(QPointF(m.left(), m.top()), area));
    const QRectF ext = vt.extentMm();
    const double fit = std::min(area.width() / ext.width(), area.height() / ext.height());
    vt.setZoom(ppm / fit);
    vt.setCentreMm(visible.center());
    QPainter p(&out);
    paintScene(p, QRectF(QPointF(0, 0), QSizeF(whole)), vt, scene, style);
    p.end();
    return out;
}

void exportAnnotatedPng(const QString& path, const ImageView& view, const CaseController& ctl, int width_px, Theme theme) {
    const QImage img = renderAnnotatedImage(view, ctl, width_px, theme);
    // Written under a temporary name and renamed: never a half-written PNG under `path`.
    const QString tmp = path + ".part";
    if (!img.save(tmp, "PNG")) {
        QFile::remove(tmp);
        throw core::InputError(path.toStdString(), "", "cannot write the PNG (folder missing or not writable?)");
    }
    QFile::remove(path);
    if (!QFile::rename(tmp, path)) {
        QFile::remove(tmp);
        throw core::InputError(path.toStdString(), "", "cannot replace the PNG (file in use or folder not writable?)");
    }
}

}  // namespace umbra::ui
