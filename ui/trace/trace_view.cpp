// SPDX-License-Identifier: MIT
#include "ui/trace/trace_view.h"

#include <QCheckBox>
#include <QDoubleSpinBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QFontMetricsF>
#include <QPainter>
#include <QPainterPath>
#include <QSpinBox>
#include <QVBoxLayout>

#include <algorithm>
#include <cmath>

#include "core/distance_amplitude.h"
#include "ui/controller/case_controller.h"
#include "ui/viewer/scene_painter.h"

namespace umbra::ui {

TracePlot::TracePlot(QWidget* parent) : QWidget(parent) { setMinimumHeight(120); }

void TracePlot::setTrace(std::vector<double> depth_mm, std::vector<float> db, double floor_db, double level_db,
                         double cursor_depth_mm, const QString& title, double top_db, const QString& unit) {
    depth_ = std::move(depth_mm);
    db_ = std::move(db);
    top_ = top_db;
    floor_ = std::min(top_ - 1.0, floor_db);
    unit_ = unit;
    level_ = level_db;
    cursor_ = cursor_depth_mm;
    title_ = title;
    update();
}

void TracePlot::setCurve(CurveOverlay curve) {
    curve_ = std::move(curve);
    update();
}

void TracePlot::setRf(std::vector<float> rf, double t0_us, double dt_us, const QString& title) {
    rf_ = std::move(rf);
    rf_t0_ = t0_us;
    rf_dt_ = dt_us;
    rf_title_ = title;
    update();
}

void TracePlot::paintEvent(QPaintEvent*) {
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing);
    p.fillRect(rect(), QColor(250, 250, 248));
    const QColor axis(90, 96, 106), grid(226, 228, 232);
    const bool with_rf = !rf_.empty();
    QRectF all = QRectF(rect()).adjusted(48, 18, -12, -24);
    QRectF a = all, b;
    if (with_rf) {
        a.setBottom(all.top() + all.height() * 0.58 - 10);
        b = QRectF(all.left(), a.bottom() + 30, all.width(), all.bottom() - a.bottom() - 30);
    }
    QFont f = p.font();
    f.setPointSizeF(8);
    p.setFont(f);
    p.setPen(axis);
    p.drawText(QRectF(a.left(), 2, a.width(), 14), Qt::AlignLeft | Qt::AlignVCenter, title_);
    if (depth_.size() < 2 || db_.size() != depth_.size()) {
        p.drawText(a, Qt::AlignCenter, tr("Move the cursor over the image to see the trace at that column."));
        return;
    }
    const double z0 = depth_.front(), z1 = depth_.back();
    auto X = [&](double z) { return a.left() + (z - z0) / (z1 - z0) * a.width(); };
    auto Y = [&](double db) { return a.top() + (top_ - db) / (top_ - floor_) * a.height(); };
    // Grid and ticks.
    const double sz = niceStep(z1 - z0, std::max(2, static_cast<int>(a.width() / 70)));
    for (double z = std::ceil(z0 / sz) * sz; z <= z1 + 1e-9; z += sz) {
        p.setPen(grid);
        p.drawLine(QPointF(X(z), a.top()), QPointF(X(z), a.bottom()));
        p.setPen(axis);
        p.drawText(QRectF(X(z) - 25, a.bottom() + 2, 50, 14), Qt::AlignCenter, QString::number(z, 'g', 5));
    }
    const double span = top_ - floor_;
    const double sd = span <= 30 ? 6 : span <= 60 ? 10 : 20;
    for (double d = std::floor(top_ / sd) * sd; d >= floor_ - 1e-9; d -= sd) {
        p.setPen(grid);
        p.drawLine(QPointF(a.left(), Y(d)), QPointF(a.right(), Y(d)));
        p.setPen(axis);
        p.drawText(QRectF(a.left() - 44, Y(d) - 7, 40, 14), Qt::AlignRight | Qt::AlignVCenter, QString::number(d, 'f', 0));
    }
    p.drawText(QRectF(a.left(), 2, a.width(), 14), Qt::AlignRight | Qt::AlignVCenter, tr("%1 (vertical) against depth, mm").arg(unit_));
    p.setPen(axis);
    p.drawRect(a);
    // Trace.
    QPainterPath path;
    for (size_t i = 0; i < depth_.size(); ++i) {
        const QPointF pt(X(depth_[i]), Y(std::clamp<double>(db_[i], floor_, top_)));
        if (i == 0) path.moveTo(pt);
        else path.lineTo(pt);
    }
    p.setPen(QPen(QColor(31, 95, 158), 1.4));
    p.drawPath(path);
    const bool with_curve = curve_.depth_mm.size() >= 2 && curve_.db.size() == curve_.depth_mm.size();
    if (with_curve) {
        // Depths the curve's points do not cover: shaded, and said so.
        const QColor shade(120, 120, 120, 36);
        const double c0 = std::clamp(curve_.covered_from_mm, z0, z1), c1 = std::clamp(curve_.covered_to_mm, z0, z1);
        if (c0 > z0) p.fillRect(QRectF(QPointF(X(z0), a.top()), QPointF(X(c0), a.bottom())), shade);
        if (c1 < z1) p.fillRect(QRectF(QPointF(X(c1), a.top()), QPointF(X(z1), a.bottom())), shade);
        p.setPen(QColor(90, 90, 90));
        if (c1 < z1 && X(z1) - X(c1) > 70)
            p.drawText(QRectF(X(c1), a.bottom() - 16, X(z1) - X(c1), 14), Qt::AlignCenter, tr("outside curve"));
        if (c0 > z0 && X(c0) - X(z0) > 70)
            p.drawText(QRectF(X(z0), a.bottom() - 16, X(c0) - X(z0), 14), Qt::AlignCenter, tr("outside curve"));
        // The curve: solid where its points cover the depth, dotted where the end level is held.
        auto curvePath = [&](double offset, bool inside) {
            QPainterPath cp;
            bool open = false;
            for (size_t i = 0; i < curve_.depth_mm.size(); ++i) {
                const double z = curve_.depth_mm[i];
                const bool in = z >= curve_.covered_from_mm - 1e-9 && z <= curve_.covered_to_mm + 1e-9;
                if (in != inside) {
                    open = false;
                    continue;
                }
                const QPointF pt(X(z), Y(std::clamp<double>(curve_.db[i] + offset, floor_, top_)));
                if (!open) cp.moveTo(pt);
                else cp.lineTo(pt);
                open = true;
            }
            return cp;
        };
        const QColor cc(22, 122, 74);
        p.setPen(QPen(cc, 2.0));
        p.drawPath(curvePath(0, true));
        p.setPen(QPen(cc, 1.4, Qt::DotLine));
        p.drawPath(curvePath(0, false));
        p.setPen(cc);
        p.drawText(QRectF(a.right() - 160, a.top() + 2, 156, 14), Qt::AlignRight | Qt::AlignVCenter, tr("distance–amplitude curve"));
    }
    // Reporting level: a horizontal line, or the curve shifted by the level.
    QPen lp(QColor(196, 64, 40), 1.2, Qt::DashLine);
    p.setPen(lp);
    double ly = Y(std::clamp(level_, floor_, top_));
    if (with_curve && curve_.level_follows_curve) {
        QPainterPath lpath;
        for (size_t i = 0; i < curve_.depth_mm.size(); ++i) {
            const QPointF pt(X(curve_.depth_mm[i]), Y(std::clamp<double>(curve_.db[i] + level_, floor_, top_)));
            if (i == 0) lpath.moveTo(pt);
            else lpath.lineTo(pt);
        }
        p.drawPath(lpath);
        ly = Y(std::clamp<double>(curve_.db.front() + level_, floor_, top_));
    } else {
        p.drawLine(QPointF(a.left(), ly), QPointF(a.right(), ly));
    }
    // Label at the left end (near field: the trace is usually low there), on its own background.
    const QString lt = with_curve && curve_.level_follows_curve ? tr("reporting level: curve %1 dB").arg(level_, 0, 'f', 1)
                                                                : tr("reporting level %1 dB").arg(level_, 0, 'f', 1);
    QRectF lr = QFontMetricsF(p.font()).boundingRect(lt).adjusted(-3, -1, 3, 1);
    lr.moveTopLeft(QPointF(a.left() + 4, ly - lr.height() - 2));
    if (lr.top() < a.top()) lr.moveTop(ly + 2);
    p.fillRect(lr, QColor(250, 250, 248, 220));
    p.drawText(lr, Qt::AlignCenter, lt);
    if (cursor_ >= z0 && cursor_ <= z1) {
        p.setPen(QPen(QColor(120, 120, 120), 1, Qt::DotLine));
        p.drawLine(QPointF(X(cursor_), a.top()), QPointF(X(cursor_), a.bottom()));
    }
    if (with_rf && rf_.size() > 1) {
        p.setPen(axis);
        p.drawText(QRectF(b.left(), b.top() - 16, b.width(), 14), Qt::AlignLeft | Qt::AlignVCenter, rf_title_);
        float m = 0;
        for (float v : rf_) m = std::max(m, std::abs(v));
        if (m <= 0) m = 1;
        const double t1 = rf_t0_ + rf_dt_ * static_cast<double>(rf_.size() - 1);
        auto XT = [&](double t) { return b.left() + (t - rf_t0_) / (t1 - rf_t0_) * b.width(); };
        p.setPen(grid);
        p.drawLine(QPointF(b.left(), b.center().y()), QPointF(b.right(), b.center().y()));
        const double st = niceStep(t1 - rf_t0_, std::max(2, static_cast<int>(b.width() / 70)));
        p.setPen(axis);
        for (double t = std::ceil(rf_t0_ / st) * st; t <= t1 + 1e-12; t += st)
            p.drawText(QRectF(XT(t) - 25, b.bottom() + 2, 50, 14), Qt::AlignCenter, QString::number(t, 'g', 5));
        p.drawText(QRectF(b.left(), b.top() - 16, b.width(), 14), Qt::AlignRight | Qt::AlignVCenter, tr("time, µs"));
        p.drawRect(b);
        QPainterPath rp;
        const size_t n = rf_.size();
        const size_t stride = std::max<size_t>(1, n / static_cast<size_t>(std::max(1.0, b.width() * 2)));
        for (size_t i = 0; i < n; i += stride) {
            const QPointF pt(XT(rf_t0_ + rf_dt_ * static_cast<double>(i)), b.center().y() - rf_[i] / m * b.height() / 2);
            if (i == 0) rp.moveTo(pt);
            else rp.lineTo(pt);
        }
        p.setPen(QPen(QColor(70, 70, 70), 1));
        p.drawPath(rp);
    }
}

