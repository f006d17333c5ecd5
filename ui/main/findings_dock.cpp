// SPDX-License-Identifier: MIT
#include "ui/main/findings_dock.h"

#include <QHBoxLayout>
#include <QLabel>
#include <QPushButton>
#include <QVBoxLayout>

#include "ui/calipers/measurement_table.h"
#include "ui/controller/case_controller.h"
#include "ui/findings/findings_pane.h"

namespace umbra::ui {

namespace {
std::vector<std::string> allMeasurementIds(const CaseController* ctl) {
    std::vector<std::string> ids;
    for (const auto& c : ctl->document().captures)
        for (const auto& m : c.measurements) ids.push_back(m.id);
    return ids;
}
}  // namespace

FindingsDocks buildFindingsDocks(CaseController* ctl, QWidget* parent) {
    auto* pane = new FindingsPane(parent);
    auto* table = new MeasurementTable(parent);

    // Controller -> widgets (setters never emit edits).
    auto refreshDocument = [ctl, pane] {
        pane->setDocument(ctl->document());
        pane->setKnownMeasurements(allMeasurementIds(ctl));
        pane->setTechnique(ctl->techniqueText());
    };
    QObject::connect(ctl, &CaseController::caseChanged, pane, refreshDocument);
    QObject::connect(ctl, &CaseController::captureChanged, pane, refreshDocument);
    // While the user types in the pane, the controller's findings already equal the pane's:
    // leave the editors alone then (no cursor jumps); undo/redo and other sources refresh it.
    QObject::connect(ctl, &CaseController::findingsChanged, pane, [ctl, pane] {
        if (!(pane->findings() == ctl->findings())) pane->setFindings(ctl->findings());
    });
    QObject::connect(ctl, &CaseController::imageChanged, pane, [ctl, pane] { pane->setTechnique(ctl->techniqueText()); });
    QObject::connect(ctl, &CaseController::recipeChanged, pane, [ctl, pane] { pane->setTechnique(ctl->techniqueText()); });

    auto refreshTable = [ctl, table] {
        std::map<std::string, std::vector<core::Quantity>> given;
        for (const auto& m : ctl->measurements())
            if (core::isImageSizing(m.kind)) given[m.id] = ctl->quantities(m);
        table->setMeasurements(ctl->measurements(), ctl->uncertaintyModel(), given);
        table->selectMeasurement(ctl->selectedMeasurement());
    };
    QObject::connect(ctl, &CaseController::measurementsChanged, table, [ctl, pane, refreshTable] {
        refreshTable();
        pane->setKnownMeasurements(allMeasurementIds(ctl));
    });
    QObject::connect(ctl, &CaseController::captureChanged, table, refreshTable);
    QObject::connect(ctl, &CaseController::imageChanged, table, refreshTable);  // pixel size may change; sizing reads the image
    QObject::connect(ctl, &CaseController::selectionChanged, table, [table](const QString& id) { table->selectMeasurement(id); });

    // Widgets -> controller (undoable edits).
    QObject::connect(pane, &FindingsPane::findingsEdited, ctl,
                     [ctl](const std::vector<core::Finding>& fs, const QString& what) { ctl->editFindings(fs, what); });
    QObject::connect(pane, &FindingsPane::caseTextEdited, ctl, [ctl](const core::CaseDocument& d) { ctl->setCaseText(d); });
    QObject::connect(pane, &FindingsPane::findingSelected, ctl, [ctl](const QString& id) {
        // Show the finding's first measurement (and its frame).
        for (const auto& f : ctl->findings())
            if (QString::fromStdString(f.id) == id && !f.indication.measurement_ids.empty()) {
                const auto* m = ctl->measurement(f.indication.measurement_ids.front());
                if (!m) return;
                ctl->setCurrentFrame(m->frame_index);
                ctl->setSelectedMeasurement(QString::fromStdString(m->id));
            }
    });
    QObject::connect(table, &MeasurementTable::selected, ctl, [ctl](const QString& id) {
        if (const auto* m = ctl->measurement(id.toStdString())) ctl->setCurrentFrame(m->frame_index);
        ctl->setSelectedMeasurement(id);
    });
    QObject::connect(table, &MeasurementTable::labelEdited, ctl,
                     [ctl](const QString& id, const QString& t) { ctl->relabelMeasurement(id.toStdString(), t.toStdString()); });
    QObject::connect(table, &MeasurementTable::deleteRequested, ctl,
                     [ctl](const QString& id) { ctl->deleteMeasurement(id.toStdString()); });

    // Findings whose numbers no longer match their measurement (recipe change, moved points):
    // a banner above the pane until the user accepts the new values.
    auto* holder = new QWidget(parent);
    auto* lay = new QVBoxLayout(holder);
    lay->setContentsMargins(0, 0, 0, 0);
    lay->setSpacing(2);
    auto* banner = new QWidget(holder);
    banner->setObjectName(QStringLiteral("outOfDateBanner"));
    banner->setStyleSheet(QStringLiteral("#outOfDateBanner { background: #5a4312; }"));
    auto* blay = new QHBoxLayout(banner);
    blay->setContentsMargins(6, 3, 6, 3);
    auto* text = new QLabel(banner);
    text->setWordWrap(true);
    auto* accept = new QPushButton(QObject::tr("Use new values"), banner);
    blay->addWidget(text, 1);
    blay->addWidget(accept);
    banner->hide();
    lay->addWidget(banner);
    lay->addWidget(pane, 1);
    auto refreshBanner = [ctl, banner, text] {
        const auto ids = ctl->outOfDateFindings();
        if (ids.empty()) {
            banner->hide();
            return;
        }
        QStringList names;
        for (const auto& id : ids)
            for (const auto& f : ctl->findings())
                if (f.id == id) names << QStringLiteral("F%1").arg(f.number);
        text->setText(QObject::tr("Out of date: %1 — the linked measurement now gives other numbers (recipe or points changed).")
                          .arg(names.join(", ")));
        banner->show();
    };
    QObject::connect(accept, &QPushButton::clicked, ctl, [ctl] {
        for (const auto& id : ctl->outOfDateFindings()) ctl->acceptMeasuredValues(id);
    });
    for (auto sig : {&CaseController::measurementsChanged, &CaseController::findingsChanged, &CaseController::imageChanged})
        QObject::connect(ctl, sig, banner, refreshBanner);

    refreshDocument();
    refreshTable();
    return {holder, table};
}

}  // namespace umbra::ui
