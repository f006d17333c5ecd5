// SPDX-License-Identifier: MIT
#pragma once
// The views strip: the chosen views (delay_model.mode) of the current frame other than the
// large one, small, in rows under the large view, each labelled by its mode. Clicking one shows it large (an
// undoable edit of the view; the strip's image is taken over, so nothing is beamformed again).
// "Choose views…" lists the views the capture can be imaged in. Hidden when no view is chosen.
#include <QDialog>
#include <QWidget>

#include <string>
#include <vector>

class QCheckBox;
class QGridLayout;
class QScrollArea;
class QLabel;
class QToolButton;

namespace umbra::ui {

class CaseController;

/// One small view: its mode name above the image (or what is happening / went wrong).
class ViewTile : public QWidget {
    Q_OBJECT
public:
    ViewTile(CaseController* controller, std::string mode, QWidget* parent = nullptr);
    const std::string& mode() const { return mode_; }
    QSize sizeHint() const override;

signals:
    void clicked(QString mode);

protected:
    void paintEvent(QPaintEvent*) override;
    void mouseReleaseEvent(QMouseEvent* e) override;
    void enterEvent(QEnterEvent*) override;
    void leaveEvent(QEvent*) override;

private:
    CaseController* ctl_;
    std::string mode_;
    bool hover_ = false;
};

class ViewsStrip : public QWidget {
    Q_OBJECT
public:
    explicit ViewsStrip(CaseController* controller, QWidget* parent = nullptr);
    /// Tiles shown now, in order (tests).
    std::vector<ViewTile*> tiles() const { return tiles_; }
    /// Opens the chooser (modal).
    void chooseViews();

signals:
    /// The chooser or a tile produced a message for the user (e.g. a view the capture lacks).
    void problem(QString title, QString message);

protected:
    bool eventFilter(QObject* o, QEvent* e) override;

private:
    void rebuild();
    /// Columns that fit the width, tile sizes from the image's aspect, the strip's height.
    void relayout();
    CaseController* ctl_;
    QScrollArea* scroll_ = nullptr;
    QGridLayout* grid_ = nullptr;
    QLabel* large_ = nullptr;
    QToolButton* choose_ = nullptr;
    std::vector<ViewTile*> tiles_;
    std::vector<std::string> shown_;  ///< modes of tiles_, to rebuild only when they change
};

/// What a view's legs are, in words: "TT-T: transmit shear via the back wall, receive shear direct".
QString describeView(const std::string& mode);

/// Chooser of the strip's views: one box per view the capture can be imaged in.
class ViewChooser : public QDialog {
    Q_OBJECT
public:
    ViewChooser(const std::vector<std::string>& valid, const std::vector<std::string>& chosen, const std::string& large,
                QWidget* parent = nullptr);
    std::vector<std::string> chosen() const;

private:
    std::vector<std::pair<std::string, QCheckBox*>> boxes_;
};

}  // namespace umbra::ui
