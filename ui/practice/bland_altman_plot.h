// SPDX-License-Identifier: MIT
#pragma once
// Bland–Altman plot (Bland & Altman 1986): difference against mean of each pair, with the bias
// and the 95 % limits of agreement as lines, drawn with QPainter.
#include <QString>
#include <QWidget>

#include "core/agreement.h"

namespace umbra::ui {

class BlandAltmanPlot : public QWidget {
    Q_OBJECT
public:
    explicit BlandAltmanPlot(QWidget* parent = nullptr);
    /// `x_title` / `y_title` name the axes with their unit, e.g. "mean of measured and true (mm)".
    void setData(const core::BlandAltmanResult& r, const QString& x_title, const QString& y_title, const QString& unit);
    const core::BlandAltmanResult& data() const { return ba_; }
    QSize sizeHint() const override { return {560, 380}; }
    QSize minimumSizeHint() const override { return {320, 220}; }

protected:
    void paintEvent(QPaintEvent*) override;

private:
    core::BlandAltmanResult ba_;
    QString x_title_, y_title_, unit_;
};

}  // namespace umbra::ui
