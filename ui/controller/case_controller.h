// SPDX-License-Identifier: MIT
#pragma once
// The workstation's document and controller: owns the case, the open capture, the recipe, the
// beamforming worker, the frame cache and the undo stack. Widgets read from it and ask it to
// change things; it emits typed change signals. Only this class calls reconstruction/.
#include <QImage>
#include <QObject>
#include <QString>
#include <QTimer>
#include <QUndoStack>

#include <functional>
#include <future>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "core/capture.h"
#include "core/capture_file.h"
#include "core/case_file.h"
#include "core/drop_sizing.h"
#include "core/edit_journal.h"
#include "core/frame.h"
#include "core/measurement.h"
#include "core/parameters.h"
#include "core/sizing.h"
#include "reconstruction/calibration.h"
#include "reconstruction/coverage.h"
#include "reconstruction/sizing_setup.h"
#include "ui/controller/beamform_worker.h"

namespace umbra::ui {

class CaseController : public QObject {
    Q_OBJECT
public:
    explicit CaseController(QObject* parent = nullptr);
    ~CaseController() override;

    // ------------------------------------------------------------------ case
    /// Starts an empty, untitled case (no capture).
    void newCase();
    /// Starts a new case on the capture at `path`. Throws core::InputError naming the file.
    void openCapture(const QString& path);
    /// Adds a capture to the current case (and makes it active when `activate`). Throws core::InputError.
    void addCapture(const QString& path, bool activate = true);
    /// Opens a case file (or its autosave when `from_autosave`: the case keeps `path` as its
    /// name and is marked modified). Throws core::InputError. A missing or changed capture does
    /// not throw: captureProblem() says what is wrong and the measurements and findings stay.
    void openCase(const QString& path, bool from_autosave = false);
    /// Saves atomically to `path` (becomes the case path). Throws core::InputError.
    void saveCase(const QString& path);
    /// Where an untitled case is auto-saved: "<app data>/untitled.umbracase.autosave".
    static QString untitledAutosavePath();
    /// Opens the untitled case's auto-save as a new untitled, modified case. Throws core::InputError.
    void recoverUntitled();
    /// Writes the autosave sibling of the case path (untitled: untitledAutosavePath()); returns its path.
    QString autosave();
    /// The edit journal of the case: every edit (undoable or not) is appended and flushed to
    /// disk before the call that made it returns (core/edit_journal.h). Beside the case file,
    /// or for an untitled case in the app data folder ("untitled.umbracase.journal").
    QString journalFile() const;
    /// Journal file of an untitled case.
    static QString untitledJournalFile();
    /// Starts a case from a recovered journal: its last state, marked modified, named
    /// `case_path` ("" = untitled). The journal file stays until the next edit replaces it
    /// atomically or the case is saved.
    void recoverFromJournal(const QString& case_path, const core::JournalRecovery& r);
    /// Removes the journal (the user discarded the changes).
    void discardJournal();
    /// Case document with the live recipe, view and measurements of the active capture folded in.
    core::CaseDocument document() const;
    QString casePath() const { return case_path_; }
    /// Case title, or the case/capture file name when untitled.
    QString displayName() const;
    bool isDirty() const;
    QUndoStack* undoStack() { return &undo_; }
    void setTitle(const QString& t);
    void setCaseText(const core::CaseDocument& texts);
    /// Report header fields (part, site, date, examiner, reviewer, procedure, criteria); undoable.
    const core::ReportHeader& reportHeader() const { return doc_.header; }
    void setReportHeader(const core::ReportHeader& header);  ///< title, background, negatives, prior (undoable? no: marks dirty)