TraceView::TraceView(CaseController* controller, QWidget* parent) : QWidget(parent), ctl_(controller) {
    auto* v = new QVBoxLayout(this);
    v->setContentsMargins(4, 2, 4, 2);
    auto* bar = new QHBoxLayout;
    level_ = new QDoubleSpinBox;
    level_->setRange(-80, 0);
    level_->setDecimals(1);
    level_->setSingleStep(1);
    level_->setValue(-12);
    level_->setSuffix(" dB");
    level_->setToolTip(tr("Reporting level drawn on the trace: dB relative to the case's distance–amplitude curve "
                          "(Tools → Add to distance–amplitude curve), or to the frame peak without one "
                          "(a view setting; the written procedure states the real one)"));
    re_curve_ = new QCheckBox(tr("dB re curve at each depth"));
    re_curve_->setChecked(true);
    re_curve_->setToolTip(tr("With a distance–amplitude curve: on, the trace is in dB re the curve at each depth (the curve "
                             "is the 0 dB line); off, in dB re the curve's shallowest point, with the curve drawn falling"));
    re_curve_->setVisible(false);
    rf_on_ = new QCheckBox(tr("Raw RF of transmit"));
    rf_on_->setToolTip(tr("Show the recorded trace of one transmit-receive pair of this frame"));
    tx_ = new QSpinBox;
    rx_ = new QSpinBox;
    tx_->setToolTip(tr("Transmit event (0-based)"));
    rx_->setToolTip(tr("Receive channel (0-based)"));
    bar->addWidget(new QLabel(tr("Reporting level")));
    bar->addWidget(level_);
    bar->addSpacing(16);
    bar->addWidget(re_curve_);
    bar->addSpacing(16);
    bar->addWidget(rf_on_);
    bar->addWidget(tx_);
    bar->addWidget(new QLabel(tr("receive")));
    bar->addWidget(rx_);
    bar->addStretch();
    v->addLayout(bar);
    plot_ = new TracePlot;
    v->addWidget(plot_, 1);
    connect(level_, &QDoubleSpinBox::valueChanged, this, &TraceView::refresh);
    connect(ctl_, &CaseController::imageChanged, this, &TraceView::refresh);
    connect(ctl_, &CaseController::curveChanged, this, &TraceView::refresh);
    connect(re_curve_, &QCheckBox::toggled, this, &TraceView::refresh);
    connect(ctl_, &CaseController::recipeChanged, this, &TraceView::refresh);
    connect(ctl_, &CaseController::captureChanged, this, [this] {
        const auto& h = ctl_->header();
        tx_->setRange(0, std::max<int>(0, static_cast<int>(h.transmits()) - 1));
        rx_->setRange(0, std::max<int>(0, static_cast<int>(h.receives()) - 1));
        have_x_ = false;
        refresh();
        refreshRf();
    });
    connect(ctl_, &CaseController::frameChanged, this, &TraceView::refreshRf);
    connect(rf_on_, &QCheckBox::toggled, this, &TraceView::refreshRf);
    connect(tx_, &QSpinBox::valueChanged, this, &TraceView::refreshRf);
    connect(rx_, &QSpinBox::valueChanged, this, &TraceView::refreshRf);
}

