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
    /// The distance–amplitude curve drawn over the trace, in the trace's dB: level at each
    /// depth (mm), the depths the curve's points cover (outside them the plot is shaded and the
    /// curve dotted), and whether the reporting level follows the curve (drawn as curve + level)
    /// or is a horizontal line. Empty depths: no curve.
    struct CurveOverlay {
        std::vector<double> depth_mm;
        std::vector<float> db;
        double covered_from_mm = 0, covered_to_mm = 0;
        bool level_follows_curve = false;
    };
    void setCurve(CurveOverlay curve);
    const CurveOverlay& curve() const { return curve_; }
    const std::vector<float>& traceDb() const { return db_; }
    const std::vector<double>& traceDepthMm() const { return depth_; }
    QString unit() const { return unit_; }
    /// Raw RF samples against time (µs); empty hides the RF strip.
    void setRf(std::vector<float> rf, double t0_us, double dt_us, const QString& title);

protected:
    void paintEvent(QPaintEvent*) override;

private:
    std::vector<double> depth_;
    std::vector<float> db_;
    CurveOverlay curve_;
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
    /// With a distance–amplitude curve: true = the trace in dB re the curve at each depth (the
    /// curve is the 0 dB line); false = dB re the curve's shallowest point, the curve drawn as
    /// its falling line. Default true.
    void setReCurve(bool on);
    bool reCurve() const;
    TracePlot* plot() const { return plot_; }

private:
    void refresh();
    void refreshRf();

    CaseController* ctl_;
    TracePlot* plot_;
    QDoubleSpinBox* level_;
    QCheckBox* rf_on_;
    QCheckBox* re_curve_;
    QSpinBox* tx_;
    QSpinBox* rx_;
    double x_mm_ = 0, depth_mm_ = -1;
    bool have_x_ = false;
};

}  // namespace umbra::ui