    // ------------------------------------------------------------------ captures
    bool hasCapture() const { return reader_ != nullptr; }
    size_t captureCount() const { return doc_.captures.size(); }
    size_t activeCapture() const { return doc_.active_capture; }
    /// Switches the active capture of the case (keeps each capture's recipe, view, measurements
    /// and the undo history: undoing an edit made on another capture switches back to it first).
    void setActiveCapture(size_t index);
    const core::CaptureHeader& header() const;
    QString capturePath() const;
    /// Empty when the capture is open; otherwise what is wrong, naming the path.
    QString captureProblem() const { return capture_problem_; }
    /// Points the active capture at `path`. Returns false (and an explanation) if its SHA-256
    /// differs from the recorded one unless `accept_changed`. Throws core::InputError if unreadable.
    bool relocateCapture(const QString& path, bool accept_changed, QString* why = nullptr);
    /// RF trace of one transmit-receive pair of the current frame, physical units; empty if none.
    std::vector<float> rfTrace(size_t transmit, size_t receive) const;

    // ------------------------------------------------------------------ recipe
    const core::Recipe& recipe() const { return recipe_; }
    /// Undoable edit of one "stage.param" value. Throws core::SettingError on a bad value or
    /// on a recipe the open capture cannot be reconstructed with (e.g. a grid over the pixel
    /// limit); the recipe is then left as it was.
    void editRecipeValue(const std::string& key, const std::string& value);
    /// Undoable replacement of the whole recipe (e.g. "Load recipe"). Throws core::SettingError
    /// like editRecipeValue.
    void editRecipe(const core::Recipe& r, const QString& what);
    /// Throws core::SettingError when `r` cannot be used with the open capture (grid, speed of
    /// sound, f-number, TCG curve); does nothing without a capture.
    void checkRecipe(const core::Recipe& r) const;
    /// Applies a recipe without an undo entry (used by undo commands).
    void applyRecipe(const core::Recipe& r);

    // ------------------------------------------------------------------ frames and images
    size_t frameCount() const;
    size_t currentFrame() const { return frame_; }
    void setCurrentFrame(size_t f);
    /// "y = 3.0 mm" (scan position) or "t = 0.10 s" for the frame, or "" when unknown.
    QString frameLabel(size_t f) const;
    bool isEncodedScan() const;
    bool hasImage() const { return envelope_ != nullptr; }
    /// Linear envelope of the current frame before TCG (x_m, z_m give the grid).
    const core::Frame* envelope() const { return envelope_.get(); }
    /// Displayed dB values of the current frame, [N_z][N_x], in [-dynamic range, 0].
    const std::vector<float>& db() const { return db_; }
    /// The current frame in colour (N_x by N_z pixels).
    const QImage& image() const { return image_; }
    /// Dynamic range of the display, dB (> 0).
    double dynamicRangeDb() const;
    std::string colourMap() const;
    /// Milliseconds spent by the last display-only re-render (TCG, log, colour, QImage).
    double lastRenderMs() const { return render_ms_; }
    /// Seconds of the last foreground beamforming run (worker wall time).
    double lastBeamformSeconds() const { return beamform_s_; }
    double amplitudeFidelityDb() const { return fidelity_db_; }
    bool isBusy() const { return busy_; }
    /// True while frames are beamformed in the background for the top view.
    bool isTopViewRunning() const { return top_running_; }
    /// Stops the foreground run and the background top-view frames.
    void cancelReconstruction();
    /// Number of Reconstructor runs started (tests: display-only edits must not add any).
    long beamformRuns() const { return worker_->runs(); }

    // ------------------------------------------------------------------ top view
    /// Peak dB over depth for each frame (rows = frames in scan order, columns = x); valid rows
    /// are those whose frame is beamformed.
    const QImage& topViewImage() const { return top_image_; }
    size_t topViewFramesDone() const { return cache_.size(); }
    /// True for an encoded scan whose frames all fit in the frame cache (1 GiB).
    bool topViewFits() const;
    /// Depth gate of the top view, mm (near field and a known plate's back wall left out).
    std::pair<double, double> topViewGateMm() const { return top_gate_mm_; }
    /// True when the top view could have every frame but some are missing and nothing is
    /// beamforming them (the run was cancelled or failed).
    bool topViewIncomplete() const;
    /// Beamforms the frames the top view still lacks, in the background.
    void finishTopView();

