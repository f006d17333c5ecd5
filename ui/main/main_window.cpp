// SPDX-License-Identifier: MIT
#include "ui/main/main_window.h"

#include <QAction>
#include <QActionGroup>
#include <QApplication>
#include <QCloseEvent>
#include <QComboBox>
#include <QDateTime>
#include <QDialog>
#include <QDialogButtonBox>
#include <QDockWidget>
#include <QDragEnterEvent>
#include <QDropEvent>
#include <QFile>
#include <QFileDialog>
#include <QFileInfo>
#include <QHBoxLayout>
#include <QInputDialog>
#include <QLabel>
#include <QMenuBar>
#include <QMessageBox>
#include <QMimeData>
#include <QPlainTextEdit>
#include <QProgressBar>
#include <QSlider>
#include <QStatusBar>
#include <QTextStream>
#include <QTimer>
#include <QToolBar>
#include <QToolButton>
#include <QUndoStack>
#include <QVBoxLayout>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <sstream>

#include "core/case_file.h"
#include "core/error.h"
#include "ui/controller/case_controller.h"
#include "ui/export/image_export.h"
#include "ui/main/findings_dock.h"
#include "ui/recipe/recipe_panel.h"
#include "ui/topview/top_view.h"
#include "ui/trace/trace_view.h"
#include "ui/viewer/image_view.h"

