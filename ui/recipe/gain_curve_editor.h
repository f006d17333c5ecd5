// SPDX-License-Identifier: MIT
#pragma once
// Editor of a TCG gain curve: a small table of points (depth in mm, gain in dB) with buttons to
// add and remove points, instead of the "mm:dB,mm:dB" text the recipe stores. Emits the text
// form on every completed edit; the controller checks it (depths increasing, gains in range).
#include <QString>
#include <QWidget>

class QPushButton;
class QTableWidget;

namespace umbra::ui {

class GainCurveEditor : public QWidget {
    Q_OBJECT
public:
    explicit GainCurveEditor(QWidget* parent = nullptr);
    /// Shows the curve given as "depth_mm:gain_dB,..." (does not emit curveEdited).
    void setCurve(const QString& text);
    /// The table as "depth_mm:gain_dB,..." (rows in table order; empty cells count as 0).
    QString curve() const;
    QTableWidget* table() const { return table_; }

signals:
    void curveEdited(const QString& text);

private:
    void addPoint();
    void removePoint();
    QTableWidget* table_ = nullptr;
    QPushButton* add_ = nullptr;
    QPushButton* remove_ = nullptr;
    bool filling_ = false;
};

}  // namespace umbra::ui
