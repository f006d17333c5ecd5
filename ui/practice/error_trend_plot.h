// SPDX-License-Identifier: MIT
#pragma once
// Error of each structure over a trainee's attempts (one coloured line per structure and target),
// drawn with QPainter.
#include <QWidget>

#include "core/practice.h"

namespace umbra::ui {

class ErrorTrendPlot : public QWidget {
    Q_OBJECT
public:
    explicit ErrorTrendPlot(QWidget* parent = nullptr);
    void setSeries(const std::vector<core::PracticeProgress::Series>& series, size_t attempts);
    QSize sizeHint() const override { return {560, 300}; }
    QSize minimumSizeHint() const override { return {320, 200}; }

protected:
    void paintEvent(QPaintEvent*) override;

private:
    std::vector<core::PracticeProgress::Series> series_;
    size_t attempts_ = 0;
};

}  // namespace umbra::ui
