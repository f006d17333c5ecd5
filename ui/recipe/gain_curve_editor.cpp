// SPDX-License-Identifier: MIT
#include "ui/recipe/gain_curve_editor.h"

#include <QHBoxLayout>
#include <QHeaderView>
#include <QPushButton>
#include <QStringList>
#include <QTableWidget>
#include <QVBoxLayout>

namespace umbra::ui {

namespace {
QString cellText(const QTableWidget* t, int row, int col) {
    const QTableWidgetItem* it = t->item(row, col);
    const QString s = it ? it->text().trimmed() : QString();
    return s.isEmpty() ? QStringLiteral("0") : s;
}
}  // namespace

GainCurveEditor::GainCurveEditor(QWidget* parent) : QWidget(parent) {
    auto* v = new QVBoxLayout(this);
    v->setContentsMargins(0, 0, 0, 0);
    v->setSpacing(2);
    table_ = new QTableWidget(0, 2);
    table_->setObjectName(QStringLiteral("gainCurveTable"));
    table_->setHorizontalHeaderLabels({tr("depth, mm"), tr("gain, dB")});
    table_->horizontalHeader()->setSectionResizeMode(QHeaderView::Stretch);
    table_->verticalHeader()->hide();
    table_->verticalHeader()->setDefaultSectionSize(table_->fontMetrics().height() + 6);
    table_->setMaximumHeight(4 * (table_->fontMetrics().height() + 6) + table_->horizontalHeader()->sizeHint().height() + 4);
    table_->setToolTip(tr("Gain at each depth; linear between points, held beyond the first and last. Depths must increase."));
    v->addWidget(table_);
    auto* h = new QHBoxLayout;
    add_ = new QPushButton(tr("Add point"));
    remove_ = new QPushButton(tr("Remove point"));
    add_->setToolTip(tr("A new point 5 mm below the last, with its gain"));
    remove_->setToolTip(tr("Remove the selected point (one point always stays)"));
    h->addWidget(add_);
    h->addWidget(remove_);
    h->addStretch();
    v->addLayout(h);
    connect(add_, &QPushButton::clicked, this, &GainCurveEditor::addPoint);
    connect(remove_, &QPushButton::clicked, this, &GainCurveEditor::removePoint);
    connect(table_, &QTableWidget::itemChanged, this, [this] {
        if (!filling_) emit curveEdited(curve());
    });
}

void GainCurveEditor::setCurve(const QString& text) {
    filling_ = true;
    const QStringList items = text.split(',', Qt::SkipEmptyParts);
    table_->setRowCount(static_cast<int>(items.size()));
    for (int r = 0; r < static_cast<int>(items.size()); ++r) {
        const QStringList dg = items[r].split(':');
        table_->setItem(r, 0, new QTableWidgetItem(dg.value(0).trimmed()));
        table_->setItem(r, 1, new QTableWidgetItem(dg.value(1).trimmed()));
    }
    remove_->setEnabled(table_->rowCount() > 1);
    filling_ = false;
}

QString GainCurveEditor::curve() const {
    QStringList items;
    for (int r = 0; r < table_->rowCount(); ++r) items << cellText(table_, r, 0) + ':' + cellText(table_, r, 1);
    return items.join(',');
}

void GainCurveEditor::addPoint() {
    const int n = table_->rowCount();
    const double last_depth = n > 0 ? cellText(table_, n - 1, 0).toDouble() : -5.0;
    const QString gain = n > 0 ? cellText(table_, n - 1, 1) : QStringLiteral("0");
    filling_ = true;
    table_->insertRow(n);
    table_->setItem(n, 0, new QTableWidgetItem(QString::number(last_depth + 5.0, 'g', 6)));
    table_->setItem(n, 1, new QTableWidgetItem(gain));
    filling_ = false;
    remove_->setEnabled(table_->rowCount() > 1);
    emit curveEdited(curve());
}

void GainCurveEditor::removePoint() {
    if (table_->rowCount() <= 1) return;
    const int r = table_->currentRow() >= 0 ? table_->currentRow() : table_->rowCount() - 1;
    filling_ = true;
    table_->removeRow(r);
    filling_ = false;
    remove_->setEnabled(table_->rowCount() > 1);
    emit curveEdited(curve());
}

}  // namespace umbra::ui