    // ------------------------------------------------------------------ measurements
    const std::vector<core::Measurement>& measurements() const;
    core::UncertaintyModel uncertaintyModel() const;
    /// Undoable. Returns the new id.
    std::string addMeasurement(core::Measurement m);
    void moveMeasurement(const std::string& id, const std::vector<core::PointMm>& points);
    void deleteMeasurement(const std::string& id);
    void relabelMeasurement(const std::string& id, const std::string& label);
    void setMeasurements(const std::vector<core::Measurement>& ms);  ///< no undo (commands use it)
    const core::Measurement* measurement(const std::string& id) const;
    QString selectedMeasurement() const { return selected_; }
    void setSelectedMeasurement(const QString& id);

    // ------------------------------------------------------------------ findings
    const std::vector<core::Finding>& findings() const { return doc_.findings; }
    /// Undoable replacement of the findings list.
    void editFindings(const std::vector<core::Finding>& fs, const QString& what);
    void setFindings(const std::vector<core::Finding>& fs);  ///< no undo (commands use it)
    /// New finding pre-filled from a measurement (location, sizes, peak dB). Returns its id.
    /// The indication a finding made from `m` gets now (numbers rounded to their uncertainties).
    core::Indication indicationFrom(const core::Measurement* m) const;
    /// Findings whose numbers differ from what their linked measurement gives now (recipe change,
    /// moved points); only findings whose measurement is on the frame shown are checked.
    std::vector<std::string> outOfDateFindings() const;
    /// Copies the linked measurement's current numbers into the finding (one undoable edit).
    void acceptMeasuredValues(const std::string& finding_id);
    std::string addFindingFromMeasurement(const std::string& measurement_id);
    // ------------------------------------------------------------------ distance–amplitude curve
    /// The case's distance–amplitude curve (the amplitude reference), if any.
    const std::optional<core::DistanceAmplitudeCurve>& curve() const { return doc_.curve; }
    /// Undoable: adds the peak of the envelope before TCG inside the measurement (extent box,
    /// −6 dB sizing, caliper, ellipse: its bounding box; depth marker: ±0.5 mm about its depth)
    /// on the current frame as a point of the curve; starts a curve named `curve_label` when
    /// there is none. Returns false with `why` when there is no such peak, or when the recipe's
    /// amplitude settings differ from the curve's (the keys are named), or when the curve holds
    /// amplitudes after TCG (converted from a single reference: clear it first).
    bool addCurvePointFrom(const std::string& measurement_id, QString* why = nullptr, const QString& curve_label = {});
    /// Undoable removal of point `index` (in depth order); removing the last point clears the curve.
    void removeCurvePoint(size_t index);
    /// Undoable new label of the curve.
    void relabelCurve(const QString& label);
    /// Undoable replacement (nullopt clears it).
    void editCurve(const std::optional<core::DistanceAmplitudeCurve>& c, const QString& what);
    void setCurve(const std::optional<core::DistanceAmplitudeCurve>& c);  ///< no undo (commands use it)
    /// Undoable recipe edit: TCG mode "curve" with the gain core::tcgFromCurve gives, so equal
    /// reflectors on the curve display equal. False with `why` when the curve cannot give one.
    bool makeTcgFromCurve(QString* why = nullptr);
    /// "dB re DAC (<label>)" with a curve, "dB re frame peak" without.
    QString amplitudeUnit() const;
    /// Linear amplitude of the current frame that the curve compares with at pixel (ix, iz):
    /// the envelope before TCG (or after, for a curve read after TCG). nullopt outside the image.
    std::optional<double> curveBasisAmplitude(size_t ix, size_t iz) const;
    /// dB re the curve at the depth of pixel (ix, iz) of the current frame, with the outside flag.
    std::optional<core::DacReading> dbReCurveAt(size_t ix, size_t iz) const;
    /// The same at the pixel nearest (x_mm, z_mm); nullopt outside the image or without a curve.
    std::optional<core::DacReading> dbReCurveAtMm(double x_mm, double z_mm) const;
    /// Linear amplitude after TCG of the current frame, [N_z][N_x] (empty without an image).
    const std::vector<float>& tgcAmplitude() const { return tgc_amp_; }
    /// Recipe keys that change amplitudes on the curve's basis and differ between the current
    /// recipe and the curve's ("stage.param"); empty without a curve.
    std::vector<std::string> curveRecipeDifferences() const;
    /// One sentence warning that amplitudes are not comparable with the curve (naming the keys,
    /// or saying the curve's recipe is not recorded); "" when comparable or without a curve.
    QString curveWarning() const;
    /// "outside the curve's depth range 5.0–20.0 mm (end level held)"; "" without a curve.
    QString outsideText() const;
    /// Peak of an envelope inside a measurement on the current frame.
    struct Peak {
        double amplitude = 0;
        double x_mm = 0, z_mm = 0;
    };
    /// Peak of the TCG-corrected envelope inside a measurement on the current frame.
    std::optional<Peak> peakIn(const core::Measurement& m) const;
    /// Peak of the envelope before TCG inside a measurement on the current frame.
    std::optional<Peak> peakBeforeTcgIn(const core::Measurement& m) const;
    /// Highest dB re the curve inside a measurement on the current frame, where it is.
    struct CurvePeak {
        core::DacReading reading;
        double x_mm = 0, z_mm = 0;
    };
    std::optional<CurvePeak> peakReCurveIn(const core::Measurement& m) const;
    /// Quantities of a measurement: core::evaluate, and for a −6 dB sizing on the current frame
    /// the drop sizing of the TCG-corrected envelope (box quantities on other frames).
    std::vector<core::Quantity> quantities(const core::Measurement& m) const;
    /// Drop edges of a −6 dB or −20 dB sizing measurement on the current frame (sizing(m)->drop);
    /// nullopt for other kinds, other frames or without an image.
    std::optional<core::DropSizing> dropSizing(const core::Measurement& m) const;
    /// Sizing (core/sizing.h) of the TCG-corrected envelope inside an image-sizing measurement
    /// (−6 dB, −20 dB, tips) on the current frame, with the point-spread model and speed-of-sound
    /// uncertainty of recon::sizingSetup; nullopt for other kinds, other frames or without an image.
    std::optional<core::SizingResult> sizing(const core::Measurement& m) const;
    /// Top view measuring between two points (x, scan position y) in mm: the end-to-end distance
    /// and the −6 dB length along the scan axis of the top view's projection restricted to the
    /// points' x range (frames not yet beamformed are left out).
    struct TopViewMeasure {
        core::MeasuredValue end_to_end;
        std::optional<core::SizingResult> scan_length;
    };
    std::optional<TopViewMeasure> topViewMeasure(double xa, double ya, double xb, double yb) const;
    /// The uncertainty budget of every quantity of a measurement, component by component, with
    /// the sizing's warnings (plain text for the budget view); empty for an unknown id.
    QString budgetText(const std::string& id) const;
    /// Turns an image-sizing measurement into another sizing kind (e.g. a −6 dB box that holds
    /// two peaks into tip sizing), as one undoable edit.
    void changeSizingKind(const std::string& id, core::MeasurementKind kind);
    /// Sets the case's medium for the speed-of-sound default ("" = guessed from the speed) and its
    /// relative standard uncertainty of the speed (unset = the medium's default); undoable.
    void setSpeedUncertainty(const std::string& medium, std::optional<double> relative);
    /// The medium and relative speed uncertainty in use (after defaults).
    std::pair<std::string, double> speedUncertainty() const;
    /// The sizing context of the current frame (point-spread model, speed uncertainty, noise).
    const recon::SizingSetup* sizingSetup() const;

