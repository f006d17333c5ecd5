// SPDX-License-Identifier: MIT
#pragma once
// The workstation window: image view in the centre; recipe panel (left), findings and
// measurements (right), trace view and top view (bottom) as docks; menus with the shortcuts;
// status bar with the cursor readout, timings, progress and cancel.
#include <QMainWindow>
#include <QPointer>
#include <QStringList>

#include <functional>
#include <vector>

#include "core/edit_journal.h"

class QAction;
class QActionGroup;
class QComboBox;
class QLabel;
class QMenu;
class QProgressBar;
class QSlider;
class QTimer;
class QToolButton;

namespace umbra::ui {

class CaseController;
class CurvePanel;
class ImageView;
class RecipePanel;
class TraceView;
class TopView;
enum class Tool;

/// What to do when a case has an autosave newer than itself.
enum class Recovery { Ask, Recover, Ignore };
struct MainWindowOptions {
    bool interactive = true;        ///< false: no modal dialogs (tests, screenshots); errors go to stderr
    Recovery recovery = Recovery::Ask;
    bool timings = false;           ///< print display and beamforming times to stderr
    int autosave_seconds = 60;      ///< auto-save period while the case is modified, s
};

class MainWindow : public QMainWindow {
    Q_OBJECT
public:
    using Options = MainWindowOptions;
    using Recovery = umbra::ui::Recovery;
    explicit MainWindow(Options options = Options(), QWidget* parent = nullptr);
    ~MainWindow() override;

    CaseController* controller() const { return ctl_; }
    ImageView* imageView() const { return view_; }
    RecipePanel* recipePanel() const { return recipe_; }
    TraceView* traceView() const { return trace_; }
    CurvePanel* curvePanel() const { return curve_; }

    /// Opens a capture (.h5) or a case (.umbracase). Returns false (after telling the user) on error.
    /// A case with an edit journal is recovered from it (per the Recovery option), and the
    /// status bar lists the recovered edits.
    bool openPath(const QString& path);
    /// At start: recovers an untitled case from its edit journal (per the Recovery option).
    /// True when it did.
    bool recoverUntitledJournal();
    /// Saves the case to `path` (Save As when empty and untitled). Returns false on error/cancel.
    bool saveCaseTo(const QString& path);
    /// Opens the weld demo case: DIR/weld_coupon.h5 with DIR/reference_block.h5 as its second
    /// capture, on the frame that crosses the fusion-face reflector. Same as openDemoCase(dir, "weld").
    bool openDemo(const QString& dir);
    /// Opens one demo case from DIR as its own case: "weld" (weld coupon + reference block) or
    /// "phantom" (Phantom P-2). File → Demo cases offers the others afterwards.
    bool openDemoCase(const QString& dir, const QString& name);
    static QStringList demoCaseNames();
    /// Places a demonstration caliper, extent box and finding on the strongest echo.
    /// Demo: adds to the case's distance–amplitude curve the strongest echo within ±1.5 mm of
    /// each depth (mm) on the current frame (the reference block's side-drilled holes), and
    /// prints the curve (dB re its shallowest point) to stderr. False if any is missing.
    bool demoCurve(const std::vector<double>& depths_mm = {5, 10, 15, 20});
    void demoAnnotate();
    /// Writes the annotated PNG of the current view.
    bool exportImage(const QString& path, int width_px);
    /// Asks the user for a replacement of a missing/changed capture (interactive only).
    void offerRelocation();
    /// Writes the autosave file now (what the timer does).
    void autosaveNow();
    /// Called when a relocation is needed in non-interactive mode (tests): returns the new path.
    std::function<QString()> relocationProvider;

protected:
    void closeEvent(QCloseEvent*) override;
    void dragEnterEvent(QDragEnterEvent*) override;
    void dropEvent(QDropEvent*) override;

private:
    bool offerJournalRecovery(const core::JournalRecovery& r, const QString& case_path);
    void reportRecovery(const core::JournalRecovery& r);
    void buildActions();
    void buildDocks();
    void buildStatusBar();
    void updateTitle();
    void updateFrameControls();
    void updateTimings();
    void onCaptureChanged();
    bool maybeSave();
    void showError(const QString& title, const QString& text);
    void open();
    bool save();
    bool saveAs();
    void exportDialog();
    void relocate();
    void loadRecipe();
    void saveRecipe();
    void addFindingFromSelection();
    void addCurvePointFromSelection();
    void makeTcgFromCurve();
    void updateReferenceWarning();
    void setTool(Tool t);
    /// Folder of the case file, else of the active capture ("" when neither): where file
    /// dialogs open.
    QString caseFolder() const;
    QString inCaseFolder(const QString& file_name) const;
    void hideProgress();
    /// Window size and dock layout from the last interactive session (QSettings).
    void restoreLayout();
    void saveLayout();
    static constexpr int kLayoutVersion = 1;

    Options opt_;
    CaseController* ctl_;
    ImageView* view_;
    RecipePanel* recipe_ = nullptr;
    TraceView* trace_ = nullptr;
    TopView* top_ = nullptr;
    CurvePanel* curve_ = nullptr;
    QWidget* findings_ = nullptr;
    QWidget* table_ = nullptr;
    QDockWidget* top_dock_ = nullptr;
    QMenu* demo_menu_ = nullptr;
    QString demo_dir_;

    QActionGroup* tools_ = nullptr;
    QAction* undo_ = nullptr;
    QAction* redo_ = nullptr;
    QSlider* frame_slider_ = nullptr;
    QLabel* frame_label_ = nullptr;
    QComboBox* capture_combo_ = nullptr;
    QLabel* readout_ = nullptr;
    QLabel* timing_ = nullptr;
    QLabel* ref_warning_ = nullptr;  ///< distance–amplitude curve: what 0 dB is, or not comparable with the recipe
    QLabel* progress_label_ = nullptr;  ///< what is running (beside the bar, never inside it)
    QProgressBar* progress_ = nullptr;
    QToolButton* cancel_ = nullptr;
    QTimer* autosave_ = nullptr;
    bool updating_controls_ = false;
};

}  // namespace umbra::ui
