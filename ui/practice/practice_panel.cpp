// SPDX-License-Identifier: MIT
#include "ui/practice/practice_panel.h"

#include <QComboBox>
#include <QDialog>
#include <QDialogButtonBox>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QListWidget>
#include <QPushButton>
#include <QScrollArea>
#include <QTableWidget>
#include <QTimer>
#include <QVBoxLayout>

#include <cmath>
#include <set>

#include "core/error.h"
#include "core/uncertainty.h"
#include "ui/controller/case_controller.h"
#include "ui/practice/bland_altman_plot.h"
#include "ui/practice/error_trend_plot.h"

namespace umbra::ui {

PracticePanel::PracticePanel(CaseController* ctl, QWidget* parent) : QWidget(parent), ctl_(ctl) {
    auto* lay = new QVBoxLayout(this);
    header_ = new QLabel(tr("No practice set open (Practice → Start practice set…)."));
    header_->setWordWrap(true);
    lay->addWidget(header_);
    lay->addWidget(new QLabel(tr("Measure each structure and label the measurement with its name:")));
    tasks_ = new QListWidget;
    tasks_->setMaximumHeight(100);
    lay->addWidget(tasks_);
    auto* row = new QHBoxLayout;
    label_combo_ = new QComboBox;
    apply_label_ = new QPushButton(tr("Label selected"));
    apply_label_->setToolTip(tr("Give the selected measurement this structure's name (undoable)"));
    row->addWidget(label_combo_, 1);
    row->addWidget(apply_label_);
    lay->addLayout(row);
    auto* buttons = new QHBoxLayout;
    submit_ = new QPushButton(tr("Submit"));
    submit_->setToolTip(tr("Lock this attempt and compare each measurement with the true size"));
    again_ = new QPushButton(tr("New attempt"));
    progress_ = new QPushButton(tr("Progress…"));
    buttons->addWidget(submit_);
    buttons->addWidget(again_);
    buttons->addWidget(progress_);
    lay->addLayout(buttons);
    summary_ = new QLabel;
    summary_->setWordWrap(true);
    lay->addWidget(summary_);
    results_ = new QTableWidget(0, 5);
    results_->setHorizontalHeaderLabels({tr("structure · target"), tr("measured"), tr("true"), tr("error"), tr("error / U")});
    results_->setMinimumHeight(190);
    results_->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    results_->verticalHeader()->hide();
    results_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    results_->hide();
    lay->addWidget(results_, 1);
    connect(apply_label_, &QPushButton::clicked, this, [this] { labelSelected(label_combo_->currentText()); });
    connect(submit_, &QPushButton::clicked, this, [this] {
        QString why;
        if (!submit(&why)) summary_->setText(why);
    });
    connect(again_, &QPushButton::clicked, this, &PracticePanel::newAttempt);
    connect(progress_, &QPushButton::clicked, this, [this] { showProgress(true); });
    connect(ctl_, &CaseController::measurementsChanged, this, &PracticePanel::refresh);
    connect(ctl_, &CaseController::selectionChanged, this, &PracticePanel::refresh);
    refresh();
}

void PracticePanel::start(const core::PracticeSet& set, const QString& trainee, const QString& log_folder,
                          const QString& set_title) {
    set_ = set;
    trainee_ = trainee;
    folder_ = log_folder;
    title_ = set_title;
    submitted_ = false;
    attempt_ = {};
    log_ = core::loadPracticeLog(folder_.toStdString(), trainee_.toStdString());
    label_combo_->clear();
    for (const auto& l : set.structureLabels()) label_combo_->addItem(QString::fromStdString(l));
    results_->hide();
    summary_->clear();
    refresh();
    emit lockedChanged(false);
}

bool PracticePanel::labelSelected(const QString& label) {
    if (!set_ || submitted_ || label.isEmpty()) return false;
    const QString id = ctl_->selectedMeasurement();
    if (id.isEmpty() || !ctl_->measurement(id.toStdString())) {
        summary_->setText(tr("Select a measurement first."));
        return false;
    }
    ctl_->relabelMeasurement(id.toStdString(), label.toStdString());
    return true;
}

void PracticePanel::refresh() {
    if (!set_) {
        for (QWidget* w : std::initializer_list<QWidget*>{label_combo_, apply_label_, submit_, again_, progress_}) w->setEnabled(false);
        return;
    }
    header_->setText(tr("<b>%1</b> — trainee %2%3")
                         .arg(title_.toHtmlEscaped(), trainee_.toHtmlEscaped(),
                              submitted_ ? tr(" — <b>submitted</b> (locked)") : QString()));
    std::set<std::string> labelled;
    for (const auto& m : ctl_->measurements()) labelled.insert(m.label);
    tasks_->clear();
    const auto labels = set_->structureLabels();
    const auto tasks = set_->tasks();
    for (size_t i = 0; i < labels.size(); ++i) {
        const bool done = labelled.count(labels[i]) != 0;
        auto* item = new QListWidgetItem((done ? QString::fromUtf8("✔ ") : QString::fromUtf8("○ ")) + QString::fromStdString(tasks[i]));
        tasks_->addItem(item);
    }
    label_combo_->setEnabled(!submitted_);
    apply_label_->setEnabled(!submitted_ && !ctl_->selectedMeasurement().isEmpty());
    submit_->setEnabled(!submitted_);
    again_->setEnabled(submitted_);
    progress_->setEnabled(true);
}

bool PracticePanel::submit(QString* why) {
    auto fail = [&](const QString& s) {
        if (why) *why = s;
        return false;
    };
    if (!set_) return fail(tr("No practice set is open."));
    if (submitted_) return fail(tr("This attempt is already submitted; start a new attempt."));
    std::vector<core::PracticeReading> readings;
    for (const auto& m : ctl_->measurements()) {
        auto r = core::practiceReadings(m, ctl_->quantities(m));
        readings.insert(readings.end(), r.begin(), r.end());
    }
    const auto doc = ctl_->document();
    const std::string sha = doc.captures.empty() ? std::string() : doc.captures[doc.active_capture].sha256;
    core::PracticeAttempt a = core::scoreAttempt(*set_, readings, sha, core::utcNow());
    if (a.results.empty())
        return fail(tr("No measurement is labelled with a structure's name yet: select a measurement and use "
                       "“Label selected”."));
    try {
        log_ = core::appendAttempt(folder_.toStdString(), trainee_.toStdString(), a);
    } catch (const std::exception& e) {
        return fail(tr("The attempt could not be saved: %1").arg(QString::fromUtf8(e.what())));
    }
    attempt_ = a;
    submitted_ = true;
    showResults();
    refresh();
    // Inside a scroll area (the practice dock): bring the results into view.
    for (QWidget* w = parentWidget(); w; w = w->parentWidget())
        if (auto* sa = qobject_cast<QScrollArea*>(w)) {
            QTimer::singleShot(0, sa, [sa, t = results_] { sa->ensureWidgetVisible(t, 0, 0); });
            break;
        }
    emit lockedChanged(true);
    return true;
}

void PracticePanel::showResults() {
    results_->setRowCount(0);
    auto mm = [](double v, double u) {
        const auto r = core::roundToUncertainty(v, u);
        return QString::fromStdString(r.value_text);
    };
    int within = 0;
    for (const auto& r : attempt_.results) {
        const int row = results_->rowCount();
        results_->insertRow(row);
        const double U = r.expanded_mm;
        const auto rm = core::roundToUncertainty(r.measured_mm, U);
        const QString measured = QString::fromStdString(rm.value_text + " ± " + rm.uncertainty_text) + " mm";
        const QString err = mm(r.error_mm, U) + " mm";
        QString in_u = QStringLiteral("—");
        if (r.error_in_u) {
            in_u = QString::number(*r.error_in_u, 'f', 1) + " U";
            if (std::abs(*r.error_in_u) <= 1.0) ++within;
        }
        const QString items[] = {QString::fromStdString(r.structure + " · " + r.target), measured,
                                 QString::number(r.true_mm, 'g', 6) + " mm", err, in_u};
        for (int c = 0; c < 5; ++c) {
            auto* it = new QTableWidgetItem(items[c]);
            it->setToolTip(tr("%1 of measurement %2").arg(QString::fromStdString(r.quantity), QString::fromStdString(r.measurement_id)));
            if (c == 4 && r.error_in_u) it->setBackground(std::abs(*r.error_in_u) <= 1.0 ? QColor(215, 240, 215) : QColor(250, 225, 200));
            results_->setItem(row, c, it);
        }
    }
    results_->show();
    QString s = tr("Attempt %1 by %2 submitted (synthetic practice data). %3 of %4 readings lie within their expanded "
                   "uncertainty U (k = 2) of the true value.")
                    .arg(log_.attempts.size())
                    .arg(trainee_.toHtmlEscaped())
                    .arg(within)
                    .arg(attempt_.results.size());
    if (!attempt_.unmeasured.empty()) {
        QStringList l;
        for (const auto& u : attempt_.unmeasured) l << QString::fromStdString(u);
        s += tr(" Not measured: %1.").arg(l.join(", "));
    }
    if (!attempt_.unknown_labels.empty()) {
        QStringList l;
        for (const auto& u : attempt_.unknown_labels) l << QString::fromStdString(u);
        s += tr(" Labels naming no structure (not scored): %1.").arg(l.join(", "));
    }
    if (!set_->note().empty()) s += "\n" + QString::fromStdString(set_->note());
    summary_->setText(s);
}

QString PracticePanel::summaryText() const { return summary_->text(); }

void PracticePanel::stop() {
    set_.reset();
    submitted_ = false;
    attempt_ = {};
    results_->hide();
    summary_->clear();
    tasks_->clear();
    label_combo_->clear();
    header_->setText(tr("No practice set open (Practice → Start practice set…)."));
    refresh();
    emit lockedChanged(false);
}

void PracticePanel::newAttempt() {
    if (!set_) return;
    ctl_->setMeasurements({});
    submitted_ = false;
    attempt_ = {};
    results_->hide();
    summary_->clear();
    refresh();
    emit lockedChanged(false);
}

QWidget* PracticePanel::showProgress(bool modal) {
    auto* dlg = new QDialog(this);
    dlg->setAttribute(Qt::WA_DeleteOnClose, modal);
    dlg->setWindowTitle(tr("Practice progress — %1").arg(trainee_));
    auto* lay = new QVBoxLayout(dlg);
    const core::PracticeProgress p = core::practiceProgress(log_);
    auto* info = new QLabel(
        p.ba.n == 0 ? tr("No submitted attempts yet.")
                    : tr("%1 attempts, %2 readings (synthetic practice data). Measured − true: %3 (Bland & Altman 1986).")
                          .arg(p.attempts)
                          .arg(p.ba.n)
                          .arg(QString::fromStdString(core::formatBlandAltman(p.ba, "mm"))));
    info->setWordWrap(true);
    lay->addWidget(info);
    auto* ba = new BlandAltmanPlot;
    ba->setObjectName("practiceBlandAltman");
    ba->setData(p.ba, tr("mean of measured and true (mm)"), tr("measured − true (mm)"), tr("mm"));
    lay->addWidget(ba, 3);
    lay->addWidget(new QLabel(tr("Error per structure over attempts:")));
    auto* trend = new ErrorTrendPlot;
    trend->setObjectName("practiceTrend");
    trend->setSeries(p.series, p.attempts);
    lay->addWidget(trend, 2);
    auto* bb = new QDialogButtonBox(QDialogButtonBox::Close);
    connect(bb, &QDialogButtonBox::rejected, dlg, &QDialog::reject);
    lay->addWidget(bb);
    dlg->resize(760, 760);
    if (modal) dlg->exec();
    else dlg->show();
    return dlg;
}

}  // namespace umbra::ui