    /// Technique block: array, frequency, transmits, speed of sound, grid, fidelity, TCG.
    QString techniqueText() const;
    /// One line for exported images.
    QString techniqueLine() const;
    /// The large view in words with the shear speed, wedge and back wall it uses; "" for L-L
    /// without a wedge (nothing to say beyond the speed of sound).
    QString viewText() const;
    /// Speed of sound the reconstruction uses, m/s (the recipe's, or the capture's when the recipe says 0).
    double speedMps() const;
    /// "5920 m/s (from the capture)" or "... (recipe; the capture records ...)".
    QString speedText() const;
    /// The TCG actually applied: mode, and for attenuation the α and f used with their sources.
    QString tgcText() const;

    // ------------------------------------------------------------------ calibration
    /// Speed of sound from the back wall of a plate `thickness_mm` thick (± tol_mm) on the
    /// current frame of the active capture (recon::speedFromBackWall). Its lines go into the
    /// capture's calibration and the technique block (undoable). nullopt with `why` when it
    /// cannot be done (no capture, not a full matrix, no echo).
    std::optional<core::MeasuredValue> calibrateSpeed(double thickness_mm, double tol_mm, QString* why = nullptr);
    /// Fixed delay from a reflector at a known place (x_mm, z_mm in the specimen frame; a hole of
    /// diameter dia_mm, 0 for a point or tip) seen through the wedge with a T path (on contact:
    /// L) on the current frame (recon::fixedDelayFromReflector). Its lines join the capture's
    /// calibration lines (replacing an earlier delay calibration, keeping the speed's); undoable.
    std::optional<recon::DelayCalibration> calibrateDelay(double x_mm, double z_mm, double dia_mm, double tol_mm,
                                                          QString* why = nullptr);
    /// Weak and dead elements of the current frame (recon::elementHealth); lines recorded like
    /// calibrateSpeed. Returns the flagged elements (0-based); nullopt with `why` on failure.
    std::optional<std::vector<int>> checkElements(QString* why = nullptr);
    /// Calibration lines of the active capture (speed, then elements).
    std::vector<std::string> calibrationLines() const;