namespace umbra::ui {

MainWindow::MainWindow(Options options, QWidget* parent)
    : QMainWindow(parent), opt_(options), ctl_(new CaseController(this)) {
    setObjectName("UmbraMainWindow");
    view_ = new ImageView(ctl_, this);
    setCentralWidget(view_);
    setAcceptDrops(true);
    setDockNestingEnabled(true);
    buildDocks();
    buildActions();
    buildStatusBar();

    connect(ctl_, &CaseController::caseChanged, this, &MainWindow::onCaptureChanged);  // title and capture list
    connect(ctl_, &CaseController::dirtyChanged, this, &MainWindow::updateTitle);
    connect(ctl_, &CaseController::captureChanged, this, &MainWindow::onCaptureChanged);
    connect(ctl_, &CaseController::frameChanged, this, &MainWindow::updateFrameControls);
    connect(ctl_, &CaseController::imageChanged, this, &MainWindow::updateTimings);
    connect(ctl_, &CaseController::errorOccurred, this, [this](const QString& m) { showError(tr("Problem"), m); });
    connect(ctl_, &CaseController::statusMessage, this, [this](const QString& m) { statusBar()->showMessage(m, 5000); });
    connect(ctl_, &CaseController::busyChanged, this, [this](bool busy) {
        progress_->setVisible(busy);
        cancel_->setVisible(busy);
        if (busy) progress_->setValue(0);
    });
    connect(ctl_, &CaseController::progressChanged, this, [this](double f, const QString& what) {
        progress_->setValue(static_cast<int>(std::lround(f * 100)));
        progress_->setFormat(what + "  %p%");
        if (!ctl_->isBusy()) {  // background frames for the top view: show quietly
            progress_->setVisible(f < 1.0);
            cancel_->setVisible(false);
        }
    });
    connect(view_, &ImageView::viewChanged, this, [this] { ctl_->setViewState(view_->viewState()); });
    connect(view_, &ImageView::toolChanged, this, [this](Tool t) {
        ctl_->setViewState(view_->viewState());
        const QString name = toolName(t);
        for (QAction* a : tools_->actions())
            if (a->data().toString() == name) a->setChecked(true);
    });
    connect(view_, &ImageView::cursorMoved, this, [this](QPointF mm, bool inside) {
        if (!inside) {
            readout_->setText(ctl_->hasImage() ? tr("x —  depth —") : QString());
            return;
        }
        const auto db = view_->dbAt(mm);
        QString amp = db ? QStringLiteral("%1 dB re frame peak").arg(*db, 0, 'f', 1) : QStringLiteral("—");
        if (ctl_->amplitudeReference()) {
            // dB of the TCG-corrected envelope at the nearest pixel, relative to the case reference.
            amp = QStringLiteral("—");
            const core::Frame* f = ctl_->envelope();
            const auto& a = ctl_->tgcAmplitude();
            if (f && f->nx() > 1 && f->nz() > 1 && a.size() == f->nx() * f->nz()) {
                const double dx = (f->x_m[1] - f->x_m[0]) * 1e3, dz = (f->z_m[1] - f->z_m[0]) * 1e3;
                const long ix = std::lround((mm.x() - f->x_m[0] * 1e3) / dx), iz = std::lround((mm.y() - f->z_m[0] * 1e3) / dz);
                if (ix >= 0 && iz >= 0 && ix < static_cast<long>(f->nx()) && iz < static_cast<long>(f->nz()))
                    if (const auto r = ctl_->dbReReference(a[static_cast<size_t>(iz) * f->nx() + static_cast<size_t>(ix)]))
                        amp = QStringLiteral("%1 %2").arg(*r, 0, 'f', 1).arg(ctl_->amplitudeUnit());
            }
        }
        readout_->setText(tr("x %1 mm   depth %2 mm   %3").arg(mm.x(), 0, 'f', 2).arg(mm.y(), 0, 'f', 2).arg(amp));
        trace_->setCursor(mm.x(), mm.y());
    });

    autosave_ = new QTimer(this);
    autosave_->setInterval(std::max(1, opt_.autosave_seconds) * 1000);
    connect(autosave_, &QTimer::timeout, this, [this] {
        if (ctl_->isDirty()) autosaveNow();
    });
    autosave_->start();

    resize(1480, 920);
    updateTitle();
    onCaptureChanged();
}

MainWindow::~MainWindow() = default;

// ------------------------------------------------------------------------------- layout

void MainWindow::buildDocks() {
    recipe_ = new RecipePanel(ctl_);
    auto* rd = new QDockWidget(tr("Recipe"), this);
    rd->setObjectName("RecipeDock");
    rd->setWidget(recipe_);
    rd->setMinimumWidth(300);
    addDockWidget(Qt::LeftDockWidgetArea, rd);
    connect(recipe_, &RecipePanel::loadRecipeRequested, this, &MainWindow::loadRecipe);
    connect(recipe_, &RecipePanel::saveRecipeRequested, this, &MainWindow::saveRecipe);

    auto docks = buildFindingsDocks(ctl_, this);
    findings_ = docks.findings;
    table_ = docks.measurements;
    auto* fd = new QDockWidget(tr("Findings"), this);
    fd->setObjectName("FindingsDock");
    fd->setWidget(findings_);
    fd->setMinimumWidth(330);
    addDockWidget(Qt::RightDockWidgetArea, fd);
    auto* md = new QDockWidget(tr("Measurements"), this);
    md->setObjectName("MeasurementsDock");
    md->setWidget(table_);
    addDockWidget(Qt::RightDockWidgetArea, md);
    splitDockWidget(fd, md, Qt::Vertical);

    trace_ = new TraceView(ctl_);
    auto* td = new QDockWidget(tr("Trace view"), this);
    td->setObjectName("TraceDock");
    td->setWidget(trace_);
    addDockWidget(Qt::BottomDockWidgetArea, td);

    top_ = new TopView(ctl_);
    top_dock_ = new QDockWidget(tr("Top view"), this);
    top_dock_->setObjectName("TopViewDock");
    top_dock_->setWidget(top_);
    addDockWidget(Qt::BottomDockWidgetArea, top_dock_);
    splitDockWidget(td, top_dock_, Qt::Horizontal);
    resizeDocks({td}, {240}, Qt::Vertical);
    resizeDocks({td, top_dock_}, {880, 520}, Qt::Horizontal);
    resizeDocks({fd, md}, {420, 260}, Qt::Vertical);
}

void MainWindow::buildActions() {
    QMenu* file = menuBar()->addMenu(tr("&File"));
    QAction* a = file->addAction(tr("&Open capture or case…"), this, &MainWindow::open);
    a->setShortcut(QKeySequence::Open);
    a = file->addAction(tr("Add capture to case…"), this, [this] {
        const QString p = QFileDialog::getOpenFileName(this, tr("Add capture"), {}, tr("Captures (*.h5 *.hdf5)"));
        if (p.isEmpty()) return;
        try {
            ctl_->addCapture(p);
        } catch (const std::exception& e) {
            showError(tr("Cannot add capture"), QString::fromStdString(e.what()));
        }
    });
    file->addSeparator();
    a = file->addAction(tr("&Save case"), this, &MainWindow::save);
    a->setShortcut(QKeySequence::Save);
    a = file->addAction(tr("Save case &as…"), this, &MainWindow::saveAs);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_S));
    file->addAction(tr("&Relocate capture…"), this, &MainWindow::relocate);
    file->addSeparator();
    file->addAction(tr("Load recipe…"), this, &MainWindow::loadRecipe);
    file->addAction(tr("Save recipe…"), this, &MainWindow::saveRecipe);
    file->addSeparator();
    a = file->addAction(tr("&Export image…"), this, &MainWindow::exportDialog);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_E));
    file->addSeparator();
    a = file->addAction(tr("&Quit"), this, &QWidget::close);
    a->setShortcut(QKeySequence::Quit);

    QMenu* edit = menuBar()->addMenu(tr("&Edit"));
    undo_ = ctl_->undoStack()->createUndoAction(this, tr("&Undo"));
    undo_->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_Z));
    redo_ = ctl_->undoStack()->createRedoAction(this, tr("&Redo"));
    redo_->setShortcuts({QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_Z), QKeySequence(Qt::CTRL | Qt::Key_Y)});
    edit->addAction(undo_);
    edit->addAction(redo_);
    edit->addSeparator();
    a = edit->addAction(tr("&Delete measurement"), this, [this] {
        if (!ctl_->selectedMeasurement().isEmpty()) ctl_->deleteMeasurement(ctl_->selectedMeasurement().toStdString());
    });
    a->setShortcut(QKeySequence::Delete);
    edit->addAction(tr("Re&label measurement…"), this, [this] {
        const QString id = ctl_->selectedMeasurement();
        const auto* m = ctl_->measurement(id.toStdString());
        if (!m) return;
        bool ok = false;
        const QString t = QInputDialog::getText(this, tr("Label"), tr("Label of %1:").arg(id), QLineEdit::Normal,
                                                QString::fromStdString(m->label), &ok);
        if (ok) ctl_->relabelMeasurement(id.toStdString(), t.toStdString());
    });
    edit->addAction(tr("Case &title…"), this, [this] {
        bool ok = false;
        const QString t = QInputDialog::getText(this, tr("Case title"), tr("Title:"), QLineEdit::Normal, ctl_->displayName(), &ok);
        if (ok) ctl_->setTitle(t);
    });

    QMenu* tools = menuBar()->addMenu(tr("&Tools"));
    tools_ = new QActionGroup(this);
    tools_->setExclusive(true);
    struct T { Tool t; QString text; QKeySequence key; QString tip; };
    const T list[] = {
        {Tool::Select, tr("&Select / pan"), QKeySequence(Qt::Key_Escape), tr("Select and drag measurements; drag empty image to pan")},
        {Tool::Caliper, tr("&Caliper"), QKeySequence(Qt::Key_C), tr("Two points: Δx, Δdepth, distance")},
        {Tool::DepthMarker, tr("&Depth marker"), QKeySequence(Qt::Key_D), tr("One point: depth below the surface")},
        {Tool::ExtentBox, tr("Extent &box"), QKeySequence(Qt::Key_B), tr("Two corners: length and height")},
        {Tool::Ellipse, tr("&Ellipse"), QKeySequence(Qt::Key_E), tr("Centre and two axis ends: axes, area, circumference")},
        {Tool::DropSizing, tr("−6 dB &sizing"), QKeySequence(Qt::Key_S),
         tr("Box around an indication: length and height where the amplitude stays within 6 dB of its peak")},
        {Tool::Drop20Sizing, tr("−&20 dB sizing"), QKeySequence(Qt::Key_G),
         tr("Box around an indication: length and height within 20 dB of its peak, beam spread removed")},
        {Tool::TipSizing, tr("&Tip sizing"), QKeySequence(Qt::Key_T),
         tr("Box around a flaw's two tip echoes: marks both tips; height = their depth difference")},
    };
    for (const auto& t : list) {
        QAction* ta = tools->addAction(t.text);
        ta->setCheckable(true);
        ta->setShortcut(t.key);
        ta->setToolTip(QStringLiteral("%1 (%2)").arg(t.tip, t.key.toString(QKeySequence::NativeText)));
        ta->setData(toolName(t.t));
        ta->setChecked(t.t == Tool::Select);
        tools_->addAction(ta);
        const Tool tool = t.t;
        connect(ta, &QAction::triggered, this, [this, tool] { setTool(tool); });
    }
    tools->addSeparator();
    a = tools->addAction(tr("Uncertainty &budget of selected measurement…"), this, [this] {
        const QString id = ctl_->selectedMeasurement();
        const QString text = ctl_->budgetText(id.toStdString());
        if (text.isEmpty()) {
            QMessageBox::information(this, tr("Uncertainty budget"), tr("Select a measurement first."));
            return;
        }
        QDialog dlg(this);
        dlg.setWindowTitle(tr("Uncertainty budget — %1").arg(id));
        auto* lay = new QVBoxLayout(&dlg);
        auto* view = new QPlainTextEdit(text, &dlg);
        view->setReadOnly(true);
        view->setObjectName(QStringLiteral("budgetText"));
        view->setMinimumSize(620, 360);
        lay->addWidget(view);
        auto* close = new QDialogButtonBox(QDialogButtonBox::Close, &dlg);
        connect(close, &QDialogButtonBox::rejected, &dlg, &QDialog::reject);
        lay->addWidget(close);
        dlg.exec();
    });
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_U));
    a = tools->addAction(tr("Speed-of-sound &uncertainty…"), this, [this] {
        const auto [medium, rel] = ctl_->speedUncertainty();
        const QStringList media{tr("guess from the speed"), "steel", "water", "soft tissue", "other"};
        bool ok = false;
        const QString m = QInputDialog::getItem(this, tr("Speed-of-sound uncertainty"),
                                                tr("Medium (sets the default; now %1):").arg(QString::fromStdString(medium)), media, 0, false, &ok);
        if (!ok) return;
        const std::string med = m == media[0] ? std::string() : m.toStdString();
        const double def = core::speedUncertaintyDefault(med.empty() ? medium : med).relative * 100;
        const double pct = QInputDialog::getDouble(this, tr("Speed-of-sound uncertainty"),
                                                   tr("Relative standard uncertainty of the speed of sound, % (default %1 %):").arg(def),
                                                   def, 0.0, 50.0, 2, &ok);
        if (!ok) return;
        ctl_->setSpeedUncertainty(med, std::abs(pct - def) < 1e-9 ? std::nullopt : std::optional<double>(pct / 100));
    });
    a->setToolTip(tr("The case's relative uncertainty of the speed of sound, used in every depth's uncertainty budget"));
    a = tools->addAction(tr("Size the selected box tip to tip"), this, [this] {
        ctl_->changeSizingKind(ctl_->selectedMeasurement().toStdString(), core::MeasurementKind::TipSizing);
    });
    a->setToolTip(tr("Turns the selected −6 dB or −20 dB box into tip sizing (offered when the box holds two or more peaks)"));
    tools->addSeparator();
    a = tools->addAction(tr("Add &finding from selected measurement"), this, &MainWindow::addFindingFromSelection);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_F));
    tools->addSeparator();
    a = tools->addAction(tr("Set amplitude &reference from selection…"), this, &MainWindow::setReferenceFromSelection);
    a->setToolTip(tr("The peak inside the selected box (or at the selected depth marker) on this frame becomes 0 dB"));
    a = tools->addAction(tr("Clear amplitude reference"), this, [this] {
        ctl_->editAmplitudeReference(std::nullopt, tr("Clear amplitude reference"));
    });

    QMenu* view = menuBar()->addMenu(tr("&View"));
    a = view->addAction(tr("&Fit image"), view_, &ImageView::fitToWindow);
    a->setShortcut(QKeySequence(Qt::Key_F));
    a = view->addAction(tr("Zoom &in"), this, [this] { view_->zoomBy(1.25); });
    a->setShortcuts({QKeySequence(Qt::Key_Plus), QKeySequence(Qt::Key_Equal)});
    a = view->addAction(tr("Zoom &out"), this, [this] { view_->zoomBy(0.8); });
    a->setShortcut(QKeySequence(Qt::Key_Minus));
    view->addSeparator();
    a = view->addAction(tr("&Next frame"), this, [this] { ctl_->setCurrentFrame(ctl_->currentFrame() + 1); });
    a->setShortcut(QKeySequence(Qt::Key_PageDown));
    a = view->addAction(tr("&Previous frame"), this, [this] {
        if (ctl_->currentFrame() > 0) ctl_->setCurrentFrame(ctl_->currentFrame() - 1);
    });
    a->setShortcut(QKeySequence(Qt::Key_PageUp));
    a = view->addAction(tr("&Cancel reconstruction"), ctl_, &CaseController::cancelReconstruction);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_Period));
    view->addSeparator();
    for (QDockWidget* d : findChildren<QDockWidget*>()) view->addAction(d->toggleViewAction());

    QMenu* help = menuBar()->addMenu(tr("&Help"));
    help->addAction(tr("&About Umbra"), this, [this] {
        QMessageBox::about(this, tr("About Umbra"),
                           tr("<b>Umbra</b> — ultrasonic array imaging workstation.<br>"
                              "Reconstructs images from raw array captures, measures them with stated "
                              "uncertainty and keeps indication, interpretation and evaluation apart.<br><br>"
                              "Umbra is an aid: written procedures, the applicable codes and qualified, "
                              "licensed professionals decide."));
    });

    // Toolbar.
    QToolBar* tb = addToolBar(tr("Main"));
    tb->setObjectName("MainToolBar");
    tb->setMovable(false);
    tb->setToolButtonStyle(Qt::ToolButtonTextOnly);
    tb->addAction(tr("Open"), this, &MainWindow::open)->setToolTip(tr("Open a capture or a case (Ctrl+O)"));
    tb->addAction(tr("Save"), this, &MainWindow::save)->setToolTip(tr("Save the case (Ctrl+S)"));
    tb->addAction(tr("Export"), this, &MainWindow::exportDialog)->setToolTip(tr("Export an annotated PNG (Ctrl+E)"));
    tb->addSeparator();
    for (QAction* t : tools_->actions()) tb->addAction(t);
    tb->addAction(tr("Add finding"), this, &MainWindow::addFindingFromSelection)
        ->setToolTip(tr("Add a finding from the selected measurement (Ctrl+F)"));
    tb->addSeparator();
    // Toolbar buttons with fixed text (the menu entries name the edit).
    QAction* tu = tb->addAction(tr("Undo"), ctl_->undoStack(), &QUndoStack::undo);
    QAction* tr_ = tb->addAction(tr("Redo"), ctl_->undoStack(), &QUndoStack::redo);
    tu->setEnabled(false);
    tr_->setEnabled(false);
    connect(ctl_->undoStack(), &QUndoStack::canUndoChanged, tu, &QAction::setEnabled);
    connect(ctl_->undoStack(), &QUndoStack::canRedoChanged, tr_, &QAction::setEnabled);
    connect(ctl_->undoStack(), &QUndoStack::undoTextChanged, tu, [tu](const QString& t) { tu->setToolTip(tr("Undo %1 (Ctrl+Z)").arg(t)); });
    connect(ctl_->undoStack(), &QUndoStack::redoTextChanged, tr_, [tr_](const QString& t) { tr_->setToolTip(tr("Redo %1 (Ctrl+Shift+Z)").arg(t)); });
    tb->addSeparator();
    capture_combo_ = new QComboBox;
    capture_combo_->setToolTip(tr("Capture of the case shown"));
    capture_combo_->setMinimumContentsLength(16);
    tb->addWidget(capture_combo_);
    connect(capture_combo_, &QComboBox::currentIndexChanged, this, [this](int i) {
        if (!updating_controls_ && i >= 0) ctl_->setActiveCapture(static_cast<size_t>(i));
    });
    tb->addSeparator();
    auto* fl = new QLabel(tr(" Frame "));
    tb->addWidget(fl);
    frame_slider_ = new QSlider(Qt::Horizontal);
    frame_slider_->setMinimumWidth(220);
    frame_slider_->setMaximumWidth(360);
    frame_slider_->setToolTip(tr("Frame of the capture (PgUp / PgDown)"));
    tb->addWidget(frame_slider_);
    frame_label_ = new QLabel;
    frame_label_->setMinimumWidth(150);
    tb->addWidget(frame_label_);
    connect(frame_slider_, &QSlider::valueChanged, this, [this](int v) {
        if (!updating_controls_) ctl_->setCurrentFrame(static_cast<size_t>(v));
    });
}

