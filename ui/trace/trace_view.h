// SPDX-License-Identifier: MIT
#pragma once
// The trace view (the trade's A-scan): displayed amplitude (dB) versus depth along the image
// column under the cursor, with the reporting level drawn as a horizontal line; optionally
// the raw RF trace of one transmit-receive pair of the current frame.
#include <QWidget>

#include <vector>

class QCheckBox;
class QDoubleSpinBox;
class QLabel;
class QSpinBox;

namespace umbra::ui {

class CaseController;

/// The plot itself (no controls).
class TracePlot : public QWidget {
    Q_OBJECT
public:
    explicit TracePlot(QWidget* parent = nullptr);
    /// dB values along depth (mm), the plot's floor and top (dB), the reporting level (dB, same
    /// reference) and the unit text ("dB re frame peak", "dB re <reference>").
    void setTrace(std::vector<double> depth_mm, std::vector<float> db, double floor_db, double level_db,
                  double cursor_depth_mm, const QString& title, double top_db = 0,
                  const QString& unit = QStringLiteral("dB re frame peak"));
    /// Raw RF samples against time (µs); empty hides the RF strip.
    void setRf(std::vector<float> rf, double t0_us, double dt_us, const QString& title);

protected:
    void paintEvent(QPaintEvent*) override;

private:
    std::vector<double> depth_;
    std::vector<float> db_;
    double floor_ = -60, top_ = 0, level_ = -12, cursor_ = -1;
    QString unit_;
    QString title_;
    std::vector<float> rf_;
    double rf_t0_ = 0, rf_dt_ = 1;
    QString rf_title_;
};

class TraceView : public QWidget {
    Q_OBJECT
public:
    explicit TraceView(CaseController* controller, QWidget* parent = nullptr);
    /// Reporting level, dB (default -12 dB, a view setting stored per session).
    double reportingLevelDb() const;
    /// Follow the image column at x (mm); `depth_mm` marks the cursor on the plot.
    void setCursor(double x_mm, double depth_mm);

private:
    void refresh();
    void refreshRf();

    CaseController* ctl_;
    TracePlot* plot_;
    QDoubleSpinBox* level_;
    QCheckBox* rf_on_;
    QSpinBox* tx_;
    QSpinBox* rx_;
    double x_mm_ = 0, depth_mm_ = -1;
    bool have_x_ = false;
};

}  // namespace umbra::ui