    // ------------------------------------------------------------------ coverage
    /// Sensitivity map of the recipe's view (delay_model.mode) over the image region, on a grid of
    /// at most kCoverageStepMm (recon::coverageMap; computed on first use and cached per capture,
    /// view and region). nullptr without an image or when the view cannot be mapped.
    /// Waits for the map when it is being computed in the background.
    const recon::CoverageMap* coverage() const;
    /// The same without waiting: nullptr until the map is ready; the first call starts it on a
    /// background thread (about a second for a wedge view of the weld demo, bench_views
    /// BM_Coverage) and coverageReady() says when it is there.
    const recon::CoverageMap* coverageIfReady() const;
    static constexpr double kCoverageStepMm = 0.25;
    /// Coverage in dB at a point (bilinear), nullopt outside the map.
    std::optional<double> coverageDbAt(double x_mm, double z_mm) const;
    /// "Outside the −6 dB coverage of view L-L (−8.3 dB at its centre)" when the centre of the
    /// measurement's points lies below −6 dB of the view's sensitivity; "" otherwise.
    QString coverageWarning(const core::Measurement& m) const;

    // ------------------------------------------------------------------ weld overlay
    /// The case's weld geometry (drawn over every view), if entered.
    const std::optional<core::WeldGeometry>& weld() const { return doc_.weld; }
    /// Undoable replacement (nullopt removes the overlay). Throws core::SettingError naming the
    /// field when the geometry is not valid; the case is then unchanged.
    void editWeld(const std::optional<core::WeldGeometry>& w, const QString& what);
    void setWeld(const std::optional<core::WeldGeometry>& w);  ///< no undo (commands use it)
    /// Overlay polylines (direct, first and second skip) spanning the current image's x range;
    /// empty without a weld.
    std::vector<core::WeldPolyline> weldOverlay() const;

