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
#include "ui/viewer/scene_painter.h"

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
class CineControls;
class CurvePanel;
class StoredImageWindow;
class ImageView;
class PracticePanel;
class RecipePanel;
class TraceView;
class TopView;
class ViewsStrip;
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
    ViewsStrip* viewsStrip() const { return strip_; }
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
    /// Practice mode: opens the capture of a practice set (its answer file "X.answers.json"
    /// beside "X.h5" stays hidden until Submit) and starts an attempt for `trainee`, logged in
    /// `log_folder` (default practiceFolder()). False (after telling the user) on error.
    bool startPractice(const QString& capture_path, const QString& trainee, const QString& log_folder = {});
    PracticePanel* practicePanel() const { return practice_; }
    /// Folder of the practice logs: "practice" under the user's application data location.
    static QString practiceFolder();
    /// Writes a blind copy of the open case (core::blindCopy) to `path`. False after telling the user.
    bool makeBlindCopy(const QString& path);
    /// Opens a stored image (DICOM ultrasound) in its own window; nullptr (after telling the
    /// user) when it cannot be read. The case is not touched.
    StoredImageWindow* openStoredImage(const QString& path);
    /// Writes the current frame as displayed (grey levels of the display chain) as a DICOM
    /// Ultrasound Image with its region calibration; false (after telling the user) on error.
    bool exportDicom(const QString& path);
    CineControls* cine() const { return cine_; }
    /// Writes the annotated PNG of the current view.
    bool exportImage(const QString& path, int width_px, Theme theme = Theme::Dark);
    /// Writes the PDF report of the case as it is now (ui/report). False (and a message) on error.
    bool writeReport(const QString& path);
    /// Asks for the report header fields (part, site, date, examiner, reviewer, procedure,
    /// criteria) and sets them as one undoable edit.
    void reportHeaderDialog();
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
    /// Ends practice mode (tools unlocked, practice dock hidden) when another capture or case opens.
    void leavePractice();
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
    void reportDialog();
    void exportDicomDialog();
    void relocate();
    void loadRecipe();
    void saveRecipe();
    void addFindingFromSelection();
    void addCurvePointFromSelection();
    void makeTcgFromCurve();
    void editWeld();
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
    ViewsStrip* strip_ = nullptr;
    RecipePanel* recipe_ = nullptr;
    TraceView* trace_ = nullptr;
    TopView* top_ = nullptr;
    CurvePanel* curve_ = nullptr;
    QWidget* findings_ = nullptr;
    QWidget* table_ = nullptr;
    QDockWidget* top_dock_ = nullptr;
    PracticePanel* practice_ = nullptr;
    QDockWidget* practice_dock_ = nullptr;
    QMenu* demo_menu_ = nullptr;
    QString demo_dir_;

    QActionGroup* tools_ = nullptr;
    QAction* undo_ = nullptr;
    QAction* redo_ = nullptr;
    QSlider* frame_slider_ = nullptr;
    QLabel* frame_label_ = nullptr;
    CineControls* cine_ = nullptr;
    QComboBox* capture_combo_ = nullptr;
    QLabel* readout_ = nullptr;
    QLabel* timing_ = nullptr;
    QLabel* ref_warning_ = nullptr;  ///< distance–amplitude curve: what 0 dB is, or not comparable with the recipe
    QLabel* progress_label_ = nullptr;  ///< what is running (beside the bar, never inside it)
    QProgressBar* progress_ = nullptr;
    QToolButton* cancel_ = nullptr;
    QTimer* autosave_ = nullptr;
    bool updating_controls_ = false;
    Theme export_theme_ = Theme::Dark;  ///< last theme chosen in the export dialog
};

}  // namespace umbra::ui