double TraceView::reportingLevelDb() const { return level_->value(); }

void TraceView::setReCurve(bool on) { re_curve_->setChecked(on); }
bool TraceView::reCurve() const { return re_curve_->isChecked(); }

void TraceView::setCursor(double x_mm, double depth_mm) {
    x_mm_ = x_mm;
    depth_mm_ = depth_mm;
    have_x_ = true;
    refresh();
}

void TraceView::refresh() {
    const core::Frame* f = ctl_->envelope();
    const auto& db = ctl_->db();
    if (!f || f->nx() < 2 || db.size() != f->nx() * f->nz()) {
        plot_->setTrace({}, {}, -ctl_->dynamicRangeDb(), level_->value(), -1, tr("Trace view"));
        plot_->setCurve({});
        return;
    }
    if (!have_x_) {
        // Until the cursor visits the image, follow the column of the strongest echo.
        size_t best = 0;
        for (size_t i = 1; i < db.size(); ++i)
            if (db[i] > db[best]) best = i;
        x_mm_ = f->x_m[best % f->nx()] * 1e3;
    }
    const double dx = (f->x_m[1] - f->x_m[0]) * 1e3;
    const long ix = std::clamp<long>(std::lround((x_mm_ - f->x_m[0] * 1e3) / dx), 0, static_cast<long>(f->nx()) - 1);
    std::vector<double> z(f->nz());
    std::vector<float> col(f->nz());
    const QString title =
        tr("Amplitude at x = %1 mm, frame %2").arg(f->x_m[static_cast<size_t>(ix)] * 1e3, 0, 'f', 2).arg(ctl_->currentFrame() + 1);
    const auto& curve = ctl_->curve();
    double from_m = 0, to_m = 0;  // depths the curve's points cover
    bool covered = false;
    if (curve)
        if (const auto r = core::depthRange(*curve)) covered = true, from_m = r->first, to_m = r->second;
    re_curve_->setVisible(covered);
    plot_->setToolTip(ctl_->curveWarning());
    if (curve && covered) {
        // dB of the envelope (on the curve's basis) re the curve at each depth, or re the curve's
        // shallowest point with the curve drawn as its line; the reporting level is re the curve.
        const bool re = re_curve_->isChecked();
        const double l0 = core::dacLevel(*curve, from_m)->level_db;
        TracePlot::CurveOverlay ov;
        ov.covered_from_mm = from_m * 1e3;
        ov.covered_to_mm = to_m * 1e3;
        ov.level_follows_curve = !re;
        float top = -1e30f;
        for (size_t iz = 0; iz < f->nz(); ++iz) {
            z[iz] = f->z_m[iz] * 1e3;
            const auto r = ctl_->dbReCurveAt(static_cast<size_t>(ix), iz);
            const double shift = re ? 0.0 : core::dacLevel(*curve, f->z_m[iz])->level_db - l0;
            col[iz] = r ? static_cast<float>(r->db + shift) : -1e3f;
            top = std::max(top, col[iz]);
            ov.depth_mm.push_back(z[iz]);
            ov.db.push_back(static_cast<float>(shift));
        }
        const double t = std::max(0.0, std::ceil(std::max<double>(top, level_->value()) / 6.0) * 6.0);
        const QString unit = re ? ctl_->amplitudeUnit()
                                : tr("dB re DAC at %1 mm (%2)").arg(from_m * 1e3, 0, 'f', 1).arg(QString::fromStdString(curve->label));
        plot_->setTrace(std::move(z), std::move(col), t - ctl_->dynamicRangeDb(), level_->value(), depth_mm_, title, t, unit);
        plot_->setCurve(std::move(ov));
        return;
    }
    plot_->setCurve({});
    for (size_t iz = 0; iz < f->nz(); ++iz) {
        z[iz] = f->z_m[iz] * 1e3;
        col[iz] = db[iz * f->nx() + static_cast<size_t>(ix)];
    }
    plot_->setTrace(std::move(z), std::move(col), -ctl_->dynamicRangeDb(), level_->value(), depth_mm_, title);
}

