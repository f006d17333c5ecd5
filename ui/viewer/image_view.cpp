// SPDX-License-Identifier: MIT
#include "ui/viewer/image_view.h"

#include <QKeyEvent>
#include <QMouseEvent>
#include <QPainter>
#include <QWheelEvent>

#include <cmath>

#include "ui/controller/case_controller.h"

namespace umbra::ui {

QString toolName(Tool t) {
    switch (t) {
        case Tool::Select: return QStringLiteral("select");
        case Tool::Caliper: return QStringLiteral("caliper");
        case Tool::DepthMarker: return QStringLiteral("depth marker");
        case Tool::ExtentBox: return QStringLiteral("extent box");
        case Tool::Ellipse: return QStringLiteral("ellipse");
        case Tool::DropSizing: return QStringLiteral("-6 dB sizing");
        case Tool::Drop20Sizing: return QStringLiteral("-20 dB sizing");
        case Tool::TipSizing: return QStringLiteral("tip sizing");
    }
    return {};
}

Tool toolFromName(const QString& n) {
    for (Tool t : {Tool::Caliper, Tool::DepthMarker, Tool::ExtentBox, Tool::Ellipse, Tool::DropSizing, Tool::Drop20Sizing, Tool::TipSizing})
        if (toolName(t) == n) return t;
    return Tool::Select;
}

ImageView::ImageView(CaseController* controller, QWidget* parent) : QWidget(parent), ctl_(controller) {
    setMouseTracking(true);
    setFocusPolicy(Qt::StrongFocus);
    setMinimumSize(320, 240);
    setAttribute(Qt::WA_OpaquePaintEvent);
    connect(ctl_, &CaseController::imageChanged, this, &ImageView::onImageChanged);
    connect(ctl_, &CaseController::measurementsChanged, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::selectionChanged, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::findingsChanged, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::weldChanged, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::coverageReady, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::caseChanged, this, qOverload<>(&QWidget::update));
    connect(ctl_, &CaseController::captureChanged, this, [this] {
        last_extent_ = QRectF();
        pending_view_ = ctl_->viewState();
        setTool(toolFromName(QString::fromStdString(ctl_->viewState().tool)));
        update();
    });
}

void ImageView::setTool(Tool t) {
    if (t == tool_) return;
    tool_ = t;
    drag_ = Drag::None;
    drag_m_.reset();
    setCursor(t == Tool::Select ? Qt::ArrowCursor : Qt::CrossCursor);
    emit toolChanged(t);
    update();
}

core::ViewState ImageView::viewState() const {
    if (pending_view_) {  // not applied yet: the stored view is still the truth
        core::ViewState v = *pending_view_;
        v.frame = ctl_->currentFrame();
        v.tool = toolName(tool_).toStdString();
        return v;
    }
    core::ViewState v;
    v.frame = ctl_->currentFrame();
    v.zoom = vt_.zoom();
    v.centre_x_mm = vt_.centreMm().x();
    v.centre_z_mm = vt_.centreMm().y();
    v.tool = toolName(tool_).toStdString();
    return v;
}

void ImageView::restoreViewState(const core::ViewState& v) {
    pending_view_ = v;
    setTool(toolFromName(QString::fromStdString(v.tool)));
    if (ctl_->hasImage()) onImageChanged();
}

void ImageView::fitToWindow() {
    vt_.fit();
    emit viewChanged();
    update();
}

void ImageView::zoomBy(double f) {
    vt_.zoomAbout(vt_.viewport().center(), f);
    emit viewChanged();
    update();
}

QRectF ImageView::extentOfCurrentImage() const {
    const core::Frame* f = ctl_->envelope();
    if (!f || f->nx() == 0 || f->nz() == 0) return {};
    const double dx = f->nx() > 1 ? (f->x_m[1] - f->x_m[0]) * 1e3 : 0.1;
    const double dz = f->nz() > 1 ? (f->z_m[1] - f->z_m[0]) * 1e3 : 0.1;
    const double x0 = f->x_m.front() * 1e3 - dx / 2, x1 = f->x_m.back() * 1e3 + dx / 2;
    const double z0 = f->z_m.front() * 1e3 - dz / 2, z1 = f->z_m.back() * 1e3 + dz / 2;
    return QRectF(QPointF(x0, z0), QPointF(x1, z1));
}

void ImageView::onImageChanged() {
    const QRectF e = extentOfCurrentImage();
    if (!e.isNull() && e != last_extent_) {
        // A new image of the same capture (re-beamformed with another grid): keep the scale
        // (pixels per mm) and the centre the user chose, unless the view was at "fit".
        const bool had_image = !last_extent_.isNull() && !pending_view_;
        const bool was_fit = vt_.isFit();
        const double scale = vt_.pixelsPerMm();
        const QPointF centre = vt_.centreMm();
        vt_.setExtent(e.left(), e.right(), e.top(), e.bottom());
        updateLayout();
        if (had_image && !was_fit) {
            vt_.setZoom(1.0);
            vt_.setZoom(scale / vt_.pixelsPerMm());
            vt_.setCentreMm(centre);
        } else if (pending_view_ && pending_view_->zoom > 0 &&
                   !(pending_view_->centre_x_mm == 0 && pending_view_->centre_z_mm == 0 && pending_view_->zoom == 1)) {
            vt_.setZoom(pending_view_->zoom);
            vt_.setCentreMm(QPointF(pending_view_->centre_x_mm, pending_view_->centre_z_mm));
        } else {
            vt_.fit();
        }
        pending_view_.reset();
        last_extent_ = e;
        emit viewChanged();
    }
    update();
}

void ImageView::updateLayout() {
    // A view at "fit" stays fitted when the widget changes size (e.g. the views strip appears).
    const bool was_fit = !last_extent_.isNull() && vt_.isFit();
    vt_.setViewport(imageArea(QRectF(rect()), style_));
    if (was_fit) vt_.fit();
}

void ImageView::resizeEvent(QResizeEvent*) { updateLayout(); }

std::vector<core::Measurement> ImageView::shownMeasurements() const {
    std::vector<core::Measurement> out;
    for (const auto& m : ctl_->measurements()) {
        if (m.frame_index != ctl_->currentFrame()) continue;
        if (drag_m_ && drag_m_->id == m.id) continue;
        out.push_back(m);
    }
    if (drag_m_) out.push_back(*drag_m_);
    return out;
}

Scene ImageView::scene() const {
    Scene s;
    s.image = ctl_->hasImage() ? &ctl_->image() : nullptr;
    s.extent_mm = extentOfCurrentImage();
    s.dynamic_range_db = ctl_->dynamicRangeDb();
    s.colour_map = ctl_->colourMap();
    s.measurements = shownMeasurements();
    for (const auto& m : s.measurements)
        if (core::isImageSizing(m.kind)) {
            if (const auto d = ctl_->sizing(m); d && d->found) {
                s.sizings[m.id] = *d;
                s.quantities[m.id] = ctl_->quantities(m);
            }
        }
    if (show_weld_) s.weld = ctl_->weldOverlay();
    // Name the view wherever more than one is in play (a wedge, another view, a strip).
    if (ctl_->hasCapture() && (ctl_->largeView() != "L-L" || ctl_->header().medium.wedge || !ctl_->stripViews().empty()))
        s.view_label = tr("view %1").arg(QString::fromStdString(ctl_->largeView()));
    if (show_coverage_)
        if (const recon::CoverageMap* c = ctl_->coverageIfReady()) {
            std::vector<double> xs, zs;
            for (double v : c->x_m) xs.push_back(v * 1e3);
            for (double v : c->z_m) zs.push_back(v * 1e3);
            for (float level : {-6.0f, -12.0f}) s.coverage.emplace_back(level, isoSegments(xs, zs, c->db, level));
        }
    s.uncertainty = ctl_->uncertaintyModel();
    s.selected = ctl_->selectedMeasurement();
    for (const auto& f : ctl_->findings())
        for (const auto& id : f.indication.measurement_ids) s.finding_numbers[id] = f.number;
    if (!ctl_->captureProblem().isEmpty())
        s.message = ctl_->captureProblem() + tr("\n\nFile → Relocate capture… to point the case at it.");
    else if (!ctl_->hasCapture())
        s.message = tr("Open a capture (.h5), a case (.umbracase) or a DICOM image (.dcm) with File → Open (Ctrl+O), or drop the file here.");
    else
        s.message = tr("Reconstructing…");
    return s;
}

void ImageView::paintEvent(QPaintEvent*) {
    QPainter p(this);
    if (vt_.viewport() != imageArea(QRectF(rect()), style_)) updateLayout();
    const Scene s = scene();
    paintScene(p, QRectF(rect()), vt_, s, style_);
}

void ImageView::setCoverageVisible(bool on) {
    show_coverage_ = on;
    update();
}

void ImageView::setWeldVisible(bool on) {
    show_weld_ = on;
    update();
}

std::optional<float> ImageView::dbAt(const QPointF& mm) const {
    const core::Frame* f = ctl_->envelope();
    const auto& db = ctl_->db();
    if (!f || f->nx() < 2 || f->nz() < 2 || db.size() != f->nx() * f->nz()) return std::nullopt;
    const double dx = (f->x_m[1] - f->x_m[0]) * 1e3, dz = (f->z_m[1] - f->z_m[0]) * 1e3;
    const long ix = std::lround((mm.x() - f->x_m[0] * 1e3) / dx);
    const long iz = std::lround((mm.y() - f->z_m[0] * 1e3) / dz);
    if (ix < 0 || iz < 0 || ix >= static_cast<long>(f->nx()) || iz >= static_cast<long>(f->nz())) return std::nullopt;
    return db[static_cast<size_t>(iz) * f->nx() + static_cast<size_t>(ix)];
}

void ImageView::wheelEvent(QWheelEvent* e) {
    if (!ctl_->hasImage()) return;
    const double steps = e->angleDelta().y() / 120.0;
    vt_.zoomAbout(e->position(), std::pow(1.18, steps));
    emit viewChanged();
    update();
}

core::PointMm ImageView::toPoint(const QPointF& px) const {
    const QPointF mm = vt_.toMm(px);
    return {mm.x(), mm.y()};
}

std::optional<std::pair<std::string, int>> ImageView::hit(const QPointF& px) const {
    const double r = 7;
    // Handles first, the selected measurement before others.
    auto ms = shownMeasurements();
    std::stable_sort(ms.begin(), ms.end(), [&](const auto& a, const auto&) {
        return QString::fromStdString(a.id) == ctl_->selectedMeasurement();
    });
    for (const auto& m : ms)
        for (size_t i = 0; i < m.points.size(); ++i) {
            const QPointF h = vt_.toPixel(QPointF(m.points[i].x_mm, m.points[i].z_mm));
            if (std::abs(h.x() - px.x()) <= r && std::abs(h.y() - px.y()) <= r) return std::make_pair(m.id, static_cast<int>(i));
        }
    // Bodies: near a caliper line, inside a box or ellipse, near a depth marker's line.
    for (const auto& m : ms) {
        std::vector<QPointF> p;
        for (const auto& pt : m.points) p.push_back(vt_.toPixel(QPointF(pt.x_mm, pt.z_mm)));
        bool on = false;
        if (m.kind == core::MeasurementKind::Caliper && p.size() == 2) {
            const QPointF d = p[1] - p[0];
            const double l2 = d.x() * d.x() + d.y() * d.y();
            const double t = l2 > 0 ? std::clamp(QPointF::dotProduct(px - p[0], d) / l2, 0.0, 1.0) : 0;
            const QPointF q = p[0] + t * d;
            on = std::hypot(q.x() - px.x(), q.y() - px.y()) < 5;
        } else if (m.kind == core::MeasurementKind::DepthMarker && p.size() == 1) {
            on = std::abs(px.y() - p[0].y()) < 4;
        } else if ((m.kind == core::MeasurementKind::ExtentBox || core::isImageSizing(m.kind)) && p.size() == 2) {
            on = QRectF(p[0], p[1]).normalized().adjusted(-3, -3, 3, 3).contains(px);
        } else if (m.kind == core::MeasurementKind::Ellipse && p.size() == 3) {
            const QPointF a1 = p[1] - p[0], a2 = p[2] - p[0], d = px - p[0];
            const double ra2 = QPointF::dotProduct(a1, a1), rb2 = QPointF::dotProduct(a2, a2);
            if (ra2 > 0 && rb2 > 0) {
                const double u = QPointF::dotProduct(d, a1) / ra2, v = QPointF::dotProduct(d, a2) / rb2;
                on = u * u + v * v <= 1.0;
            }
        }
        if (on) return std::make_pair(m.id, -1);
    }
    return std::nullopt;
}

void ImageView::dragPoint(core::Measurement& m, int index, const core::PointMm& p) {
    if (index < 0 || index >= static_cast<int>(m.points.size())) return;
    if (m.kind == core::MeasurementKind::Ellipse && m.points.size() == 3) {
        const core::PointMm c = m.points[0];
        if (index == 0) {  // move the centre: the axes follow
            const double dx = p.x_mm - c.x_mm, dz = p.z_mm - c.z_mm;
            for (auto& q : m.points) q.x_mm += dx, q.z_mm += dz;
            return;
        }
        const int other = index == 1 ? 2 : 1;
        const double ox = m.points[other].x_mm - c.x_mm, oz = m.points[other].z_mm - c.z_mm;
        const double olen = std::hypot(ox, oz);
        if (index == 1) {
            // Axis 1 follows the cursor; axis 2 stays perpendicular with its length.
            m.points[1] = p;
            const double ax = p.x_mm - c.x_mm, az = p.z_mm - c.z_mm, alen = std::hypot(ax, az);
            if (alen > 0) m.points[2] = {c.x_mm - az / alen * olen, c.z_mm + ax / alen * olen};
        } else {
            // Axis 2 only changes length: project the cursor onto the perpendicular of axis 1.
            const double ax = m.points[1].x_mm - c.x_mm, az = m.points[1].z_mm - c.z_mm, alen = std::hypot(ax, az);
            if (alen > 0) {
                const double nx = -az / alen, nz = ax / alen;
                const double s = (p.x_mm - c.x_mm) * nx + (p.z_mm - c.z_mm) * nz;
                m.points[2] = {c.x_mm + nx * s, c.z_mm + nz * s};
            }
        }
        return;
    }
    m.points[static_cast<size_t>(index)] = p;
}

void ImageView::mousePressEvent(QMouseEvent* e) {
    setFocus();
    const QPointF px = e->position();
    drag_start_px_ = last_px_ = px;
    if (e->button() == Qt::MiddleButton || (e->button() == Qt::LeftButton && space_down_)) {
        drag_ = Drag::Pan;
        setCursor(Qt::ClosedHandCursor);
        return;
    }
    if (e->button() != Qt::LeftButton || !ctl_->hasImage()) return;
    if (tool_ == Tool::Select) {
        if (auto h = hit(px)) {
            ctl_->setSelectedMeasurement(QString::fromStdString(h->first));
            if (const auto* m = ctl_->measurement(h->first)) {
                drag_origin_ = *m;
                drag_m_ = *m;
                drag_index_ = h->second;
                drag_ = h->second >= 0 ? Drag::Handle : Drag::Body;
            }
        } else {
            ctl_->setSelectedMeasurement({});
            drag_ = Drag::Pan;
            setCursor(Qt::ClosedHandCursor);
        }
        update();
        return;
    }
    // A drawing tool on a handle of a shown measurement moves the handle (only an empty spot
    // starts a new measurement); bodies stay drawable-over so a box can be drawn inside a box.
    if (auto h = hit(px); h && h->second >= 0) {
        if (const auto* hm = ctl_->measurement(h->first)) {
            ctl_->setSelectedMeasurement(QString::fromStdString(h->first));
            drag_origin_ = *hm;
            drag_m_ = *hm;
            drag_index_ = h->second;
            drag_ = Drag::Handle;
            update();
            return;
        }
    }
    // Creating a measurement.
    core::Measurement m;
    m.frame_index = ctl_->currentFrame();
    const core::PointMm p = toPoint(px);
    switch (tool_) {
        case Tool::Caliper: m.kind = core::MeasurementKind::Caliper; m.points = {p, p}; drag_index_ = 1; break;
        case Tool::DepthMarker: m.kind = core::MeasurementKind::DepthMarker; m.points = {p}; drag_index_ = 0; break;
        case Tool::ExtentBox: m.kind = core::MeasurementKind::ExtentBox; m.points = {p, p}; drag_index_ = 1; break;
        case Tool::DropSizing: m.kind = core::MeasurementKind::DropSizing; m.points = {p, p}; drag_index_ = 1; break;
        case Tool::Drop20Sizing: m.kind = core::MeasurementKind::Drop20Sizing; m.points = {p, p}; drag_index_ = 1; break;
        case Tool::TipSizing: m.kind = core::MeasurementKind::TipSizing; m.points = {p, p}; drag_index_ = 1; break;
        case Tool::Ellipse: m.kind = core::MeasurementKind::Ellipse; m.points = {p, p, p}; drag_index_ = 1; break;
        case Tool::Select: break;
    }
    m.id = "(new)";
    drag_m_ = m;
    drag_ = Drag::Create;
    update();
}

void ImageView::mouseMoveEvent(QMouseEvent* e) {
    const QPointF px = e->position();
    const QPointF mm = vt_.toMm(px);
    emit cursorMoved(mm, ctl_->hasImage() && vt_.viewport().contains(px) && extentOfCurrentImage().contains(mm));
    switch (drag_) {
        case Drag::None:
            if (tool_ == Tool::Select) {
                setCursor(hit(px) ? Qt::PointingHandCursor : (space_down_ ? Qt::OpenHandCursor : Qt::ArrowCursor));
            } else {
                const auto h = hit(px);
                setCursor(h && h->second >= 0 ? Qt::SizeAllCursor : Qt::CrossCursor);
            }
            return;
        case Drag::Pan:
            vt_.panByPixels(px - last_px_);
            last_px_ = px;
            emit viewChanged();
            update();
            return;
        case Drag::Handle:
            dragPoint(*drag_m_, drag_index_, toPoint(px));
            break;
        case Drag::Body: {
            const QPointF d = vt_.toMm(px) - vt_.toMm(drag_start_px_);
            drag_m_->points = drag_origin_.points;
            for (auto& q : drag_m_->points) q.x_mm += d.x(), q.z_mm += d.y();
            break;
        }
        case Drag::Create: {
            const core::PointMm p = toPoint(px);
            if (drag_m_->kind == core::MeasurementKind::Ellipse) {
                const core::PointMm c = drag_m_->points[0];
                drag_m_->points[1] = p;
                // Axis 2 perpendicular, half as long while creating; its handle adjusts it later.
                const double ax = p.x_mm - c.x_mm, az = p.z_mm - c.z_mm;
                drag_m_->points[2] = {c.x_mm - az / 2, c.z_mm + ax / 2};
            } else {
                dragPoint(*drag_m_, drag_index_, p);
            }
            break;
        }
    }
    last_px_ = px;
    update();
}

void ImageView::mouseReleaseEvent(QMouseEvent* e) {
    const QPointF px = e->position();
    const Drag was = drag_;
    drag_ = Drag::None;
    if (was == Drag::Pan) {
        setCursor(tool_ == Tool::Select ? Qt::ArrowCursor : Qt::CrossCursor);
        return;
    }
    if (!drag_m_) return;
    core::Measurement m = *drag_m_;
    drag_m_.reset();
    const double moved = std::hypot(px.x() - drag_start_px_.x(), px.y() - drag_start_px_.y());
    if (was == Drag::Create) {
        // A click without a drag makes nothing, except for the one-point depth marker.
        if (m.kind == core::MeasurementKind::DepthMarker || moved >= 3) ctl_->addMeasurement(m);
    } else if ((was == Drag::Handle || was == Drag::Body) && moved >= 1) {
        ctl_->moveMeasurement(m.id, m.points);
    }
    update();
}

void ImageView::mouseDoubleClickEvent(QMouseEvent* e) {
    if (e->button() == Qt::LeftButton && tool_ == Tool::Select && !hit(e->position())) fitToWindow();
}

void ImageView::keyPressEvent(QKeyEvent* e) {
    if (e->key() == Qt::Key_Space && !e->isAutoRepeat()) {
        space_down_ = true;
        setCursor(Qt::OpenHandCursor);
        return;
    }
    if ((e->key() == Qt::Key_Delete || e->key() == Qt::Key_Backspace) && !ctl_->selectedMeasurement().isEmpty()) {
        ctl_->deleteMeasurement(ctl_->selectedMeasurement().toStdString());
        return;
    }
    if (e->key() == Qt::Key_Escape) {
        if (drag_m_) {
            drag_m_.reset();
            drag_ = Drag::None;
            update();
            return;
        }
        setTool(Tool::Select);
        return;
    }
    QWidget::keyPressEvent(e);
}

void ImageView::keyReleaseEvent(QKeyEvent* e) {
    if (e->key() == Qt::Key_Space && !e->isAutoRepeat()) {
        space_down_ = false;
        setCursor(tool_ == Tool::Select ? Qt::ArrowCursor : Qt::CrossCursor);
        return;
    }
    QWidget::keyReleaseEvent(e);
}

void ImageView::leaveEvent(QEvent*) { emit cursorMoved({}, false); }

}  // namespace umbra::ui
