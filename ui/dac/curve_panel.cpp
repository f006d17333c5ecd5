// SPDX-License-Identifier: MIT
#include "ui/dac/curve_panel.h"

#include <QFileInfo>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QPushButton>
#include <QTableWidget>
#include <QVBoxLayout>

#include <cmath>

#include "core/distance_amplitude.h"
#include "core/measurement.h"
#include "ui/controller/case_controller.h"

namespace umbra::ui {

namespace {
QString q(const std::string& s) { return QString::fromStdString(s); }
}  // namespace

CurvePanel::CurvePanel(CaseController* controller, QWidget* parent) : QWidget(parent), ctl_(controller) {
    auto* v = new QVBoxLayout(this);
    v->setContentsMargins(6, 4, 6, 4);
    intro_ = new QLabel(tr("No distance–amplitude curve. On the reference-block capture, draw an extent box around one "
                           "side-drilled hole's echo, keep it selected and press Add; repeat for each hole."));
    intro_->setWordWrap(true);
    v->addWidget(intro_);
    auto* row = new QHBoxLayout;
    row->addWidget(new QLabel(tr("Reflectors")));
    label_ = new QLineEdit;
    label_->setObjectName(QStringLiteral("curveLabel"));
    label_->setPlaceholderText(tr("e.g. Ø2.5 mm side-drilled holes, reference block"));
    row->addWidget(label_, 1);
    v->addLayout(row);
    info_ = new QLabel;
    info_->setWordWrap(true);
    info_->setStyleSheet("color: #3b4250;");
    v->addWidget(info_);
    warning_ = new QLabel;
    warning_->setObjectName(QStringLiteral("curveWarning"));
    warning_->setWordWrap(true);
    warning_->setStyleSheet("color: #b3261e; font-weight: bold;");
    warning_->hide();
    v->addWidget(warning_);

    table_ = new QTableWidget(0, ColumnCount);
    table_->setHorizontalHeaderLabels({tr("Depth"), tr("x"), tr("Level"), tr("Point"), tr("Capture"), tr("Frame")});
    table_->horizontalHeaderItem(LevelColumn)
        ->setToolTip(tr("Peak amplitude of the point's echo in dB re the shallowest point (envelope before TCG). The grid "
                        "can lose up to its amplitude fidelity (status bar) between pixels."));
    table_->horizontalHeaderItem(DepthColumn)->setToolTip(tr("Depth of the echo's peak below the array face"));
    table_->setSelectionBehavior(QAbstractItemView::SelectRows);
    table_->setSelectionMode(QAbstractItemView::SingleSelection);
    table_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    table_->verticalHeader()->hide();
    table_->horizontalHeader()->setStretchLastSection(true);
    v->addWidget(table_, 1);

    auto* buttons = new QHBoxLayout;
    add_ = new QPushButton(tr("Add selected measurement"));
    add_->setToolTip(tr("The peak of the echo inside the selected box (or at the selected depth marker) on this frame "
                        "becomes a point of the curve"));
    remove_ = new QPushButton(tr("Remove point"));
    tcg_ = new QPushButton(tr("Make TCG from curve"));
    tcg_->setToolTip(tr("Set the TCG to a gain curve that raises each depth by the curve's fall from its shallowest point, "
                        "so equal holes display equal"));
    clear_ = new QPushButton(tr("Clear curve"));
    for (auto* b : {add_, remove_, tcg_, clear_}) buttons->addWidget(b);
    buttons->addStretch();
    v->addLayout(buttons);

    connect(add_, &QPushButton::clicked, this, &CurvePanel::addRequested);
    connect(tcg_, &QPushButton::clicked, this, &CurvePanel::makeTcgRequested);
    connect(remove_, &QPushButton::clicked, this, &CurvePanel::removeSelected);
    connect(clear_, &QPushButton::clicked, this,
            [this] { ctl_->editCurve(std::nullopt, tr("Clear the distance–amplitude curve")); });
    connect(label_, &QLineEdit::editingFinished, this, [this] {
        if (ctl_->curve() && label_->text().toStdString() != ctl_->curve()->label) ctl_->relabelCurve(label_->text());
    });
    connect(table_, &QTableWidget::itemSelectionChanged, this, [this] { remove_->setEnabled(!table_->selectedItems().isEmpty()); });
    connect(ctl_, &CaseController::curveChanged, this, &CurvePanel::refresh);
    connect(ctl_, &CaseController::recipeChanged, this, &CurvePanel::refresh);
    connect(ctl_, &CaseController::imageChanged, this, &CurvePanel::refresh);  // pixel size for the uncertainties
    connect(ctl_, &CaseController::caseChanged, this, &CurvePanel::refresh);
    refresh();
}

void CurvePanel::removeSelected() {
    const auto rows = table_->selectionModel() ? table_->selectionModel()->selectedRows() : QModelIndexList{};
    if (rows.isEmpty()) return;
    ctl_->removeCurvePoint(static_cast<size_t>(rows.front().row()));
}

void CurvePanel::refresh() {
    const auto& c = ctl_->curve();
    intro_->setVisible(!c);
    label_->setEnabled(c.has_value());
    clear_->setEnabled(c.has_value());
    tcg_->setEnabled(c && c->basis == core::AmplitudeBasis::BeforeTcg && c->points.size() >= 2);
    if (!label_->hasFocus()) label_->setText(c ? q(c->label) : QString());
    const QString w = ctl_->curveWarning();
    warning_->setText(w);
    warning_->setVisible(!w.isEmpty());
    const int keep = table_->currentRow();
    table_->setRowCount(0);
    if (!c) {
        info_->clear();
        remove_->setEnabled(false);
        return;
    }
    const auto range = core::depthRange(*c);
    QString info = tr("%n point(s)", "", static_cast<int>(c->points.size()));
    if (range) info += tr(", %1 to %2 mm").arg(range->first * 1e3, 0, 'f', 1).arg(range->second * 1e3, 0, 'f', 1);
    info += tr("; amplitudes read %1").arg(QString::fromUtf8(core::basisName(c->basis)));
    if (!c->recipe_fingerprint.empty()) info += tr("; recipe fingerprint %1").arg(q(c->recipe_fingerprint));
    info += tr(". Fit: dB linear in depth between points; above and below them the end level is held and readings are "
               "flagged outside.");
    if (c->basis == core::AmplitudeBasis::AfterTcg)
        info += tr(" Converted from a single amplitude reference (read after TCG): clear it to pick a new curve.");
    info_->setText(info);

    const core::UncertaintyModel u = ctl_->uncertaintyModel();
    const double a0 = c->points.empty() ? 1.0 : c->points.front().amplitude;
    const auto doc = ctl_->document();
    for (const auto& p : c->points) {
        const int r = table_->rowCount();
        table_->insertRow(r);
        core::Measurement marker;
        marker.kind = core::MeasurementKind::DepthMarker;
        marker.points = {{p.x_m * 1e3, p.depth_m * 1e3}};
        const auto qs = core::evaluate(marker, u);
        const QString depth = qs.empty() ? QString::number(p.depth_m * 1e3, 'f', 2) + " mm" : q(core::formatQuantity(qs.front()));
        core::Quantity xq{"x", p.x_m * 1e3, u.pixel_x_mm / 2, "mm", u.pixel_x_mm / 2, 0};
        auto* di = new QTableWidgetItem(depth);
        if (!qs.empty()) di->setToolTip(q(core::quantityTooltip(qs.front(), u)));
        table_->setItem(r, DepthColumn, di);
        table_->setItem(r, XColumn, new QTableWidgetItem(q(core::formatQuantity(xq))));
        table_->setItem(r, LevelColumn, new QTableWidgetItem(QStringLiteral("%1%2 dB").arg(p.amplitude >= a0 ? "+" : "").arg(20 * std::log10(p.amplitude / a0), 0, 'f', 1)));
        table_->item(r, LevelColumn)->setToolTip(tr("linear amplitude %1 (capture units)").arg(p.amplitude, 0, 'g', 5));
        table_->setItem(r, LabelColumn, new QTableWidgetItem(q(p.label)));
        QString cap = p.capture_sha256.empty() ? tr("unknown") : q(p.capture_sha256.substr(0, 12));
        for (const auto& cc : doc.captures)
            if (!p.capture_sha256.empty() && cc.sha256 == p.capture_sha256) cap = QFileInfo(q(cc.path)).fileName();
        auto* ci = new QTableWidgetItem(cap);
        ci->setToolTip(tr("SHA-256 %1").arg(q(p.capture_sha256)));
        table_->setItem(r, CaptureColumn, ci);
        table_->setItem(r, FrameColumn, new QTableWidgetItem(QString::number(p.frame + 1)));
    }
    table_->resizeColumnsToContents();
    if (keep >= 0 && keep < table_->rowCount()) table_->selectRow(keep);
    remove_->setEnabled(!table_->selectedItems().isEmpty());
}

}  // namespace umbra::ui
