// SPDX-License-Identifier: MIT
#pragma once
// Inter-reader agreement view: pick two or more cases read on the same captures; shows the
// counts, kappa, the confusion tables and the Bland–Altman plot of matched sizes
// (core/agreement.h).
#include <QDialog>
#include <QStringList>

#include <optional>

#include "core/agreement.h"

class QLabel;
class QListWidget;
class QTabWidget;

namespace umbra::ui {

class BlandAltmanPlot;

class AgreementDialog : public QDialog {
    Q_OBJECT
public:
    explicit AgreementDialog(QWidget* parent = nullptr);
    /// Cases to compare (paths); recomputes. Returns false (message shown in the dialog) on error.
    bool setCases(const QStringList& paths);
    const std::optional<core::AgreementResult>& result() const { return result_; }
    /// The message line (counts and kappa, or the error).
    QString summaryText() const;

private:
    void addCases();
    void recompute();

    QStringList paths_;
    std::optional<core::AgreementResult> result_;
    QListWidget* list_;
    QLabel* summary_;
    QTabWidget* tabs_;
    BlandAltmanPlot* plot_;
};

}  // namespace umbra::ui
