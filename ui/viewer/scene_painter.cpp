// SPDX-License-Identifier: MIT
#include "ui/viewer/scene_painter.h"

#include <QFontMetricsF>
#include <QLinearGradient>
#include <QPainterPath>

#include <algorithm>
#include <cmath>

#include "reconstruction/pipeline.h"

namespace umbra::ui {

double niceStep(double span, int count) {
    if (!(span > 0) || count < 1) return 1;
    const double raw = span / count;
    const double mag = std::pow(10.0, std::floor(std::log10(raw)));
    const double n = raw / mag;
    const double m = n < 1.5 ? 1 : n < 3.5 ? 2 : n < 7.5 ? 5 : 10;
    return m * mag;
}

QMarginsF sceneMargins(const SceneStyle& s, int caption_lines) {
    const double k = s.scale;
    return QMarginsF(58 * k, 40 * k, (s.colour_bar ? 84 : 16) * k, (14 + 18 * caption_lines) * k);
}

QRectF imageArea(const QRectF& whole, const SceneStyle& style) {
    return whole.marginsRemoved(sceneMargins(style, static_cast<int>(style.caption.size())));
}

SceneStyle themedStyle(Theme theme) {
    SceneStyle s;
    if (theme == Theme::Light) {
        s.background = Qt::white;
        s.axis = QColor(30, 32, 38);
        s.label_fill = QColor(255, 255, 255, 225);
        s.label_text_dark = true;
    }
    return s;
}

std::optional<Theme> themeFromName(const QString& name) {
    const QString n = name.trimmed().toLower();
    if (n == QLatin1String("light")) return Theme::Light;
    if (n == QLatin1String("dark")) return Theme::Dark;
    return std::nullopt;
}

namespace {
QFont captionFont(const SceneStyle& s) {
    QFont f;
    f.setPointSizeF(8.5 * s.scale);
    return f;
}
}  // namespace

QStringList wrapCaption(const QStringList& lines, const SceneStyle& style, double width_px) {
    const QFontMetricsF fm(captionFont(style));
    QStringList out;
    for (const QString& line : lines) {
        if (width_px <= 0 || fm.horizontalAdvance(line) <= width_px) {
            out << line;
            continue;
        }
        QString cur;
        for (const QString& word : line.split(QLatin1Char(' '))) {
            const QString trial = cur.isEmpty() ? word : cur + QLatin1Char(' ') + word;
            if (fm.horizontalAdvance(trial) <= width_px) {
                cur = trial;
                continue;
            }
            if (!cur.isEmpty()) out << cur;
            cur = word;
            while (cur.size() > 1 && fm.horizontalAdvance(cur) > width_px) {  // one word wider than the line
                int n = cur.size() - 1;
                while (n > 1 && fm.horizontalAdvance(cur.left(n)) > width_px) --n;
                out << cur.left(n);
                cur = cur.mid(n);
            }
        }
        if (!cur.isEmpty()) out << cur;
    }
    return out;
}

QColor measurementColour(core::MeasurementKind kind) {
    switch (kind) {
        case core::MeasurementKind::Caliper: return QColor(120, 220, 255);
        case core::MeasurementKind::DepthMarker: return QColor(255, 214, 102);
        case core::MeasurementKind::ExtentBox: return QColor(140, 240, 160);
        case core::MeasurementKind::Ellipse: return QColor(255, 150, 200);
        case core::MeasurementKind::DropSizing: return QColor(255, 170, 90);
        case core::MeasurementKind::Drop20Sizing: return QColor(255, 120, 70);
        case core::MeasurementKind::TipSizing: return QColor(200, 160, 255);
    }
    return Qt::white;
}

std::vector<QPointF> measurementHandles(const core::Measurement& m) {
    std::vector<QPointF> h;
    for (const auto& p : m.points) h.emplace_back(p.x_mm, p.z_mm);
    return h;
}

QString measurementLabel(const core::Measurement& m, const core::UncertaintyModel& u, const std::vector<core::Quantity>* given) {
    QString name = QString::fromStdString(m.label.empty() ? m.id : m.label);
    std::vector<core::Quantity> q;
    if (given) {
        q = *given;
    } else {
        try {
            q = core::evaluate(m, u);
        } catch (const std::exception&) {
            return name;
        }
    }
    QStringList parts;
    // Each number is named ("length", "height", ...), so a reader of a printed image knows which is which.
    auto pick = [&](const char* n, const char* shown) {
        for (const auto& x : q)
            if (x.name == n) parts << QString::fromUtf8(shown) + QLatin1Char(' ') + QString::fromStdString(core::formatQuantity(x));
    };
    switch (m.kind) {
        case core::MeasurementKind::Caliper: pick("distance", "distance"); break;
        case core::MeasurementKind::DepthMarker: pick("depth", "depth"); break;
        case core::MeasurementKind::ExtentBox: pick("length", "length"); pick("height", "height"); break;
        case core::MeasurementKind::Ellipse: pick("axis 1", "axis 1"); pick("axis 2", "axis 2"); break;
        case core::MeasurementKind::DropSizing:
            pick("length −6 dB", "length");
            pick("height −6 dB", "height");
            if (!parts.isEmpty()) parts.back() += QStringLiteral(" (−6 dB)");
            break;
        case core::MeasurementKind::Drop20Sizing:
            pick("length −20 dB", "length");
            pick("height −20 dB", "height");
            if (!parts.isEmpty()) parts.back() += QStringLiteral(" (−20 dB)");
            break;
        case core::MeasurementKind::TipSizing:
            pick("height (tip to tip)", "height tip to tip");
            break;
    }
    if (parts.isEmpty() && !q.empty())
        parts << QString::fromStdString(q.back().name) + QLatin1Char(' ') + QString::fromStdString(core::formatQuantity(q.back()));
    return name + "  " + parts.join(", ");
}

namespace {

void drawLabel(QPainter& p, const QPointF& at, const QString& text, const QColor& colour, double k, const QRectF& inside,
               const QColor& fill) {
    QFont f = p.font();
    f.setPointSizeF(8.5 * k);
    p.setFont(f);
    QFontMetricsF fm(f);
    QRectF r = fm.boundingRect(text).adjusted(-4 * k, -2 * k, 4 * k, 2 * k);
    r.moveTopLeft(at + QPointF(8 * k, -r.height() - 4 * k));
    // Keep the label inside the image area.
    if (r.right() > inside.right() - 2 * k) r.moveRight(inside.right() - 2 * k);
    if (r.left() < inside.left() + 2 * k) r.moveLeft(inside.left() + 2 * k);
    if (r.top() < inside.top() + 2 * k) r.moveTop(at.y() + 6 * k);
    if (r.bottom() > inside.bottom() - 2 * k) r.moveBottom(inside.bottom() - 2 * k);
    p.setPen(Qt::NoPen);
    p.setBrush(fill);
    p.drawRoundedRect(r, 3 * k, 3 * k);
    p.setPen(colour);
    p.drawText(r, Qt::AlignCenter, text);
}

void drawMeasurement(QPainter& p, const ViewTransform& vt, const core::Measurement& m, const Scene& sc, const SceneStyle& st) {
    const double k = st.scale;
    const QColor col = measurementColour(m.kind);
    const bool sel = QString::fromStdString(m.id) == sc.selected;
    QPen pen(col, (sel ? 2.2 : 1.5) * k);
    pen.setCosmetic(false);
    p.setPen(pen);
    p.setBrush(Qt::NoBrush);
    std::vector<QPointF> px;
    for (const auto& pt : m.points) px.push_back(vt.toPixel(QPointF(pt.x_mm, pt.z_mm)));
    if (px.empty()) return;
    QPointF label_at = px.back();
    switch (m.kind) {
        case core::MeasurementKind::Caliper:
            if (px.size() >= 2) {
                p.drawLine(px[0], px[1]);
                // End ticks perpendicular to the line.
                QPointF d = px[1] - px[0];
                const double len = std::hypot(d.x(), d.y());
                if (len > 0) {
                    const QPointF n(-d.y() / len * 6 * k, d.x() / len * 6 * k);
                    p.drawLine(px[0] - n, px[0] + n);
                    p.drawLine(px[1] - n, px[1] + n);
                }
                label_at = (px[0] + px[1]) / 2;
            }
            break;
        case core::MeasurementKind::DepthMarker: {
            const QRectF img = vt.imageRectPx();
            QPen dash = pen;
            dash.setStyle(Qt::DashLine);
            p.setPen(dash);
            p.drawLine(QPointF(img.left(), px[0].y()), QPointF(img.right(), px[0].y()));
            p.setPen(pen);
            p.drawLine(px[0] + QPointF(-7 * k, 0), px[0] + QPointF(7 * k, 0));
            p.drawLine(px[0] + QPointF(0, -7 * k), px[0] + QPointF(0, 7 * k));
            label_at = QPointF(std::max(img.left(), vt.viewport().left()), px[0].y());  // label at the line's left end
            break;
        }
        case core::MeasurementKind::ExtentBox:
            if (px.size() >= 2) {
                p.drawRect(QRectF(px[0], px[1]).normalized());
                label_at = QPointF(std::max(px[0].x(), px[1].x()), std::min(px[0].y(), px[1].y()));
            }
            break;
        case core::MeasurementKind::TipSizing:
            if (px.size() >= 2) {
                // The search box, dashed; each tip marked with a cross and joined by a dotted line.
                const QRectF box = QRectF(px[0], px[1]).normalized();
                p.setPen(QPen(col, 0.8 * k, Qt::DashLine));
                p.drawRect(box);
                p.setPen(pen);
                label_at = QPointF(box.right(), box.top());
                auto it = sc.sizings.find(m.id);
                if (it != sc.sizings.end() && it->second.tips.size() == 2) {
                    const QPointF a = vt.toPixel(QPointF(it->second.tips[0].x_mm, it->second.tips[0].z_mm));
                    const QPointF b = vt.toPixel(QPointF(it->second.tips[1].x_mm, it->second.tips[1].z_mm));
                    const double tk = 7 * k;
                    for (const QPointF& t : {a, b}) {
                        p.drawLine(t + QPointF(-tk, -tk), t + QPointF(tk, tk));
                        p.drawLine(t + QPointF(-tk, tk), t + QPointF(tk, -tk));
                    }
                    p.setPen(QPen(col, 0.8 * k, Qt::DotLine));
                    p.drawLine(a, b);
                    p.setPen(pen);
                }
            }
            break;
        case core::MeasurementKind::DropSizing:
        case core::MeasurementKind::Drop20Sizing:
            if (px.size() >= 2) {
                // The search box, thin and dashed; the −6 dB extents as a cross with end ticks
                // (an open edge — not reached inside the box — gets an arrow-like open tick).
                const QRectF box = QRectF(px[0], px[1]).normalized();
                QPen dash(col, 0.8 * k, Qt::DashLine);
                p.setPen(dash);
                p.drawRect(box);
                p.setPen(pen);
                label_at = QPointF(box.right(), box.top());
                auto it = sc.sizings.find(m.id);
                if (it != sc.sizings.end() && it->second.found) {
                    const auto& d = it->second.drop;
                    const QPointF l = vt.toPixel(QPointF(d.left_x_mm, d.peak_z_mm));
                    const QPointF r = vt.toPixel(QPointF(d.right_x_mm, d.peak_z_mm));
                    const QPointF t = vt.toPixel(QPointF(d.peak_x_mm, d.top_z_mm));
                    const QPointF b = vt.toPixel(QPointF(d.peak_x_mm, d.bottom_z_mm));
                    p.drawLine(l, r);
                    p.drawLine(t, b);
                    const double tk = 6 * k;
                    auto vtick = [&](QPointF at, bool open, double dir) {
                        if (open) {
                            p.drawLine(at, at + QPointF(-dir * tk, -tk));
                            p.drawLine(at, at + QPointF(-dir * tk, tk));
                        } else {
                            p.drawLine(at + QPointF(0, -tk), at + QPointF(0, tk));
                        }
                    };
                    auto htick = [&](QPointF at, bool open, double dir) {
                        if (open) {
                            p.drawLine(at, at + QPointF(-tk, -dir * tk));
                            p.drawLine(at, at + QPointF(tk, -dir * tk));
                        } else {
                            p.drawLine(at + QPointF(-tk, 0), at + QPointF(tk, 0));
                        }
                    };
                    vtick(l, d.left_open, -1);
                    vtick(r, d.right_open, 1);
                    htick(t, d.top_open, -1);
                    htick(b, d.bottom_open, 1);
                }
            }
            break;
        case core::MeasurementKind::Ellipse:
            if (px.size() >= 3) {
                const QPointF c = px[0];
                const QPointF a1 = px[1] - c, a2 = px[2] - c;
                const double ra = std::hypot(a1.x(), a1.y()), rb = std::hypot(a2.x(), a2.y());
                const double ang = std::atan2(a1.y(), a1.x()) * 180.0 / M_PI;
                p.save();
                p.translate(c);
                p.rotate(ang);
                p.drawEllipse(QPointF(0, 0), ra, rb);
                p.restore();
                QPen thin(col, 0.8 * k, Qt::DotLine);
                p.setPen(thin);
                p.drawLine(c - a1, c + a1);
                p.drawLine(c - a2, c + a2);
                p.setPen(pen);
                label_at = c + QPointF(ra * 0.7, -rb * 0.7);
            }
            break;
    }
    // Handles.
    p.setPen(QPen(QColor(10, 12, 16), 1 * k));
    p.setBrush(sel ? Qt::white : col);
    const double hs = (sel ? 4.0 : 3.0) * k;
    for (const auto& h : px) p.drawRect(QRectF(h.x() - hs, h.y() - hs, 2 * hs, 2 * hs));
    auto qit = sc.quantities.find(m.id);
    QString text = measurementLabel(m, sc.uncertainty, qit == sc.quantities.end() ? nullptr : &qit->second);
    auto it = sc.finding_numbers.find(m.id);
    if (it != sc.finding_numbers.end()) text = QStringLiteral("F%1 · ").arg(it->second) + text;
    if (auto sz = sc.sizings.find(m.id); sz != sc.sizings.end()) {
        if (sz->second.resolution_limited) text += QStringLiteral("  [resolution-limited]");
        if (sz->second.offer_tips) text += QStringLiteral("  [%1 peaks: try tip sizing (T)]").arg(sz->second.peaks.size());
    }
    const QColor text_colour = st.label_text_dark ? (sel ? QColor(0, 0, 0) : col.darker(260)) : (sel ? QColor(Qt::white) : col);
    drawLabel(p, label_at, text, text_colour, k, vt.viewport(), st.label_fill);
}

void drawColourBar(QPainter& p, const QRectF& bar, const Scene& sc, const SceneStyle& st) {
    const double k = st.scale;
    QImage grad(1, 256, QImage::Format_RGB888);
    for (int i = 0; i < 256; ++i) {
        uint8_t rgb[3] = {0, 0, 0};
        try {
            recon::colourAt(sc.colour_map, 1.0 - i / 255.0, rgb);
        } catch (const std::exception&) {
            rgb[0] = rgb[1] = rgb[2] = static_cast<uint8_t>(255 - i);
        }
        grad.setPixelColor(0, i, QColor(rgb[0], rgb[1], rgb[2]));
    }
    p.setRenderHint(QPainter::SmoothPixmapTransform, true);
    p.drawImage(bar, grad);
    p.setPen(QPen(st.axis, 1 * k));
    p.setBrush(Qt::NoBrush);
    p.drawRect(bar);
    QFont f = p.font();
    f.setPointSizeF(8 * k);
    p.setFont(f);
    const double dr = std::max(1.0, sc.dynamic_range_db);
    const double step = dr <= 30 ? 6 : dr <= 60 ? 10 : 20;
    for (double v = 0; v >= -dr - 1e-9; v -= step) {
        const double y = bar.top() + (-v / dr) * bar.height();
        p.drawLine(QPointF(bar.right(), y), QPointF(bar.right() + 4 * k, y));
        p.drawText(QRectF(bar.right() + 6 * k, y - 8 * k, 40 * k, 16 * k), Qt::AlignLeft | Qt::AlignVCenter,
                   QString::number(v, 'f', 0));
    }
    p.save();
    p.translate(bar.left() - 6 * k, bar.center().y());
    p.rotate(-90);
    p.drawText(QRectF(-60 * k, -14 * k, 120 * k, 14 * k), Qt::AlignCenter, QStringLiteral("amplitude, dB"));
    p.restore();
}

}  // namespace

QPen weldPen(const core::WeldPolyline& l, double k) {
    QColor c;
    switch (l.kind) {
    case core::WeldLineKind::FusionFace: c = QColor(120, 235, 200); break;
    case core::WeldLineKind::Cap:
    case core::WeldLineKind::Root: c = QColor(240, 215, 120); break;
    case core::WeldLineKind::BackWall:
    case core::WeldLineKind::Surface: c = QColor(225, 228, 235); break;
    }
    c.setAlpha(l.skip == 0 ? 230 : 150);
    QPen pen(c, (l.skip == 0 ? 1.4 : 1.1) * k);
    pen.setCosmetic(false);
    if (l.skip > 0) pen.setStyle(Qt::DashLine);
    if (l.kind == core::WeldLineKind::BackWall || l.kind == core::WeldLineKind::Surface) pen.setStyle(Qt::DashDotLine);
    return pen;
}

std::vector<QLineF> isoSegments(const std::vector<double>& xs, const std::vector<double>& zs, const std::vector<float>& v, float level) {
    std::vector<QLineF> out;
    const size_t nx = xs.size(), nz = zs.size();
    if (nx < 2 || nz < 2 || v.size() != nx * nz) return out;
    auto val = [&](size_t iz, size_t ix) { return double(v[iz * nx + ix]); };
    for (size_t iz = 0; iz + 1 < nz; ++iz)
        for (size_t ix = 0; ix + 1 < nx; ++ix) {
            // Corners counter-clockwise: (ix, iz), (ix+1, iz), (ix+1, iz+1), (ix, iz+1).
            const double c[4] = {val(iz, ix), val(iz, ix + 1), val(iz + 1, ix + 1), val(iz + 1, ix)};
            const QPointF p[4] = {{xs[ix], zs[iz]}, {xs[ix + 1], zs[iz]}, {xs[ix + 1], zs[iz + 1]}, {xs[ix], zs[iz + 1]}};
            int mask = 0;
            for (int k = 0; k < 4; ++k)
                if (c[k] >= level) mask |= 1 << k;
            if (mask == 0 || mask == 15) continue;
            auto edge = [&](int k) {  // crossing on edge k (corner k to k+1)
                const int a = k, b = (k + 1) % 4;
                const double t = (level - c[a]) / (c[b] - c[a]);
                return p[a] + (p[b] - p[a]) * t;
            };
            std::vector<int> edges;
            for (int k = 0; k < 4; ++k)
                if (((mask >> k) & 1) != ((mask >> ((k + 1) % 4)) & 1)) edges.push_back(k);
            if (edges.size() == 2) {
                out.emplace_back(edge(edges[0]), edge(edges[1]));
            } else if (edges.size() == 4) {  // saddle
                const bool centre_in = (c[0] + c[1] + c[2] + c[3]) / 4 >= level;
                const bool first_in = mask & 1;
                if (centre_in == first_in) {
                    out.emplace_back(edge(0), edge(1));
                    out.emplace_back(edge(2), edge(3));
                } else {
                    out.emplace_back(edge(3), edge(0));
                    out.emplace_back(edge(1), edge(2));
                }
            }
        }
    return out;
}

namespace {
void drawWeld(QPainter& p, const ViewTransform& vt, const std::vector<core::WeldPolyline>& lines, double k) {
    p.save();
    p.setBrush(Qt::NoBrush);
    for (const auto& l : lines) {
        QPolygonF poly;
        for (const auto& pt : l.points) poly << vt.toPixel(QPointF(pt.x_mm, pt.z_mm));
        p.setPen(weldPen(l, k));
        p.drawPolyline(poly);
    }
    p.restore();
}
}  // namespace

void paintScene(QPainter& p, const QRectF& whole, const ViewTransform& vt, const Scene& sc, const SceneStyle& st) {
    const double k = st.scale;
    p.save();
    p.setRenderHint(QPainter::Antialiasing, true);
    p.fillRect(whole, st.background);
    const QRectF area = vt.viewport();
    QFont base = p.font();
    base.setPointSizeF(8 * k);
    p.setFont(base);

    if (!sc.image || sc.image->isNull()) {
        p.setPen(st.axis);
        QFont f = base;
        f.setPointSizeF(10.5 * k);
        p.setFont(f);
        p.drawText(whole.adjusted(40 * k, 40 * k, -40 * k, -40 * k), Qt::AlignCenter | Qt::TextWordWrap, sc.message);
        p.restore();
        return;
    }

    // Image, clipped to the image area.
    const QRectF img = vt.imageRectPx();
    p.save();
    p.setClipRect(area);
    p.fillRect(area, st.label_text_dark ? QColor(236, 236, 236) : QColor(8, 9, 12));
    p.setRenderHint(QPainter::SmoothPixmapTransform, vt.pixelsPerMm() * sc.extent_mm.width() / sc.image->width() < 6);
    p.drawImage(img, *sc.image);
    if (!sc.weld.empty()) {
        p.save();
        p.setClipRect(area.intersected(img));  // only over the image: no lines over empty margins
        drawWeld(p, vt, sc.weld, k);
        p.restore();
    }
    for (const auto& [level, segs] : sc.coverage) {
        QPen pen(level > -9 ? QColor(255, 170, 60, 220) : QColor(255, 120, 200, 180), 1.3 * k);
        pen.setStyle(level > -9 ? Qt::DashLine : Qt::DotLine);
        p.setPen(pen);
        for (const auto& l : segs) p.drawLine(QLineF(vt.toPixel(l.p1()), vt.toPixel(l.p2())));
    }
    for (const auto& m : sc.measurements) drawMeasurement(p, vt, m, sc, st);
    if (!sc.view_label.isEmpty()) {
        QFont f = base;
        f.setPointSizeF(9 * k);
        f.setBold(true);
        p.setFont(f);
        const QRectF box = QFontMetricsF(f).boundingRect(sc.view_label).adjusted(-5 * k, -2 * k, 5 * k, 2 * k);
        const QRectF at(area.topLeft() + QPointF(6 * k, 6 * k), box.size());
        p.setPen(Qt::NoPen);
        p.setBrush(st.label_fill);
        p.drawRoundedRect(at, 3 * k, 3 * k);
        p.setPen(st.label_text_dark ? QColor(20, 20, 24) : QColor(235, 238, 244));
        p.drawText(at, Qt::AlignCenter, sc.view_label);
        p.setFont(base);
    }
    p.restore();

    // Axes: x along the top (the array is there), depth down the left side.
    p.setPen(QPen(st.axis, 1 * k));
    p.drawRect(area);
    const QPointF tl = vt.toMm(area.topLeft()), br = vt.toMm(area.bottomRight());
    const double sx = niceStep(br.x() - tl.x(), std::max(2, static_cast<int>(area.width() / (70 * k))));
    for (double x = std::ceil(tl.x() / sx) * sx; x <= br.x() + 1e-9; x += sx) {
        const double px = vt.toPixel(QPointF(x, 0)).x();
        p.drawLine(QPointF(px, area.top()), QPointF(px, area.top() - 5 * k));
        p.drawText(QRectF(px - 30 * k, area.top() - 22 * k, 60 * k, 16 * k), Qt::AlignCenter,
                   QString::number(std::abs(x) < 1e-9 ? 0.0 : x, 'g', 6));
    }
    const double sz = niceStep(br.y() - tl.y(), std::max(2, static_cast<int>(area.height() / (50 * k))));
    for (double z = std::ceil(tl.y() / sz) * sz; z <= br.y() + 1e-9; z += sz) {
        const double py = vt.toPixel(QPointF(0, z)).y();
        p.drawLine(QPointF(area.left(), py), QPointF(area.left() - 5 * k, py));
        p.drawText(QRectF(area.left() - 52 * k, py - 8 * k, 44 * k, 16 * k), Qt::AlignRight | Qt::AlignVCenter,
                   QString::number(std::abs(z) < 1e-9 ? 0.0 : z, 'g', 6));
    }
    p.drawText(QRectF(area.left(), whole.top() + 2 * k, area.width(), 14 * k), Qt::AlignCenter, QStringLiteral("x, mm"));
    p.save();
    p.translate(whole.left() + 10 * k, area.center().y());
    p.rotate(-90);
    p.drawText(QRectF(-60 * k, -8 * k, 120 * k, 16 * k), Qt::AlignCenter, QStringLiteral("depth, mm"));
    p.restore();

    if (st.colour_bar) {
        const QRectF bar(area.right() + 22 * k, area.top() + 4 * k, 14 * k, std::min(area.height() - 8 * k, 320 * k));
        drawColourBar(p, bar, sc, st);
    }
    if (st.scale_bar) {
        const double len_mm = niceStep(br.x() - tl.x(), 5);
        const double len_px = len_mm * vt.pixelsPerMm();
        const QPointF a(area.right() - 16 * k - len_px, area.bottom() - 16 * k);
        p.setPen(Qt::NoPen);
        p.setBrush(QColor(10, 12, 16, 190));
        p.drawRoundedRect(QRectF(a.x() - 8 * k, a.y() - 20 * k, len_px + 16 * k, 30 * k), 3 * k, 3 * k);
        p.setPen(QPen(Qt::white, 2.5 * k));
        p.drawLine(a, a + QPointF(len_px, 0));
        p.drawLine(a + QPointF(0, -4 * k), a + QPointF(0, 4 * k));
        p.drawLine(a + QPointF(len_px, -4 * k), a + QPointF(len_px, 4 * k));
        p.drawText(QRectF(a.x(), a.y() - 19 * k, len_px, 14 * k), Qt::AlignCenter, QStringLiteral("%1 mm").arg(len_mm));
    }
    if (!st.caption.isEmpty()) {
        p.setPen(st.axis);
        p.setFont(captionFont(st));
        double y = area.bottom() + 6 * k;
        for (const auto& line : st.caption) {
            p.drawText(QRectF(area.left(), y, whole.width() - area.left(), 16 * k), Qt::AlignLeft | Qt::AlignVCenter, line);
            y += 18 * k;
        }
    }
    p.restore();
}

}  // namespace umbra::ui
