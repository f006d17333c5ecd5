// SPDX-License-Identifier: MIT
#include "ui/report/case_images.h"

#include <QPainter>

#include <algorithm>
#include <cmath>
#include <cstring>

#include "core/capture_file.h"
#include "core/error.h"
#include "core/isolated_check.h"
#include "reconstruction/pipeline.h"
#include "ui/viewer/view_transform.h"

namespace umbra::ui::report {

QImage rgbImage(const std::vector<uint8_t>& rgb, size_t nx, size_t nz) {
    QImage img(static_cast<int>(nx), static_cast<int>(nz), QImage::Format_RGB888);
    if (rgb.size() < nx * nz * 3) {
        img.fill(Qt::black);
        return img;
    }
    for (size_t z = 0; z < nz; ++z) std::memcpy(img.scanLine(static_cast<int>(z)), rgb.data() + z * nx * 3, nx * 3);
    return img;
}

namespace {

QRectF extentOf(const core::Frame& f) {
    if (f.nx() == 0 || f.nz() == 0) return {};
    const double dx = f.nx() > 1 ? (f.x_m[1] - f.x_m[0]) * 1e3 : 0.1;
    const double dz = f.nz() > 1 ? (f.z_m[1] - f.z_m[0]) * 1e3 : 0.1;
    return QRectF(QPointF(f.x_m.front() * 1e3 - dx / 2, f.z_m.front() * 1e3 - dz / 2),
                  QPointF(f.x_m.back() * 1e3 + dx / 2, f.z_m.back() * 1e3 + dz / 2));
}

core::SizingTool toolOf(core::MeasurementKind k) {
    return k == core::MeasurementKind::TipSizing      ? core::SizingTool::Tips
           : k == core::MeasurementKind::Drop20Sizing ? core::SizingTool::Drop20
                                                      : core::SizingTool::Drop6;
}

/// Paints `scene` into an image `width_px` wide showing `region` (mm) with the caption wrapped.
QImage paint(Scene scene, QRectF region, const QStringList& caption, int width_px, Theme theme) {
    SceneStyle style = themedStyle(theme);
    style.scale_bar = true;
    // Fonts, lines and margins scale with the picture, as in the workstation's export.
    const double k = std::max(0.5, width_px / 900.0);
    style.scale = k;
    const QMarginsF m0 = sceneMargins(style, 0);
    const double area_w = std::max(50.0, width_px - m0.left() - m0.right());
    const double ppm = area_w / region.width();
    const double area_h = region.height() * ppm;
    style.caption = wrapCaption(caption, style, area_w + m0.right() - 8 * k);
    const QMarginsF m = sceneMargins(style, static_cast<int>(style.caption.size()));
    const QSize whole(width_px, static_cast<int>(std::ceil(area_h + m.top() + m.bottom())));
    QImage out(whole, QImage::Format_RGB32);
    out.fill(style.background);
    ViewTransform vt;
    vt.setExtent(scene.extent_mm.left(), scene.extent_mm.right(), scene.extent_mm.top(), scene.extent_mm.bottom());
    vt.setViewport(QRectF(QPointF(m.left(), m.top()), QSizeF(area_w, area_h)));
    const double fit = std::min(area_w / scene.extent_mm.width(), area_h / scene.extent_mm.height());
    vt.setZoom(ppm / fit);
    vt.setCentreMm(region.center());
    QPainter p(&out);
    paintScene(p, QRectF(QPointF(0, 0), QSizeF(whole)), vt, scene, style);
    p.end();
    return out;
}

}  // namespace

CaseImages::CaseImages(const core::CaseDocument& doc, bool isolated_check, int threads) : doc_(doc), threads_(threads) {
    captures_.resize(doc.captures.size());
    readers_.resize(doc.captures.size());
    for (size_t i = 0; i < doc.captures.size(); ++i) {
        const core::CaseCapture& c = doc.captures[i];
        CaptureInfo& info = captures_[i];
        info.path = QString::fromStdString(c.path);
        info.sha256_recorded = c.sha256;
        info.recipe = recon::defaultRecipe();
        info.recipe_default = c.recipe_json.empty();
        if (!c.recipe_json.empty()) info.recipe.mergeJson(c.recipe_json, c.path + " (recipe in the case)");
        info.status = core::checkCapture(c);
        if (info.status == core::CaptureStatus::Missing) {
            info.problem = QStringLiteral("capture not found or not readable at %1").arg(info.path);
            continue;
        }
        if (info.status == core::CaptureStatus::Changed) {
            info.problem = QStringLiteral("the capture's bytes differ from the SHA-256 recorded in the case (%1): "
                                          "no image is made from it")
                               .arg(info.path);
            continue;
        }
        if (isolated_check) {
            const auto problems = core::checkCaptureIsolated(c.path, false);
            if (!problems.empty()) {
                info.problem = QStringLiteral("%1: %2").arg(info.path, QString::fromStdString(problems.front().where + ": " + problems.front().what));
                continue;
            }
        }
        try {
            readers_[i] = std::make_unique<core::CaptureReader>(c.path);
            info.header = readers_[i]->header();
        } catch (const std::exception& e) {
            info.problem = QString::fromStdString(e.what());
        }
    }
}

CaseImages::~CaseImages() = default;

core::CaptureReader* CaseImages::reader(size_t capture) {
    return capture < readers_.size() ? readers_[capture].get() : nullptr;
}

const FrameImage* CaseImages::frame(size_t capture, size_t frame) {
    const auto key = std::make_pair(capture, frame);
    if (auto it = frames_.find(key); it != frames_.end()) return it->second.get();
    core::CaptureReader* rd = reader(capture);
    if (!rd || frame >= rd->header().frames) return nullptr;
    const CaptureInfo& info = captures_[capture];
    auto fi = std::make_unique<FrameImage>();
    try {
        recon::Reconstructor rec(*rd, info.recipe, threads_);
        fi->envelope = rec.run(frame);
        fi->fidelity_db = rec.amplitudeFidelityDb();
    } catch (const core::SettingError& e) {
        throw core::SettingError(info.path.toStdString() + ": the case's recipe cannot be used: " + e.what());
    }
    const core::Frame tgc = recon::applyTgc(fi->envelope, rd->header(), info.recipe);
    fi->tgc = tgc.envelope;
    fi->db = recon::logCompress(tgc, info.recipe);
    fi->colour = rgbImage(recon::colourise(fi->db, info.recipe), fi->envelope.nx(), fi->envelope.nz());
    recon::SizingSettings settings;
    settings.medium = doc_.sizing_medium;
    settings.speed_rel = doc_.speed_uncertainty_rel;
    try {
        fi->setup = recon::sizingSetup(info.recipe, recon::acquisitionOf(rd->header()), fi->tgc, settings);
    } catch (const std::exception&) {
        fi->setup.reset();
    }
    // Same model as the workstation: half a pixel of reading, the case's speed-of-sound
    // uncertainty, the point-spread widths where the model knows them; depth from the array face.
    core::UncertaintyModel& u = fi->model;
    if (fi->envelope.nx() > 1 && fi->envelope.nz() > 1) {
        u.pixel_x_mm = std::abs(fi->envelope.x_m[1] - fi->envelope.x_m[0]) * 1e3;
        u.pixel_z_mm = std::abs(fi->envelope.z_m[1] - fi->envelope.z_m[0]) * 1e3;
    }
    u.speed_rel = 0.01;
    u.surface_z_mm = 0;
    if (fi->setup) {
        u.speed_rel = fi->setup->context.speed_rel;
        u.speed_basis = fi->setup->context.speed_basis;
        if (fi->setup->context.resolution) {
            const core::ResolutionAt r = fi->setup->context.resolution;
            u.resolution = [r](double x, double z) {
                const auto w = r(x, z);
                return std::pair{w.lateral_mm, w.axial_mm};
            };
        }
    }
    const FrameImage* out = fi.get();
    frames_[key] = std::move(fi);
    return out;
}

std::vector<core::Quantity> CaseImages::quantities(size_t capture, const core::Measurement& m,
                                                   std::optional<core::SizingResult>* sizing) {
    const FrameImage* fi = frame(capture, m.frame_index);
    if (!fi) return {};
    if (core::isImageSizing(m.kind) && m.points.size() == 2 && fi->setup) {
        std::vector<double> xs, zs;
        for (double v : fi->envelope.x_m) xs.push_back(v * 1e3);
        for (double v : fi->envelope.z_m) zs.push_back(v * 1e3);
        try {
            const auto s = core::measureInBox(toolOf(m.kind), fi->tgc, xs, zs, m.points[0], m.points[1], fi->setup->context);
            if (sizing) *sizing = s;
            if (s.found) {
                std::vector<core::Quantity> q;
                for (const auto* v : {&s.length, &s.height, &s.x, &s.depth})
                    if (*v) q.push_back(core::fromMeasured(**v));
                return q;
            }
        } catch (const std::exception&) {
        }
    }
    try {
        return core::evaluate(m, fi->model);
    } catch (const std::exception&) {
        return {};
    }
}

QImage CaseImages::annotated(size_t capture, size_t frame_index, const std::vector<core::Measurement>& measurements,
                             const std::map<std::string, int>& finding_numbers, const QStringList& caption, int width_px,
                             Theme theme, QRectF region) {
    const FrameImage* fi = frame(capture, frame_index);
    if (!fi || fi->envelope.nx() == 0) return {};
    Scene scene;
    scene.image = &fi->colour;
    scene.extent_mm = extentOf(fi->envelope);
    scene.dynamic_range_db = captures_[capture].recipe.number("log_compression.dynamic_range_db");
    scene.colour_map = captures_[capture].recipe.text("colour_map.map");
    scene.uncertainty = fi->model;
    scene.finding_numbers = finding_numbers;
    for (const auto& m : measurements) {
        if (m.frame_index != frame_index) continue;
        scene.measurements.push_back(m);
        std::optional<core::SizingResult> s;
        auto q = quantities(capture, m, &s);
        if (core::isImageSizing(m.kind) && s && s->found) {
            scene.sizings[m.id] = *s;
            scene.quantities[m.id] = q;
        }
    }
    region = region.isEmpty() ? scene.extent_mm : region.intersected(scene.extent_mm);
    if (region.isEmpty()) region = scene.extent_mm;
    return paint(scene, region, caption, width_px, theme);
}

QImage CaseImages::topView(size_t capture, double z0_mm, double z1_mm, int width_px, Theme theme, size_t max_pixels,
                           QString* why) {
    auto fail = [&](const QString& w) {
        if (why) *why = w;
        return QImage();
    };
    core::CaptureReader* rd = reader(capture);
    if (!rd) return fail(captures_[capture].problem);
    const auto& h = rd->header();
    if (!h.scan || h.scan->position_m.size() != h.frames || h.frames < 2) return fail(QStringLiteral("not an encoded scan"));
    const FrameImage* first = frame(capture, 0);
    if (!first) return fail(QStringLiteral("frame 1 not available"));
    const size_t nx = first->envelope.nx(), nz = first->envelope.nz();
    if (h.frames * nx * nz > max_pixels)
        return fail(QStringLiteral("%1 frames of %2 × %3 pixels exceed the report's limit; the top view is in the workstation")
                        .arg(h.frames)
                        .arg(nx)
                        .arg(nz));
    // Peak of the TCG-corrected envelope over the depth gate, per frame and column.
    std::vector<float> peak(h.frames * nx, 0.0f);
    float top = 0;
    for (size_t f = 0; f < h.frames; ++f) {
        const FrameImage* fi = frame(capture, f);
        if (!fi || fi->envelope.nx() != nx) return fail(QStringLiteral("frame %1 not available").arg(f + 1));
        for (size_t iz = 0; iz < nz; ++iz) {
            const double z = fi->envelope.z_m[iz] * 1e3;
            if (z < z0_mm || z > z1_mm) continue;
            for (size_t ix = 0; ix < nx; ++ix) peak[f * nx + ix] = std::max(peak[f * nx + ix], fi->tgc[iz * nx + ix]);
        }
        for (size_t ix = 0; ix < nx; ++ix) top = std::max(top, peak[f * nx + ix]);
        if (f > 0) frames_.erase({capture, f});  // keep memory at about one frame
    }
    const core::Recipe& r = captures_[capture].recipe;
    const double dr = r.number("log_compression.dynamic_range_db");
    std::vector<float> db(peak.size());
    for (size_t i = 0; i < peak.size(); ++i)
        db[i] = top > 0 && peak[i] > 0 ? std::max(-static_cast<float>(dr), 20.0f * std::log10(peak[i] / top)) : -static_cast<float>(dr);
    // Rows ordered by scan position.
    std::vector<size_t> order(h.frames);
    for (size_t i = 0; i < order.size(); ++i) order[i] = i;
    const auto& pos = h.scan->position_m;
    std::sort(order.begin(), order.end(), [&](size_t a, size_t b) { return pos[a] < pos[b]; });
    std::vector<float> sorted(db.size());
    for (size_t row = 0; row < order.size(); ++row)
        std::copy_n(db.begin() + static_cast<long>(order[row] * nx), nx, sorted.begin() + static_cast<long>(row * nx));
    const QImage colour = rgbImage(recon::colourise(sorted, r), nx, h.frames);
    Scene scene;
    scene.image = &colour;
    const double dx = nx > 1 ? (first->envelope.x_m[1] - first->envelope.x_m[0]) * 1e3 : 0.1;
    const double y0 = pos[order.front()] * 1e3, y1 = pos[order.back()] * 1e3;
    const double dy = (y1 - y0) / std::max<size_t>(1, h.frames - 1);
    scene.extent_mm = QRectF(QPointF(first->envelope.x_m.front() * 1e3 - dx / 2, y0 - dy / 2),
                             QPointF(first->envelope.x_m.back() * 1e3 + dx / 2, y1 + dy / 2));
    scene.dynamic_range_db = dr;
    scene.colour_map = r.text("colour_map.map");
    QImage out = paint(scene, scene.extent_mm,
                       {QStringLiteral("Top view: peak amplitude over depth %1 to %2 mm per scan position (vertical axis: "
                                       "scan position y, mm), dB re the top view's strongest echo")
                            .arg(z0_mm, 0, 'f', 1)
                            .arg(z1_mm, 0, 'f', 1)},
                       width_px, theme);
    // The painter labels the vertical axis "depth"; here it is the scan position.
    QPainter p(&out);
    SceneStyle st = themedStyle(theme);
    const double k = std::max(0.5, width_px / 900.0);
    const QMarginsF m = sceneMargins([&] {
        SceneStyle s = st;
        s.scale = k;
        return s;
    }());
    p.fillRect(QRectF(0, m.top(), 22 * k, out.height() - m.top() - m.bottom()), st.background);
    p.setPen(st.axis);
    QFont f = p.font();
    f.setPointSizeF(8 * k);
    p.setFont(f);
    p.translate(10 * k, m.top() + (out.height() - m.top() - m.bottom()) / 2);
    p.rotate(-90);
    p.drawText(QRectF(-80 * k, -8 * k, 160 * k, 16 * k), Qt::AlignCenter, QStringLiteral("scan position y, mm"));
    p.end();
    return out;
}

}  // namespace umbra::ui::report
