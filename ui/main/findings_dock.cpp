// SPDX-License-Identifier: MIT
#include "ui/main/findings_dock.h"

#include <QHeaderView>
#include <QLabel>
#include <QListWidget>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QTableWidget>
#include <QVBoxLayout>

#include "ui/controller/case_controller.h"
#include "ui/viewer/scene_painter.h"

namespace umbra::ui {

namespace {

QWidget* simpleFindings(CaseController* ctl, QWidget* parent) {
    auto* w = new QWidget(parent);
    auto* v = new QVBoxLayout(w);
    auto* caution = new QLabel(QObject::tr("Umbra is an aid: written procedures, the applicable codes and qualified, "
                                           "licensed professionals decide."));
    caution->setWordWrap(true);
    caution->setStyleSheet("color:#5b4a14; background:#fbf3da; border:1px solid #eadba8; padding:4px 6px; border-radius:3px;");
    v->addWidget(caution);
    auto* tech = new QPlainTextEdit;
    tech->setReadOnly(true);
    tech->setMaximumHeight(110);
    v->addWidget(new QLabel(QObject::tr("Technique")));
    v->addWidget(tech);
    auto* add = new QPushButton(QObject::tr("Add finding from selected measurement"));
    v->addWidget(add);
    auto* list = new QListWidget;
    v->addWidget(list, 1);
    QObject::connect(add, &QPushButton::clicked, w, [ctl] {
        if (!ctl->selectedMeasurement().isEmpty()) ctl->addFindingFromMeasurement(ctl->selectedMeasurement().toStdString());
    });
    auto refresh = [ctl, tech, list] {
        tech->setPlainText(ctl->techniqueText());
        list->clear();
        for (const auto& f : ctl->findings())
            list->addItem(QStringLiteral("F%1  %2 — %3")
                              .arg(f.number)
                              .arg(QString::fromStdString(f.indication.location),
                                   QString::fromStdString(core::interpretationLabel(f.interpretation))));
    };
    QObject::connect(ctl, &CaseController::findingsChanged, w, refresh);
    QObject::connect(ctl, &CaseController::imageChanged, w, refresh);
    QObject::connect(ctl, &CaseController::recipeChanged, w, refresh);
    return w;
}

QWidget* simpleTable(CaseController* ctl, QWidget* parent) {
    auto* t = new QTableWidget(parent);
    t->setColumnCount(4);
    t->setHorizontalHeaderLabels({QObject::tr("Id"), QObject::tr("Kind"), QObject::tr("Label"), QObject::tr("Values")});
    t->horizontalHeader()->setStretchLastSection(true);
    t->setSelectionBehavior(QAbstractItemView::SelectRows);
    t->setEditTriggers(QAbstractItemView::NoEditTriggers);
    t->verticalHeader()->hide();
    auto refresh = [ctl, t] {
        const auto& ms = ctl->measurements();
        t->setRowCount(static_cast<int>(ms.size()));
        const auto u = ctl->uncertaintyModel();
        for (int i = 0; i < static_cast<int>(ms.size()); ++i) {
            const auto& m = ms[static_cast<size_t>(i)];
            std::string vals;
            try {
                vals = core::formatQuantities(core::evaluate(m, u));
            } catch (const std::exception& e) {
                vals = e.what();
            }
            t->setItem(i, 0, new QTableWidgetItem(QString::fromStdString(m.id)));
            t->setItem(i, 1, new QTableWidgetItem(QString::fromStdString(core::kindName(m.kind))));
            t->setItem(i, 2, new QTableWidgetItem(QString::fromStdString(m.label)));
            t->setItem(i, 3, new QTableWidgetItem(QString::fromStdString(vals)));
        }
    };
    QObject::connect(ctl, &CaseController::measurementsChanged, t, refresh);
    QObject::connect(ctl, &CaseController::imageChanged, t, refresh);
    QObject::connect(t, &QTableWidget::cellClicked, t, [ctl, t](int row, int) {
        if (auto* it = t->item(row, 0)) ctl->setSelectedMeasurement(it->text());
    });
    return t;
}

}  // namespace

FindingsDocks buildFindingsDocks(CaseController* controller, QWidget* parent) {
    FindingsDocks d;
    d.findings = simpleFindings(controller, parent);
    d.measurements = simpleTable(controller, parent);
    return d;
}

}  // namespace umbra::ui