void MainWindow::buildStatusBar() {
    readout_ = new QLabel;
    readout_->setMinimumWidth(330);
    timing_ = new QLabel;
    timing_->setToolTip(tr("Display: time to re-map the stored image (TCG, log compression, colour). "
                           "Beamform: wall time of the last delay-and-sum run."));
    progress_ = new QProgressBar;
    progress_->setMaximumWidth(320);
    progress_->setRange(0, 100);
    progress_->hide();
    cancel_ = new QToolButton;
    cancel_->setText(tr("Cancel"));
    cancel_->setToolTip(tr("Stop the reconstruction (Ctrl+.)"));
    cancel_->hide();
    connect(cancel_, &QToolButton::clicked, ctl_, &CaseController::cancelReconstruction);
    ref_warning_ = new QLabel;
    ref_warning_->setStyleSheet("color: #b3261e; font-weight: bold;");
    ref_warning_->hide();
    connect(ctl_, &CaseController::referenceChanged, this, &MainWindow::updateReferenceWarning);
    connect(ctl_, &CaseController::recipeChanged, this, &MainWindow::updateReferenceWarning);
    statusBar()->addWidget(readout_);
    statusBar()->addPermanentWidget(ref_warning_);  // permanent: temporary messages never cover it
    statusBar()->addPermanentWidget(timing_);
    statusBar()->addPermanentWidget(progress_);
    statusBar()->addPermanentWidget(cancel_);
}

