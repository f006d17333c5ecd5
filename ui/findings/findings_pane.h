// SPDX-License-Identifier: MIT
#pragma once
// The findings pane (dock content): the caution line, case background, technique block, the
// list of findings and, for the selected one, three separate boxes — Indication, Interpretation,
// Evaluation — each opening only when the level before it is complete; pertinent negatives and
// the comparison with a prior examination.
//
// The pane edits a copy of the case document. Every user change emits edited(document) with
// the whole new document (and findingsEdited for changes to the findings list), so the main
// window can push an undo command and mark the case modified. Setters called by the program
// (setDocument, setFindings, setTechnique) never emit edited().
//
//   auto* pane = new FindingsPane;
//   pane->setDocument(ctl->document());
//   connect(pane, &FindingsPane::findingsEdited, ctl, &CaseController::editFindings);
#include <QString>
#include <QWidget>

#include <optional>
#include <vector>

#include "core/case_file.h"
#include "core/finding.h"
#include "core/measurement.h"

class QComboBox;
class QGroupBox;
class QLabel;
class QLineEdit;
class QListWidget;
class QListWidgetItem;
class QPlainTextEdit;
class QPushButton;
class QSpinBox;

namespace umbra::ui {

class FindingsPane : public QWidget {
    Q_OBJECT
public:
    explicit FindingsPane(QWidget* parent = nullptr);

    /// Replaces everything shown (texts, findings, technique). Keeps the selected finding when
    /// its id still exists. Does not emit edited().
    void setDocument(const core::CaseDocument& doc);
    /// The document as edited in the pane (captures and other fields passed through unchanged).
    const core::CaseDocument& document() const { return doc_; }
    /// Replaces only the findings (e.g. after undo). Does not emit edited().
    void setFindings(const std::vector<core::Finding>& findings);
    const std::vector<core::Finding>& findings() const { return doc_.findings; }
    /// Technique block text, filled by the caller from the capture and recipe; read-only here.
    void setTechnique(const QString& text);
    /// Measurements known to the case, used to check the ids typed under "Linked measurements".
    void setKnownMeasurements(const std::vector<std::string>& ids);

    /// Id of the selected finding ("" when none).
    QString selectedFindingId() const;
    void selectFinding(const QString& id);

    /// The caution shown at the top of the pane, always visible.
    static QString cautionText();

public slots:
    /// Adds an empty finding and selects it.
    void addFinding();
    /// Adds a finding pre-filled from a measurement: location, frame, x (centre), depth below the
    /// surface (shallowest point), length and height (extent in x and z), the link to the
    /// measurement. The description stays empty: the user describes what is seen.
    /// `frame_label` (e.g. "y = 10.0 mm") is added to the location when given.
    void addFindingFromMeasurement(const core::Measurement& m, double surface_z_mm = 0.0,
                                   const QString& frame_label = QString());
    /// Removes the selected finding (numbers of the others are kept).
    void removeSelectedFinding();

signals:
    /// Any user change; carries the whole new document.
    void edited(const core::CaseDocument& doc);
    /// A user change of the findings list; `what` names the edit for an undo entry.
    void findingsEdited(const std::vector<core::Finding>& findings, const QString& what);
    /// A user change of the case texts (background, negatives, prior comparison).
    void caseTextEdited(const core::CaseDocument& doc);
    /// The selected finding changed ("" = none).
    void findingSelected(const QString& id);

private:
    void buildUi();
    void refreshList();
    void showSelected();  ///< fills the three boxes from the selected finding
    void updateLocks();
    void updateHedgeNote();
    void updateLinkNote();
    void refreshNegatives();
    core::Finding* current();
    void findingChanged(const QString& what);  ///< after a field of the current finding changed
    void caseTextChanged();
    void onNumberEdited(QLineEdit* edit, std::optional<double> core::Indication::*field, const QString& what);

    core::CaseDocument doc_;
    std::vector<std::string> known_measurements_;
    bool known_set_ = false;
    QString selected_;
    int updating_ = 0;  ///< > 0 while the program fills widgets (no edits emitted)

    QLabel* caution_ = nullptr;
    QPlainTextEdit* background_ = nullptr;
    QPlainTextEdit* technique_ = nullptr;
    QListWidget* list_ = nullptr;
    QPushButton* add_ = nullptr;
    QPushButton* remove_ = nullptr;
    QWidget* editor_ = nullptr;
    QLabel* no_selection_ = nullptr;

    QGroupBox* indication_box_ = nullptr;
    QLineEdit* location_ = nullptr;
    QSpinBox* capture_ = nullptr;
    QSpinBox* frame_ = nullptr;
    QLineEdit* x_ = nullptr;
    QLineEdit* depth_ = nullptr;
    QLineEdit* length_ = nullptr;
    QLineEdit* height_ = nullptr;
    QLineEdit* peak_ = nullptr;
    QLineEdit* reference_ = nullptr;
    QLineEdit* links_ = nullptr;
    QLabel* link_note_ = nullptr;
    QPlainTextEdit* description_ = nullptr;
    QLabel* hedge_note_ = nullptr;

    QGroupBox* interpretation_box_ = nullptr;
    QWidget* interpretation_fields_ = nullptr;
    QLabel* interpretation_lock_ = nullptr;
    QComboBox* interpretation_ = nullptr;
    QLineEdit* reason_ = nullptr;

    QGroupBox* evaluation_box_ = nullptr;
    QWidget* evaluation_fields_ = nullptr;
    QLabel* evaluation_lock_ = nullptr;
    QComboBox* evaluation_ = nullptr;
    QLineEdit* criterion_ = nullptr;

    QListWidget* negatives_ = nullptr;
    QPushButton* add_negative_ = nullptr;
    QPushButton* remove_negative_ = nullptr;
    QPlainTextEdit* prior_ = nullptr;
};

}  // namespace umbra::ui
