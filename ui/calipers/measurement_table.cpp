// SPDX-License-Identifier: MIT
#include "ui/calipers/measurement_table.h"

#include <QHeaderView>
#include <QKeyEvent>

namespace umbra::ui {
namespace {

QTableWidgetItem* readOnly(const QString& text) {
    auto* item = new QTableWidgetItem(text);
    item->setFlags(item->flags() & ~Qt::ItemIsEditable);
    return item;
}

}  // namespace

MeasurementTable::MeasurementTable(QWidget* parent) : QTableWidget(parent) {
    setColumnCount(ColumnCount);
    setHorizontalHeaderLabels({tr("Id"), tr("Kind"), tr("Label"), tr("Values"), tr("Frame")});
    horizontalHeader()->setSectionResizeMode(QuantitiesColumn, QHeaderView::Stretch);
    horizontalHeader()->setSectionResizeMode(IdColumn, QHeaderView::ResizeToContents);
    horizontalHeader()->setSectionResizeMode(KindColumn, QHeaderView::ResizeToContents);
    horizontalHeader()->setSectionResizeMode(FrameColumn, QHeaderView::ResizeToContents);
    verticalHeader()->hide();
    // Rows grow with the wrapped values instead of cutting them off.
    verticalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    setSelectionBehavior(QAbstractItemView::SelectRows);
    setSelectionMode(QAbstractItemView::SingleSelection);
    setEditTriggers(QAbstractItemView::DoubleClicked | QAbstractItemView::EditKeyPressed |
                    QAbstractItemView::SelectedClicked);
    setWordWrap(true);

    connect(this, &QTableWidget::itemChanged, this, [this](QTableWidgetItem* item) {
        if (updating_ || item->column() != LabelColumn) return;
        emit labelEdited(idAt(item->row()), item->text());
    });
    connect(this, &QTableWidget::itemSelectionChanged, this, [this] {
        if (updating_) return;
        emit selected(selectedId());
    });
}

QString MeasurementTable::idAt(int row) const {
    if (row < 0 || row >= rowCount() || !item(row, IdColumn)) return {};
    return item(row, IdColumn)->text();
}

QString MeasurementTable::selectedId() const {
    const auto rows = selectionModel() ? selectionModel()->selectedRows() : QModelIndexList{};
    return rows.isEmpty() ? QString() : idAt(rows.first().row());
}

void MeasurementTable::setMeasurements(const std::vector<core::Measurement>& ms, const core::UncertaintyModel& u,
                                       const std::map<std::string, std::vector<core::Quantity>>& given) {
    const QString keep = selectedId();
    ++updating_;
    setRowCount(static_cast<int>(ms.size()));
    for (int row = 0; row < static_cast<int>(ms.size()); ++row) {
        const core::Measurement& m = ms[static_cast<size_t>(row)];
        QString values, tip;
        try {
            const auto g = given.find(m.id);
            const auto qs = g != given.end() ? g->second : core::evaluate(m, u);
            values = QString::fromStdString(core::formatQuantities(qs));
            QStringList tips;
            for (const auto& qy : qs) tips << QString::fromStdString(core::quantityTooltip(qy, u));
            tip = tips.join(QStringLiteral("\n\n"));
        } catch (const std::exception& e) {
            values = tr("cannot be measured: %1").arg(QString::fromUtf8(e.what()));
        }
        setItem(row, IdColumn, readOnly(QString::fromStdString(m.id)));
        setItem(row, KindColumn, readOnly(QString::fromStdString(core::kindName(m.kind))));
        auto* label = new QTableWidgetItem(QString::fromStdString(m.label));
        label->setFlags(label->flags() | Qt::ItemIsEditable);
        label->setToolTip(tr("Double-click to edit the label"));
        setItem(row, LabelColumn, label);
        auto* v = readOnly(values);
        v->setToolTip(tip);
        setItem(row, QuantitiesColumn, v);
        auto* f = readOnly(QString::number(m.frame_index + 1));
        f->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
        setItem(row, FrameColumn, f);
    }
    selectMeasurement(keep);
    --updating_;
}

void MeasurementTable::selectMeasurement(const QString& id) {
    ++updating_;
    clearSelection();
    if (!id.isEmpty())
        for (int row = 0; row < rowCount(); ++row)
            if (idAt(row) == id) {
                selectRow(row);
                setCurrentCell(row, LabelColumn, QItemSelectionModel::NoUpdate);
                break;
            }
    --updating_;
}

void MeasurementTable::keyPressEvent(QKeyEvent* event) {
    if ((event->key() == Qt::Key_Delete || event->key() == Qt::Key_Backspace) && state() != EditingState) {
        const QString id = selectedId();
        if (!id.isEmpty()) {
            emit deleteRequested(id);
            event->accept();
            return;
        }
    }
    QTableWidget::keyPressEvent(event);
}

}  // namespace umbra::ui