void MainWindow::updateTitle() {
    setWindowTitle(QStringLiteral("%1[*] — Umbra").arg(ctl_->displayName()));
    setWindowModified(ctl_->isDirty());
}

void MainWindow::onCaptureChanged() {
    updating_controls_ = true;
    capture_combo_->clear();
    const auto doc = ctl_->document();
    for (const auto& c : doc.captures) capture_combo_->addItem(QFileInfo(QString::fromStdString(c.path)).fileName());
    capture_combo_->setCurrentIndex(static_cast<int>(ctl_->activeCapture()));
    capture_combo_->setEnabled(doc.captures.size() > 1);
    updating_controls_ = false;
    top_dock_->setVisible(ctl_->isEncodedScan());
    updateFrameControls();
    updateTitle();
}

void MainWindow::updateFrameControls() {
    updating_controls_ = true;
    const size_t n = ctl_->frameCount();
    frame_slider_->setEnabled(n > 1);
    frame_slider_->setRange(0, static_cast<int>(n > 0 ? n - 1 : 0));
    frame_slider_->setValue(static_cast<int>(ctl_->currentFrame()));
    QString label = n ? tr("%1 / %2").arg(ctl_->currentFrame() + 1).arg(n) : QString();
    const QString fl = ctl_->frameLabel(ctl_->currentFrame());
    if (!fl.isEmpty()) label += "   " + fl;
    frame_label_->setText(label);
    updating_controls_ = false;
}