    // ------------------------------------------------------------------ views (delay_model.mode)
    /// The large view: the recipe's delay_model.mode ("L-L" by default).
    std::string largeView() const;
    /// Views the open capture can be imaged in (recon::validViewModes), in menu order.
    std::vector<std::string> validViews() const;
    /// Views chosen for the strip (saved with the capture in the case; may include the large one).
    const std::vector<std::string>& chosenViews() const { return view_.views; }
    /// Replaces the chosen views (order kept, duplicates dropped). Throws core::SettingError
    /// naming the view when a name is not a view or the capture cannot image it (e.g. a skip
    /// without a thickness); the choice is then unchanged. Journalled and marks the case modified.
    void setChosenViews(const std::vector<std::string>& modes);
    /// The small views of the strip now: the chosen views other than the large one.
    std::vector<std::string> stripViews() const;
    /// One small view of the current frame: its image (display settings of the recipe, dB re
    /// its own peak) once beamformed, or what went wrong.
    struct StripTile {
        QImage image;     ///< null while it is being beamformed
        QString problem;  ///< why it could not be made ("" = none)
    };
    StripTile stripTile(const std::string& mode) const;
    /// True while a strip view of the current frame is still being beamformed.
    bool isStripRunning() const { return !strip_running_.empty(); }
    /// Number of strip beamforming runs started (tests).
    long stripRuns() const;
    /// Shows `mode` large: an undoable edit of delay_model.mode. A strip image of the current
    /// frame is taken over at once (no second beamforming run; the travel-time tables of every
    /// view stay cached in any case). Throws core::SettingError like editRecipeValue.
    void showViewLarge(const std::string& mode);

    // ------------------------------------------------------------------ view state
    core::ViewState viewState() const { return view_; }
    /// Stored with the case; the image view pushes it here (not an undoable edit). The chosen
    /// views are kept (setChosenViews changes them).
    void setViewState(const core::ViewState& v) {
        auto views = std::move(view_.views);
        view_ = v;
        view_.views = std::move(views);
    }

signals:
    void caseChanged();           ///< new/open/save: path, title or document replaced
    void captureChanged();        ///< another capture (or none) is active
    void recipeChanged();
    void imageChanged();          ///< display image of the current frame replaced
    void frameChanged(qulonglong frame);
    void measurementsChanged();
    void selectionChanged(QString id);
    void findingsChanged();
    void curveChanged();          ///< distance–amplitude curve set, changed or cleared
    void weldChanged();           ///< weld geometry set, changed or removed
    void stripChanged();          ///< chosen views, or a strip image, changed
    void coverageReady();         ///< a coverage map computed in the background is ready
    void topViewChanged();
    void busyChanged(bool busy);
    void progressChanged(double fraction, QString what);
    /// No run reports progress any more (finished, cancelled or failed): hide the progress.
    void progressStopped();
    void dirtyChanged(bool dirty);
    void errorOccurred(QString message);
    void statusMessage(QString message);

private:
    void resetState();
    /// Rounds the pre-filled numbers of a finding to their uncertainties (GUM 7.2.6); returns
    /// the rounded texts by key ("x", "depth", "length", "height").
    std::map<std::string, std::string> roundIndication(core::Indication& ind, const core::Measurement& m) const;
    void openActiveCapture();
    void storeActiveState();
    void requestBeamform();
    void rerender();
    void rebuildTopView();
    void setBusy(bool b);
    void markDirty();
    /// Pushes an undoable change of the active capture's calibration lines (speed, elements).
    void recordCalibration(const QString& what, const std::pair<std::vector<std::string>, std::vector<std::string>>& after);
    /// Appends the current document to the journal as the edit `what` (see journalFile()).
    void journal(const QString& what);
    void stopTopViewRun();
    /// Wraps a setter of per-capture state so that it first makes the capture active that was
    /// active when the edit was made (undo/redo after switching captures).
    template <typename T>
    std::function<void(const T&)> onThisCapture(std::function<void(const T&)> set);
    void ensureActiveCapture(size_t index);
    /// Pixels (ix, iz) of the current frame inside a measurement's box (see addCurvePointFrom).
    template <class F>
    void forEachPixelIn(const core::Measurement& m, F&& f) const;
    std::optional<Peak> peakOf(const core::Measurement& m, const std::vector<float>& amp) const;
    void onFrameReady(quint64 gen, qulonglong frame, FramePtr img, double seconds, double fidelity, bool background);
    /// Display image of a linear envelope with the recipe's TCG, log compression and colours.
    QImage renderFrame(const core::Frame& f) const;
    /// Drops the strip's frames (another frame, recipe or capture) and stops its run.
    void clearStrip();
    /// Starts beamforming the next strip view that has neither an image nor a problem.
    void continueStrip();
    void onStripFrameReady(quint64 gen, qulonglong frame, FramePtr img);
    core::CaseCapture& active();
    const core::CaseCapture* activeOrNull() const;

