// SPDX-License-Identifier: MIT
#include "ui/agreement/agreement_dialog.h"

#include <QDialogButtonBox>
#include <QFileDialog>
#include <QFileInfo>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QListWidget>
#include <QPushButton>
#include <QTabWidget>
#include <QTableWidget>
#include <QVBoxLayout>

#include "core/case_file.h"
#include "ui/practice/bland_altman_plot.h"

namespace umbra::ui {

AgreementDialog::AgreementDialog(QWidget* parent) : QDialog(parent) {
    setWindowTitle(tr("Inter-reader agreement"));
    auto* lay = new QVBoxLayout(this);
    auto* top = new QHBoxLayout;
    list_ = new QListWidget;
    list_->setMaximumHeight(90);
    top->addWidget(list_, 1);
    auto* side = new QVBoxLayout;
    auto* add = new QPushButton(tr("Add cases…"));
    auto* remove = new QPushButton(tr("Remove"));
    side->addWidget(add);
    side->addWidget(remove);
    side->addStretch();
    top->addLayout(side);
    lay->addLayout(top);
    summary_ = new QLabel(tr("Pick two or more cases read independently on the same captures (e.g. a case and its blind copy, read by another reader)."));
    summary_->setWordWrap(true);
    summary_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    lay->addWidget(summary_);
    tabs_ = new QTabWidget;
    plot_ = new BlandAltmanPlot;
    lay->addWidget(tabs_, 1);
    auto* bb = new QDialogButtonBox(QDialogButtonBox::Close);
    connect(bb, &QDialogButtonBox::rejected, this, &QDialog::reject);
    lay->addWidget(bb);
    connect(add, &QPushButton::clicked, this, &AgreementDialog::addCases);
    connect(remove, &QPushButton::clicked, this, [this] {
        const int r = list_->currentRow();
        if (r < 0) return;
        paths_.removeAt(r);
        setCases(paths_);
    });
    resize(860, 720);
}

void AgreementDialog::addCases() {
    const QStringList more = QFileDialog::getOpenFileNames(this, tr("Cases to compare"), QString(), tr("Umbra cases (*.umbracase)"));
    if (more.isEmpty()) return;
    setCases(paths_ + more);
}

QString AgreementDialog::summaryText() const { return summary_->text(); }

bool AgreementDialog::setCases(const QStringList& paths) {
    paths_ = paths;
    list_->clear();
    for (int i = 0; i < paths_.size(); ++i) list_->addItem(tr("reader %1: %2").arg(i + 1).arg(paths_[i]));
    recompute();
    return result_.has_value();
}

namespace {

QTableWidget* tableOf(const core::ReportTable& t) {
    auto* w = new QTableWidget(static_cast<int>(t.rows.size()), static_cast<int>(t.header.size()));
    QStringList h;
    for (const auto& s : t.header) h << QString::fromStdString(s);
    w->setHorizontalHeaderLabels(h);
    for (size_t r = 0; r < t.rows.size(); ++r)
        for (size_t c = 0; c < t.rows[r].size() && c < t.header.size(); ++c)
            w->setItem(static_cast<int>(r), static_cast<int>(c), new QTableWidgetItem(QString::fromStdString(t.rows[r][c])));
    w->verticalHeader()->hide();
    w->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    w->setEditTriggers(QAbstractItemView::NoEditTriggers);
    return w;
}

}  // namespace

void AgreementDialog::recompute() {
    result_.reset();
    while (tabs_->count() > 0) {
        QWidget* w = tabs_->widget(0);
        tabs_->removeTab(0);
        if (w != plot_) w->deleteLater();
    }
    if (paths_.size() < 2) {
        summary_->setText(tr("Pick at least two cases."));
        return;
    }
    try {
        std::vector<core::CaseDocument> cases;
        std::vector<std::string> names;
        for (const QString& p : paths_) {
            cases.push_back(core::loadCase(p.toStdString()));
            names.push_back(QFileInfo(p).fileName().toStdString());
        }
        result_ = core::compareCases(cases, names);
    } catch (const std::exception& e) {
        summary_->setText(tr("Cannot compare: %1").arg(QString::fromUtf8(e.what())));
        return;
    }
    const core::ReportSection s = core::agreementReportSection(*result_);
    QStringList para;
    for (const auto& p : s.paragraphs) para << QString::fromStdString(p);
    summary_->setText(para.join("\n"));
    for (const auto& t : s.tables) tabs_->addTab(tableOf(t), QString::fromStdString(t.caption).section(',', 0, 0));
    if (!result_->sizes.empty()) {
        const auto& sz = result_->sizes.front();
        plot_->setData(sz.ba, tr("mean of the two readings of %1 (mm)").arg(QString::fromStdString(sz.quantity)),
                       tr("later reader − reader 1 (mm)"), tr("mm"));
        tabs_->addTab(plot_, tr("Sizes (Bland–Altman)"));
    }
}

}  // namespace umbra::ui