void MainWindow::updateTimings() {
    if (!ctl_->hasImage()) {
        timing_->clear();
        return;
    }
    timing_->setText(tr("display %1 ms · beamform %2 s · fidelity %3 dB")
                         .arg(ctl_->lastRenderMs(), 0, 'f', 1)
                         .arg(ctl_->lastBeamformSeconds(), 0, 'f', 2)
                         .arg(ctl_->amplitudeFidelityDb(), 0, 'f', 2));
    if (opt_.timings) {
        const core::Frame* f = ctl_->envelope();
        std::fprintf(stderr, "umbra timings: frame %zu %zux%zu display re-render %.2f ms, last beamform %.3f s, runs %ld\n",
                     ctl_->currentFrame(), f ? f->nx() : 0, f ? f->nz() : 0, ctl_->lastRenderMs(),
                     ctl_->lastBeamformSeconds(), ctl_->beamformRuns());
    }
}

void MainWindow::showError(const QString& title, const QString& text) {
    statusBar()->showMessage(text, 15000);
    if (opt_.interactive) QMessageBox::warning(this, title, text);
    else std::fprintf(stderr, "umbra: %s\n", text.toLocal8Bit().constData());
}

// ------------------------------------------------------------------------------- files

bool MainWindow::maybeSave() {
    if (!ctl_->isDirty() || !opt_.interactive) return true;
    const auto r = QMessageBox::question(this, tr("Unsaved changes"),
                                         tr("The case \"%1\" has unsaved changes. Save them?").arg(ctl_->displayName()),
                                         QMessageBox::Save | QMessageBox::Discard | QMessageBox::Cancel);
    if (r == QMessageBox::Cancel) return false;
    if (r == QMessageBox::Save) return save();
    return true;
}

void MainWindow::open() {
    const QString p = QFileDialog::getOpenFileName(this, tr("Open capture or case"), {},
                                                   tr("Captures and cases (*.h5 *.hdf5 *.umbracase);;All files (*)"));
    if (!p.isEmpty()) openPath(p);
}