void TraceView::refreshRf() {
    tx_->setEnabled(rf_on_->isChecked());
    rx_->setEnabled(rf_on_->isChecked());
    if (!rf_on_->isChecked() || !ctl_->hasCapture()) {
        plot_->setRf({}, 0, 1, {});
        return;
    }
    const auto& h = ctl_->header();
    const size_t tx = static_cast<size_t>(tx_->value()), rx = static_cast<size_t>(rx_->value());
    std::vector<float> rf;
    try {
        rf = ctl_->rfTrace(tx, rx);
    } catch (const std::exception& e) {
        plot_->setRf({}, 0, 1, QString::fromStdString(e.what()));
        return;
    }
    const double fs = h.receive.sampling_frequency_hz > 0 ? h.receive.sampling_frequency_hz : 1;
    const double t0 = tx < h.receive.start_time_s.size() ? h.receive.start_time_s[tx] : 0;
    plot_->setRf(std::move(rf), t0 * 1e6, 1e6 / fs,
                 tr("Raw RF, frame %1, transmit %2, receive %3 (%4)")
                     .arg(ctl_->currentFrame() + 1)
                     .arg(tx)
                     .arg(rx)
                     .arg(QString::fromStdString(h.rf_units.empty() ? "a.u." : h.rf_units)));
}

}  // namespace umbra::ui
