// SPDX-License-Identifier: MIT
#pragma once
// Practice mode panel: the structures to measure (labels only: the answers stay hidden until
// Submit), labelling of the selected measurement, Submit (locks the attempt, scores it against
// the answer file and appends it to the trainee's practice log), the results, and the progress
// view. Scoring and the log are Qt-free (core/practice.h).
#include <QString>
#include <QWidget>

#include <optional>

#include "core/practice.h"

class QComboBox;
class QLabel;
class QListWidget;
class QPushButton;
class QTableWidget;

namespace umbra::ui {

class CaseController;

class PracticePanel : public QWidget {
    Q_OBJECT
public:
    explicit PracticePanel(CaseController* ctl, QWidget* parent = nullptr);

    /// Starts an attempt on the open capture with `set`'s structures; attempts go to
    /// `log_folder`/<trainee file name>.
    void start(const core::PracticeSet& set, const QString& trainee, const QString& log_folder, const QString& set_title);
    bool active() const { return set_.has_value(); }
    bool submitted() const { return submitted_; }
    /// Scores the labelled measurements of the active capture, saves the attempt and shows the
    /// results. False (with `why`) when nothing is labelled with a structure, already submitted,
    /// or the log cannot be written.
    bool submit(QString* why = nullptr);
    /// Leaves practice mode (another capture or case was opened): no set, unlocked.
    void stop();
    /// Clears the measurements (undoable) and unlocks for another attempt.
    void newAttempt();
    /// Labels the selected measurement with structure `label` (undoable relabel).
    bool labelSelected(const QString& label);
    const core::PracticeAttempt& lastAttempt() const { return attempt_; }
    const core::PracticeLog& log() const { return log_; }
    QTableWidget* resultsTable() const { return results_; }
    /// Text shown above the results (summary), for tests.
    QString summaryText() const;
    /// Opens the progress view (modal when `modal`); returns the dialog (owned by this panel).
    QWidget* showProgress(bool modal = true);
    const QString& trainee() const { return trainee_; }
    const QString& logFolder() const { return folder_; }

signals:
    /// The attempt was submitted (true) or a new one started (false).
    void lockedChanged(bool locked);

private:
    void refresh();
    void showResults();

    CaseController* ctl_;
    std::optional<core::PracticeSet> set_;
    QString trainee_, folder_, title_;
    bool submitted_ = false;
    core::PracticeAttempt attempt_;
    core::PracticeLog log_;
    QLabel* header_;
    QListWidget* tasks_;
    QComboBox* label_combo_;
    QPushButton* apply_label_;
    QPushButton* submit_;
    QPushButton* again_;
    QPushButton* progress_;
    QLabel* summary_;
    QTableWidget* results_;
};

}  // namespace umbra::ui