bool MainWindow::openPath(const QString& path) {
    if (!maybeSave()) return false;
    try {
        if (path.endsWith(".umbracase", Qt::CaseInsensitive) || path.endsWith(".autosave", Qt::CaseInsensitive)) {
            QString case_path = path;
            if (case_path.endsWith(".autosave")) case_path.chop(9);
            const QString as = QString::fromStdString(core::autosavePath(case_path.toStdString()));
            bool recover = false;
            const QFileInfo ai(as), ci(case_path);
            if (ai.exists() && (!ci.exists() || ai.lastModified() > ci.lastModified())) {
                if (opt_.recovery == Recovery::Recover) recover = true;
                else if (opt_.recovery == Recovery::Ask && opt_.interactive)
                    recover = QMessageBox::question(
                                  this, tr("Recover unsaved work?"),
                                  tr("An automatic save of this case, newer than the case file, exists:\n%1\n(saved %2)\n\n"
                                     "Open the automatic save instead? (The case file is not changed until you save.)")
                                      .arg(as, ai.lastModified().toString(Qt::ISODate))) == QMessageBox::Yes;
            }
            ctl_->openCase(case_path, recover);
            if (recover) statusBar()->showMessage(tr("Recovered unsaved work from %1").arg(as), 10000);
            if (!ctl_->captureProblem().isEmpty()) offerRelocation();
        } else {
            ctl_->openCapture(path);
        }
    } catch (const std::exception& e) {
        showError(tr("Cannot open"), QString::fromStdString(e.what()));
        return false;
    }
    return true;
}

void MainWindow::offerRelocation() {
    const QString problem = ctl_->captureProblem();
    if (problem.isEmpty()) return;
    QString p;
    if (!opt_.interactive) {
        if (!relocationProvider) {
            std::fprintf(stderr, "umbra: %s\n", problem.toLocal8Bit().constData());
            return;
        }
        p = relocationProvider();
    } else {
        QMessageBox box(QMessageBox::Warning, tr("Capture not available"), problem, QMessageBox::NoButton, this);
        QPushButton* find = box.addButton(tr("Locate capture…"), QMessageBox::AcceptRole);
        box.addButton(tr("Keep working without the image"), QMessageBox::RejectRole);
        box.exec();
        if (box.clickedButton() != reinterpret_cast<QAbstractButton*>(find)) return;
        p = QFileDialog::getOpenFileName(this, tr("Locate capture %1").arg(QFileInfo(ctl_->capturePath()).fileName()),
                                         QFileInfo(ctl_->capturePath()).absolutePath(), tr("Captures (*.h5 *.hdf5);;All files (*)"));
    }
    if (p.isEmpty()) return;
    try {
        QString why;
        if (!ctl_->relocateCapture(p, false, &why)) {
            bool accept = false;
            if (opt_.interactive)
                accept = QMessageBox::question(this, tr("Different capture"),
                                               why + tr("\n\nUse it anyway? Measurements may not match the data.")) == QMessageBox::Yes;
            if (!accept) {
                showError(tr("Capture not relocated"), why);
                return;
            }
            ctl_->relocateCapture(p, true);
        }
        statusBar()->showMessage(tr("Capture relocated to %1").arg(p), 8000);
    } catch (const std::exception& e) {
        showError(tr("Cannot relocate"), QString::fromStdString(e.what()));
    }
}

void MainWindow::relocate() {
    if (ctl_->captureCount() == 0) return;
    if (ctl_->captureProblem().isEmpty() && opt_.interactive) {
        const QString p = QFileDialog::getOpenFileName(this, tr("Relocate capture"), QFileInfo(ctl_->capturePath()).absolutePath(),
                                                       tr("Captures (*.h5 *.hdf5)"));
        if (p.isEmpty()) return;
        QString why;
        try {
            if (!ctl_->relocateCapture(p, false, &why)) showError(tr("Capture not relocated"), why);
        } catch (const std::exception& e) {
            showError(tr("Cannot relocate"), QString::fromStdString(e.what()));
        }
        return;
    }
    offerRelocation();
}

bool MainWindow::saveCaseTo(const QString& path) {
    ctl_->setViewState(view_->viewState());
    try {
        ctl_->saveCase(path);
    } catch (const std::exception& e) {
        showError(tr("Cannot save"), QString::fromStdString(e.what()));
        return false;
    }
    statusBar()->showMessage(tr("Saved %1").arg(path), 5000);
    return true;
}

bool MainWindow::save() {
    if (ctl_->casePath().isEmpty()) return saveAs();
    return saveCaseTo(ctl_->casePath());
}

bool MainWindow::saveAs() {
    QString p = QFileDialog::getSaveFileName(this, tr("Save case"), ctl_->displayName() + ".umbracase", tr("Cases (*.umbracase)"));
    if (p.isEmpty()) return false;
    if (!p.endsWith(".umbracase")) p += ".umbracase";
    return saveCaseTo(p);
}

void MainWindow::autosaveNow() {
    ctl_->setViewState(view_->viewState());
    try {
        const QString p = ctl_->autosave();
        if (!p.isEmpty()) statusBar()->showMessage(tr("Auto-saved to %1").arg(p), 3000);
    } catch (const std::exception& e) {
        statusBar()->showMessage(tr("Auto-save failed: %1").arg(QString::fromStdString(e.what())), 10000);
    }
}

bool MainWindow::exportImage(const QString& path, int width_px) {
    try {
        exportAnnotatedPng(path, *view_, *ctl_, width_px);
    } catch (const std::exception& e) {
        showError(tr("Cannot export"), QString::fromStdString(e.what()));
        return false;
    }
    statusBar()->showMessage(tr("Exported %1").arg(path), 5000);
    return true;
}

