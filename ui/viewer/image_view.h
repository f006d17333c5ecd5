// SPDX-License-Identifier: MIT
#pragma once
// The frame on screen: physical axes in mm (depth down, true aspect ratio), zoom about the
// cursor (wheel), pan (middle drag, space + drag, or the select/pan tool on empty image),
// colour bar, and the measurement tools (caliper, depth marker, extent box, ellipse) with
// draggable handles. Reads from the controller and asks it for every change.
#include <QWidget>

#include <optional>

#include "core/case_file.h"
#include "core/measurement.h"
#include "ui/viewer/scene_painter.h"
#include "ui/viewer/view_transform.h"

namespace umbra::ui {

class CaseController;

enum class Tool { Select, Caliper, DepthMarker, ExtentBox, Ellipse, DropSizing, Drop20Sizing, TipSizing };
/// "select", "caliper", "depth marker", "extent box", "ellipse" (stored in the case).
QString toolName(Tool t);
Tool toolFromName(const QString& name);

class ImageView : public QWidget {
    Q_OBJECT
public:
    explicit ImageView(CaseController* controller, QWidget* parent = nullptr);

    Tool tool() const { return tool_; }
    void setTool(Tool t);
    const ViewTransform& transform() const { return vt_; }
    /// Zoom, centre and tool as stored in a case (frame is the controller's).
    core::ViewState viewState() const;
    /// Applies a stored view when the next image of the active capture arrives (or now).
    void restoreViewState(const core::ViewState& v);
    /// Fit the whole image in the window.
    void fitToWindow();
    void zoomBy(double factor);
    /// The scene as drawn now (for export).
    Scene scene() const;
    /// Image-plane position (mm) of a widget pixel.
    QPointF mmAt(const QPointF& px) const { return vt_.toMm(px); }
    /// Weld overlay shown (the case's weld geometry, when it has one).
    bool weldVisible() const { return show_weld_; }
    void setWeldVisible(bool on);
    /// −6 dB and −12 dB contours of the view's sensitivity (coverage) map over the image.
    bool coverageVisible() const { return show_coverage_; }
    void setCoverageVisible(bool on);
    /// Displayed dB at a position (mm) on the current frame, if inside the image.
    std::optional<float> dbAt(const QPointF& mm) const;

signals:
    /// Cursor moved over the image: position in mm (x, depth) and whether it is on the image.
    void cursorMoved(QPointF mm, bool inside);
    void toolChanged(umbra::ui::Tool tool);
    void viewChanged();

protected:
    void paintEvent(QPaintEvent*) override;
    void resizeEvent(QResizeEvent*) override;
    void wheelEvent(QWheelEvent*) override;
    void mousePressEvent(QMouseEvent*) override;
    void mouseMoveEvent(QMouseEvent*) override;
    void mouseReleaseEvent(QMouseEvent*) override;
    void mouseDoubleClickEvent(QMouseEvent*) override;
    void keyPressEvent(QKeyEvent*) override;
    void keyReleaseEvent(QKeyEvent*) override;
    void leaveEvent(QEvent*) override;

private:
    void onImageChanged();
    void updateLayout();
    QRectF extentOfCurrentImage() const;
    /// Measurement handle under a pixel: (id, point index), point index -1 = body.
    std::optional<std::pair<std::string, int>> hit(const QPointF& px) const;
    std::vector<core::Measurement> shownMeasurements() const;
    core::PointMm toPoint(const QPointF& px) const;
    static void dragPoint(core::Measurement& m, int index, const core::PointMm& p);

    CaseController* ctl_;
    ViewTransform vt_;
    SceneStyle style_;
    Tool tool_ = Tool::Select;
    QRectF last_extent_;
    std::optional<core::ViewState> pending_view_;

    enum class Drag { None, Pan, Handle, Body, Create };
    Drag drag_ = Drag::None;
    QPointF drag_start_px_, last_px_;
    std::optional<core::Measurement> drag_m_;  ///< measurement being created or dragged
    int drag_index_ = -1;
    core::Measurement drag_origin_;
    bool space_down_ = false;
    bool show_weld_ = true;
    bool show_coverage_ = false;
};

}  // namespace umbra::ui
