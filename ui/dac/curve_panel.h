// SPDX-License-Identifier: MIT
#pragma once
// The distance–amplitude curve panel: the curve's name, what it was read with (basis, recipe
// fingerprint, depth range), a visible warning when the recipe differs from the curve's, the
// list of points (depth, x, level re the shallowest point, label, capture, frame) with Remove,
// and the commands Add selected measurement, Make TCG from curve and Clear curve.
#include <QWidget>

class QLabel;
class QLineEdit;
class QPushButton;
class QTableWidget;

namespace umbra::ui {

class CaseController;

class CurvePanel : public QWidget {
    Q_OBJECT
public:
    enum Column { DepthColumn, XColumn, LevelColumn, LabelColumn, CaptureColumn, FrameColumn, ColumnCount };
    explicit CurvePanel(CaseController* controller, QWidget* parent = nullptr);

    QTableWidget* table() const { return table_; }
    QLabel* warningLabel() const { return warning_; }
    QPushButton* addButton() const { return add_; }
    QPushButton* removeButton() const { return remove_; }
    QPushButton* tcgButton() const { return tcg_; }
    /// Removes the point in the selected row (no-op without a selection).
    void removeSelected();

signals:
    /// The user asked to add the selected measurement's echo (the window does it and reports).
    void addRequested();
    /// The user asked for a TCG from the curve.
    void makeTcgRequested();

private:
    void refresh();

    CaseController* ctl_;
    QLabel* intro_;
    QLineEdit* label_;
    QLabel* info_;
    QLabel* warning_;
    QTableWidget* table_;
    QPushButton* add_;
    QPushButton* remove_;
    QPushButton* tcg_;
    QPushButton* clear_;
};

}  // namespace umbra::ui