void MainWindow::exportDialog() {
    if (!ctl_->hasImage()) return;
    bool ok = false;
    const int w = QInputDialog::getInt(this, tr("Export image"), tr("Width of the PNG, pixels:"), 2400, 400, 12000, 100, &ok);
    if (!ok) return;
    QString p = QFileDialog::getSaveFileName(this, tr("Export image"), ctl_->displayName() + ".png", tr("PNG images (*.png)"));
    if (p.isEmpty()) return;
    if (!p.endsWith(".png", Qt::CaseInsensitive)) p += ".png";
    exportImage(p, w);
}

void MainWindow::loadRecipe() {
    const QString p = QFileDialog::getOpenFileName(this, tr("Load recipe"), {}, tr("Recipes (*.json);;All files (*)"));
    if (p.isEmpty()) return;
    std::ifstream in(p.toStdString());
    if (!in) {
        showError(tr("Cannot load recipe"), tr("%1: cannot be read").arg(p));
        return;
    }
    std::stringstream ss;
    ss << in.rdbuf();
    core::Recipe r = ctl_->recipe();
    try {
        r.mergeJson(ss.str(), p.toStdString());
    } catch (const std::exception& e) {
        showError(tr("Cannot load recipe"), QString::fromStdString(e.what()));
        return;
    }
    ctl_->editRecipe(r, tr("Load recipe %1").arg(QFileInfo(p).fileName()));
}

void MainWindow::saveRecipe() {
    QString p = QFileDialog::getSaveFileName(this, tr("Save recipe"), "recipe.json", tr("Recipes (*.json)"));
    if (p.isEmpty()) return;
    QFile f(p);
    if (!f.open(QIODevice::WriteOnly | QIODevice::Truncate)) {
        showError(tr("Cannot save recipe"), tr("%1: %2").arg(p, f.errorString()));
        return;
    }
    f.write(QByteArray::fromStdString(ctl_->recipe().toJson()));
}

// ------------------------------------------------------------------------------- tools

void MainWindow::setTool(Tool t) { view_->setTool(t); }

void MainWindow::addFindingFromSelection() {
    const QString id = ctl_->selectedMeasurement();
    if (id.isEmpty()) {
        statusBar()->showMessage(tr("Select a measurement first (Esc, then click it)"), 5000);
        return;
    }
    ctl_->addFindingFromMeasurement(id.toStdString());
}

void MainWindow::setReferenceFromSelection() {
    const QString id = ctl_->selectedMeasurement();
    if (id.isEmpty()) {
        statusBar()->showMessage(tr("Select an extent box or depth marker around the reference echo first"), 6000);
        return;
    }
    QString label = QStringLiteral("Ø2.5 mm SDH at %1 mm, reference block");
    if (const auto* m = ctl_->measurement(id.toStdString()); m && !m->points.empty())
        label = label.arg(m->kind == core::MeasurementKind::DepthMarker ? m->points[0].z_mm
                                                                       : 0.5 * (m->points[0].z_mm + m->points.back().z_mm),
                          0, 'f', 0);
    if (opt_.interactive) {
        bool ok = false;
        label = QInputDialog::getText(this, tr("Amplitude reference"),
                                      tr("What is the reference echo (reflector, depth, block)? Its peak becomes 0 dB."),
                                      QLineEdit::Normal, label, &ok);
        if (!ok) return;
    }
    QString why;
    if (!ctl_->setAmplitudeReferenceFrom(id.toStdString(), label, &why))
        showError(tr("Cannot set the amplitude reference"), why);
    else
        statusBar()->showMessage(tr("Amplitude reference set: %1").arg(label), 6000);
}

void MainWindow::updateReferenceWarning() {
    const QString w = ctl_->referenceWarning();
    const auto& ref = ctl_->amplitudeReference();
    if (!w.isEmpty()) {
        ref_warning_->setStyleSheet("color: #b3261e; font-weight: bold;");
        ref_warning_->setText(w);
    } else if (ref) {
        ref_warning_->setStyleSheet("color: #3b4250;");
        ref_warning_->setText(tr("0 dB = %1").arg(QString::fromStdString(ref->label)));
    }
    ref_warning_->setToolTip(ref ? tr("Amplitude reference: %1, linear amplitude %2 after TCG, taken at x = %3 mm, depth %4 mm")
                                       .arg(QString::fromStdString(ref->label))
                                       .arg(ref->amplitude, 0, 'g', 4)
                                       .arg(ref->x_mm, 0, 'f', 1)
                                       .arg(ref->z_mm, 0, 'f', 1)
                                 : QString());
    ref_warning_->setVisible(ref.has_value());
}

bool MainWindow::openDemo(const QString& dir) {
    const QString weld = dir + "/weld_coupon.h5";
    if (!QFileInfo::exists(weld)) {
        showError(tr("Demo not found"), tr("%1 does not exist. Make the demo captures first: cmake --build build --target samples").arg(weld));
        return false;
    }
    try {
        ctl_->openCapture(weld);
        const QString phantom = dir + "/phantom_p2.h5";
        if (QFileInfo::exists(phantom)) {
            ctl_->addCapture(phantom, false);
        }
        const QString block = dir + "/reference_block.h5";
        if (QFileInfo::exists(block)) ctl_->addCapture(block, false);
        core::CaseDocument t = ctl_->document();
        t.title = "Weld W-031, spool 14 (synthetic demo)";
        t.background = "Production weld, 5 % random selection for volumetric examination under the shop's written procedure.";
        ctl_->setCaseText(t);
    } catch (const std::exception& e) {
        showError(tr("Cannot open the demo"), QString::fromStdString(e.what()));
        return false;
    }
    return true;
}