    core::CaseDocument doc_;
    QString case_path_;
    bool extra_dirty_ = false;
    QUndoStack undo_;
    std::unique_ptr<core::EditJournal> journal_;
    int journal_index_ = 0;        ///< undo index the journal last recorded
    bool journal_off_ = false;     ///< while a case is being replaced (no user edit)
    bool journal_error_shown_ = false;

    std::unique_ptr<core::CaptureReader> reader_;
    QString capture_problem_;
    core::Recipe recipe_;
    core::ViewState view_;
    size_t frame_ = 0;
    QString selected_;

    BeamformWorker* worker_ = nullptr;
    quint64 generation_ = 0;
    std::map<size_t, FramePtr> cache_;
    FramePtr envelope_;
    std::vector<float> db_;
    std::vector<float> tgc_amp_;
    mutable std::optional<recon::CoverageMap> coverage_;  ///< cache for coverage() (nullopt: the view cannot be mapped)
    mutable std::string coverage_key_;                    ///< capture, view and region it was made for
    /// Key of the map to make now ("" without an image), with its view and grid.
    std::string coverageKey(std::string* mode, recon::Grid* grid) const;
    /// Starts the map of `key` in the background unless it is already running.
    void startCoverage(const std::string& key, const std::string& mode, const recon::Grid& g) const;
    /// Takes the finished background map into coverage_ when it is the one asked for.
    void takeCoverage() const;
    mutable std::future<std::optional<recon::CoverageMap>> coverage_job_;
    mutable std::string coverage_job_key_;
    mutable std::vector<std::future<std::optional<recon::CoverageMap>>> coverage_stale_;  ///< superseded, still running
    QTimer* coverage_poll_ = nullptr;
    mutable std::optional<recon::SizingSetup> sizing_setup_;  ///< cache; reset when tgc_amp_ changes
    QImage image_;
    QImage top_image_;
    std::pair<double, double> top_gate_mm_{0, 0};
    std::vector<float> top_peak_;   ///< top view projection [frames][N_x] (TCG applied)
    std::vector<bool> top_have_;    ///< frames present in it
    std::vector<double> top_x_mm_;  ///< its x axis, mm
    double render_ms_ = 0;
    double beamform_s_ = 0;
    double fidelity_db_ = 0;
    bool busy_ = false;
    bool top_running_ = false;
    std::vector<core::Measurement> empty_;

    BeamformWorker* strip_worker_ = nullptr;  ///< the strip's views, one at a time, after the large one
    quint64 strip_generation_ = 0;
    size_t strip_frame_ = 0;                  ///< frame the strip's images belong to
    std::string strip_running_;               ///< view being beamformed ("" = none)
    std::map<std::string, FramePtr> strip_frames_;  ///< linear envelopes by view (current frame)
    std::map<std::string, QImage> strip_images_;
    std::map<std::string, QString> strip_problems_;
};

/// Key of the first recipe parameter whose stage or name contains `needle` ("" if none).
std::string findRecipeKey(const core::Recipe& r, const std::string& needle, bool display_only_only = true);

}  // namespace umbra::ui