void MainWindow::demoAnnotate() {
    const core::Frame* f = ctl_->envelope();
    const auto& db = ctl_->db();
    if (!f || f->nx() < 3 || f->nz() < 3 || db.size() != f->nx() * f->nz()) return;
    const size_t nx = f->nx(), nz = f->nz();
    // Strongest echo between 15 % and 75 % of the depth range, above a known back wall.
    size_t bx = 0, bz = nz / 2;
    float best = -1e30f;
    size_t zend = nz * 75 / 100;
    if (const auto& t = ctl_->header().medium.thickness_m; t && *t > 0)
        while (zend > nz / 5 && f->z_m[zend - 1] > *t - 2e-3) --zend;
    for (size_t iz = nz * 15 / 100; iz < zend; ++iz)
        for (size_t ix = nx / 10; ix < nx * 9 / 10; ++ix)
            if (db[iz * nx + ix] > best) best = db[iz * nx + ix], bx = ix, bz = iz;
    // -6 dB extent around it along the row and the column.
    const float lim = best - 6.0f;
    size_t x0 = bx, x1 = bx, z0 = bz, z1 = bz;
    while (x0 > 0 && db[bz * nx + x0 - 1] >= lim) --x0;
    while (x1 + 1 < nx && db[bz * nx + x1 + 1] >= lim) ++x1;
    while (z0 > 0 && db[(z0 - 1) * nx + bx] >= lim) --z0;
    while (z1 + 1 < nz && db[(z1 + 1) * nx + bx] >= lim) ++z1;
    auto X = [&](size_t i) { return f->x_m[i] * 1e3; };
    auto Z = [&](size_t i) { return f->z_m[i] * 1e3; };
    // A −6 dB sizing box with room around the indication (the tool finds the edges inside it).
    const double padx = std::max(1.0, X(x1) - X(x0)), padz = std::max(1.0, Z(z1) - Z(z0));
    core::Measurement box;
    box.kind = core::MeasurementKind::DropSizing;
    box.frame_index = ctl_->currentFrame();
    box.points = {{std::max(X(0), X(x0) - padx), std::max(Z(0), Z(z0) - padz)},
                  {std::min(X(nx - 1), X(x1) + padx), std::min(Z(nz - 1), Z(z1) + padz)}};
    box.label = "flaw";
    const std::string box_id = ctl_->addMeasurement(box);
    core::Measurement cal;
    cal.kind = core::MeasurementKind::Caliper;
    cal.frame_index = ctl_->currentFrame();
    const double span = (f->x_m.back() - f->x_m.front()) * 1e3;
    cal.points = {{X(bx) - span * 0.25, Z(bz) + (Z(nz - 1) - Z(bz)) * 0.45}, {X(bx) + span * 0.2, Z(bz) + (Z(nz - 1) - Z(bz)) * 0.45}};
    cal.label = "lateral";
    ctl_->addMeasurement(cal);
    ctl_->setSelectedMeasurement(QString::fromStdString(box_id));
    const std::string fid = ctl_->addFindingFromMeasurement(box_id);
    auto fs = ctl_->findings();
    for (auto& x : fs)
        if (x.id == fid)
            x.indication.description = "Echo sized at −6 dB from its peak; demonstration annotation placed automatically.";
    ctl_->editFindings(fs, tr("Describe finding"));
}

bool MainWindow::demoReference(double depth_mm) {
    const core::Frame* f = ctl_->envelope();
    if (!f || f->nx() < 3 || f->nz() < 3) return false;
    // A box across the image, ±1.5 mm about the stated depth: its peak is the hole's echo.
    core::Measurement box;
    box.kind = core::MeasurementKind::ExtentBox;
    box.frame_index = ctl_->currentFrame();
    box.points = {{f->x_m.front() * 1e3, depth_mm - 1.5}, {f->x_m.back() * 1e3, depth_mm + 1.5}};
    box.label = "reference echo";
    const std::string id = ctl_->addMeasurement(box);
    QString why;
    const bool ok = ctl_->setAmplitudeReferenceFrom(
        id, QStringLiteral("Ø2.5 mm SDH at %1 mm, reference block").arg(depth_mm, 0, 'f', 0), &why);
    if (!ok) std::fprintf(stderr, "umbra: demo reference: %s\n", why.toLocal8Bit().constData());
    return ok;
}

// ------------------------------------------------------------------------------- events

void MainWindow::closeEvent(QCloseEvent* e) {
    if (maybeSave()) {
        // Saved or deliberately discarded: the auto-saves are no longer needed.
        if (!ctl_->casePath().isEmpty() && (!ctl_->isDirty() || opt_.interactive))
            QFile::remove(QString::fromStdString(core::autosavePath(ctl_->casePath().toStdString())));
        if (opt_.interactive) QFile::remove(CaseController::untitledAutosavePath());
        e->accept();
    } else {
        e->ignore();
    }
}

void MainWindow::dragEnterEvent(QDragEnterEvent* e) {
    if (e->mimeData()->hasUrls()) e->acceptProposedAction();
}

void MainWindow::dropEvent(QDropEvent* e) {
    const auto urls = e->mimeData()->urls();
    if (urls.isEmpty() || !urls.front().isLocalFile()) return;
    e->acceptProposedAction();
    openPath(urls.front().toLocalFile());
}

}  // namespace umbra::ui
