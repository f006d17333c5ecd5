// SPDX-License-Identifier: MIT
#include "ui/main/main_window.h"

#include <QAction>
#include <QActionGroup>
#include <QApplication>
#include <QCloseEvent>
#include <QComboBox>
#include <QDateTime>
#include <QDir>
#include <QDialog>
#include <QDialogButtonBox>
#include <QDockWidget>
#include <QDragEnterEvent>
#include <QDropEvent>
#include <QFile>
#include <QFileDialog>
#include <QFileInfo>
#include <QFormLayout>
#include <QLineEdit>
#include <QHBoxLayout>
#include <QInputDialog>
#include <QLabel>
#include <QMenuBar>
#include <QMessageBox>

#include <optional>
#include <QMimeData>
#include <QPlainTextEdit>
#include <QProgressBar>
#include <QScrollArea>
#include <QSettings>
#include <QStandardPaths>
#include <QSlider>
#include <QSpinBox>
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

#include "core/blind_copy.h"
#include "core/case_file.h"
#include "core/dicom_image.h"
#include "core/error.h"
#include "core/practice.h"
#include "ui/agreement/agreement_dialog.h"
#include "ui/practice/practice_panel.h"
#include "ui/controller/case_controller.h"
#include "ui/dac/curve_panel.h"
#include "ui/export/image_export.h"
#include "ui/report/report.h"
#include "ui/findings/findings_pane.h"
#include "ui/main/findings_dock.h"
#include "ui/recipe/recipe_panel.h"
#include "ui/stored/stored_image_window.h"
#include "ui/topview/top_view.h"
#include "ui/trace/trace_view.h"
#include "ui/viewer/cine_controls.h"
#include "ui/viewer/image_view.h"
#include "ui/viewer/views_strip.h"
#include "ui/weld/weld_dialog.h"
#include "reconstruction/das_stage.h"
#include "core/uncertainty.h"

namespace umbra::ui {

MainWindow::MainWindow(Options options, QWidget* parent)
    : QMainWindow(parent), opt_(options), ctl_(new CaseController(this)) {
    setObjectName("UmbraMainWindow");
    view_ = new ImageView(ctl_, this);
    // The large view above the strip of the other chosen views (hidden when there are none).
    auto* centre = new QWidget(this);
    auto* centre_layout = new QVBoxLayout(centre);
    centre_layout->setContentsMargins(0, 0, 0, 0);
    centre_layout->setSpacing(0);
    centre_layout->addWidget(view_, 1);
    strip_ = new ViewsStrip(ctl_, centre);
    centre_layout->addWidget(strip_);
    connect(strip_, &ViewsStrip::problem, this, [this](const QString& t, const QString& m) { showError(t, m); });
    setCentralWidget(centre);
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
        if (busy) {
            progress_->setValue(0);
            progress_label_->clear();
            progress_label_->show();
            progress_->show();
            cancel_->show();
        } else if (!ctl_->isTopViewRunning()) {
            hideProgress();
        }
    });
    connect(ctl_, &CaseController::progressChanged, this, [this](double f, const QString& what) {
        progress_->setValue(static_cast<int>(std::lround(f * 100)));
        progress_->setToolTip(what);
        // The description in its own label, cut to its width: it never runs over other text.
        progress_label_->setText(progress_label_->fontMetrics().elidedText(what, Qt::ElideRight, progress_label_->maximumWidth()));
        progress_label_->setToolTip(what);
        progress_label_->show();
        progress_->show();
        cancel_->show();  // background frames for the top view can be stopped too
    });
    connect(ctl_, &CaseController::progressStopped, this, [this] {
        if (!ctl_->isBusy() && !ctl_->isTopViewRunning()) hideProgress();
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
        if (ctl_->curve()) {
            // dB of the envelope re the distance–amplitude curve at this depth (nearest pixel).
            amp = QStringLiteral("—");
            if (const auto r = ctl_->dbReCurveAtMm(mm.x(), mm.y())) {
                amp = QStringLiteral("%1 %2").arg(r->db, 0, 'f', 1).arg(ctl_->amplitudeUnit());
                if (r->outside) amp += QStringLiteral(" — ") + ctl_->outsideText();
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
    if (opt_.interactive) restoreLayout();
    updateTitle();
    onCaptureChanged();
}

void MainWindow::restoreLayout() {
    QSettings st;
    const QByteArray geometry = st.value("window/geometry").toByteArray();
    const QByteArray state = st.value("window/state").toByteArray();
    if (!geometry.isEmpty()) restoreGeometry(geometry);
    if (!state.isEmpty()) restoreState(state, kLayoutVersion);
}

void MainWindow::saveLayout() {
    QSettings st;
    st.setValue("window/geometry", saveGeometry());
    st.setValue("window/state", saveState(kLayoutVersion));
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
    curve_ = new CurvePanel(ctl_);
    auto* cd = new QDockWidget(tr("Distance–amplitude curve"), this);
    cd->setObjectName("CurveDock");
    cd->setWidget(curve_);
    addDockWidget(Qt::RightDockWidgetArea, cd);
    tabifyDockWidget(md, cd);
    md->raise();
    connect(curve_, &CurvePanel::addRequested, this, &MainWindow::addCurvePointFromSelection);
    connect(curve_, &CurvePanel::makeTcgRequested, this, &MainWindow::makeTcgFromCurve);
    // A point added or removed: show the list.
    connect(ctl_, &CaseController::curveChanged, cd, [this, cd] {
        if (ctl_->curve()) cd->raise();
    });

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
    resizeDocks({fd}, {390}, Qt::Horizontal);
}

void MainWindow::editWeld() {
    core::WeldGeometry w;
    if (ctl_->weld()) {
        w = *ctl_->weld();
    } else if (ctl_->hasCapture() && ctl_->header().medium.thickness_m) {
        w.thickness_mm = *ctl_->header().medium.thickness_m * 1e3;
    }
    WeldDialog dlg(w, ctl_->weld().has_value(), this);
    if (dlg.exec() != QDialog::Accepted) return;
    try {
        if (dlg.removeRequested())
            ctl_->editWeld(std::nullopt, tr("Remove the weld overlay"));
        else
            ctl_->editWeld(dlg.geometry(), ctl_->weld() ? tr("Edit the weld geometry") : tr("Enter the weld geometry"));
    } catch (const core::SettingError& e) {
        showError(tr("Weld geometry"), QString::fromUtf8(e.what()));
    }
}

void MainWindow::buildActions() {
    QMenu* file = menuBar()->addMenu(tr("&File"));
    QAction* a = file->addAction(tr("&Open capture, case or DICOM image…"), this, &MainWindow::open);
    a->setShortcut(QKeySequence::Open);
    a = file->addAction(tr("Add capture to case…"), this, [this] {
        const QString p = QFileDialog::getOpenFileName(this, tr("Add capture"), caseFolder(), tr("Captures (*.h5 *.hdf5)"));
        if (p.isEmpty()) return;
        try {
            ctl_->addCapture(p);
        } catch (const std::exception& e) {
            showError(tr("Cannot add capture"), QString::fromStdString(e.what()));
        }
    });
    demo_menu_ = file->addMenu(tr("Demo cases"));
    demo_menu_->setToolTip(tr("Synthetic demonstration cases (available after umbra --demo DIR)"));
    demo_menu_->addAction(tr("Weld W-031 with its reference block"), this, [this] { openDemoCase(demo_dir_, QStringLiteral("weld")); });
    demo_menu_->addAction(tr("Weld W-031 from a shear-wave wedge (views)"), this, [this] { openDemoCase(demo_dir_, QStringLiteral("wedge")); });
    demo_menu_->addAction(tr("Phantom P-2 (sonography practice)"), this, [this] { openDemoCase(demo_dir_, QStringLiteral("phantom")); });
    demo_menu_->setEnabled(false);
    file->addSeparator();
    a = file->addAction(tr("&Save case"), this, &MainWindow::save);
    a->setShortcut(QKeySequence::Save);
    a = file->addAction(tr("Save case &as…"), this, &MainWindow::saveAs);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_S));
    file->addAction(tr("&Relocate capture…"), this, &MainWindow::relocate);
    a = file->addAction(tr("Make &blind copy…"), this, [this] {
        const QString p = QFileDialog::getSaveFileName(this, tr("Blind copy for a second reader"), inCaseFolder("blind.umbracase"),
                                                       tr("Umbra cases (*.umbracase)"));
        if (!p.isEmpty()) makeBlindCopy(p);
    });
    a->setToolTip(tr("A new case with the same captures and recipes, without measurements, findings, texts or amplitude reference"));
    file->addSeparator();
    file->addAction(tr("Load recipe…"), this, &MainWindow::loadRecipe);
    file->addAction(tr("Save recipe…"), this, &MainWindow::saveRecipe);
    file->addSeparator();
    a = file->addAction(tr("&Export image…"), this, &MainWindow::exportDialog);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_E));
    file->addAction(tr("Report &header…"), this, &MainWindow::reportHeaderDialog);
    file->addAction(tr("&Report…"), this, &MainWindow::reportDialog);
    file->addAction(tr("Export &DICOM…"), this, &MainWindow::exportDicomDialog);
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
    a = tools->addAction(tr("Calibrate speed from &back wall…"), this, [this] {
        double d = 20;
        if (ctl_->weld()) d = ctl_->weld()->thickness_mm;
        else if (ctl_->hasCapture() && ctl_->header().medium.thickness_m) d = *ctl_->header().medium.thickness_m * 1e3;
        bool ok = false;
        d = QInputDialog::getDouble(this, tr("Calibrate speed of sound"), tr("Plate thickness under the array, mm:"), d, 0.1, 1000, 3, &ok);
        if (!ok) return;
        const double tol = QInputDialog::getDouble(this, tr("Calibrate speed of sound"),
                                                   tr("Tolerance of the thickness, ± mm (as measured, e.g. micrometer):"), 0.05, 0, 10, 3, &ok);
        if (!ok) return;
        QString why;
        const auto c = ctl_->calibrateSpeed(d, tol, &why);
        if (!c) {
            showError(tr("Calibrate speed of sound"), why);
            return;
        }
        const QString text = QString::fromStdString(core::formatWithUncertainty(c->value, c->budget.expanded(), "m/s"));
        const auto r = core::roundToUncertainty(c->value, c->budget.expanded());
        if (QMessageBox::question(this, tr("Calibrate speed of sound"),
                                  tr("Speed of sound from the back wall: %1 (k = 2). It is recorded in the technique block.\n\n"
                                     "Use %2 m/s for the reconstruction?").arg(text, QString::fromStdString(r.value_text))) ==
            QMessageBox::Yes) {
            try {
                ctl_->editRecipeValue("delay_model.speed_of_sound_m_s", r.value_text);
            } catch (const std::exception& e) {
                showError(tr("Calibrate speed of sound"), QString::fromUtf8(e.what()));
            }
        }
    });
    a->setToolTip(tr("c = 2 d / t from the back-wall echo of the pulse-echo traces (and its repeat when recorded), with its uncertainty"));
    a = tools->addAction(tr("Calibrate fixed &delay from a known reflector…"), this, [this] {
        const QString title = tr("Calibrate fixed delay");
        if (!ctl_->hasCapture()) {
            showError(title, tr("Open a capture first."));
            return;
        }
        bool ok = false;
        const double x = QInputDialog::getDouble(this, title, tr("Reflector position along the surface x, mm (as drawn on the image):"), 0,
                                                 -10000, 10000, 2, &ok);
        if (!ok) return;
        const double z = QInputDialog::getDouble(this, title, tr("Reflector depth (centre), mm:"), 10, 0.01, 10000, 2, &ok);
        if (!ok) return;
        const double dia = QInputDialog::getDouble(this, title, tr("Side-drilled hole diameter, mm (0 for a point or a tip):"), 0, 0, 50, 2, &ok);
        if (!ok) return;
        const double tol = QInputDialog::getDouble(this, title, tr("Tolerance of the position, ± mm (x and depth):"), 0.05, 0, 10, 3, &ok);
        if (!ok) return;
        QString why;
        const auto c = ctl_->calibrateDelay(x, z, dia, tol, &why);
        if (!c) {
            showError(title, why);
            return;
        }
        QStringList lines;
        for (const auto& l : recon::delayLines(*c)) lines << QString::fromStdString(l);
        const auto r = core::roundToUncertainty(c->delay.value * 1e6, c->delay.budget.expanded() * 1e6);
        if (QMessageBox::question(this, title,
                                  lines.join('\n') + tr("\n\nIt is recorded in the technique block. Remove %1 µs from every trace "
                                                        "before imaging (delay_model.fixed_delay_us)?")
                                                          .arg(QString::fromStdString(r.value_text))) == QMessageBox::Yes) {
            try {
                ctl_->editRecipeValue("delay_model.fixed_delay_us", r.value_text);
            } catch (const std::exception& e) {
                showError(title, QString::fromUtf8(e.what()));
            }
        }
    });
    a->setToolTip(tr("The delay in every trace beyond the modelled paths, from a hole or tip at a known place seen through the wedge"));
    a = tools->addAction(tr("Check &elements…"), this, [this] {
        QString why;
        const auto flagged = ctl_->checkElements(&why);
        if (!flagged) {
            showError(tr("Check elements"), why);
            return;
        }
        QStringList lines;
        for (const auto& l : ctl_->calibrationLines()) lines << QString::fromStdString(l);
        if (flagged->empty()) {
            QMessageBox::information(this, tr("Check elements"), lines.join('\n'));
            return;
        }
        const QString list = QString::fromStdString(recon::elementListText(*flagged));
        if (QMessageBox::question(this, tr("Check elements"),
                                  lines.join('\n') + tr("\n\nExclude elements %1 from the sum (das.excluded_elements)?").arg(list)) ==
            QMessageBox::Yes) {
            try {
                ctl_->editRecipeValue("das.excluded_elements", list.toStdString());
            } catch (const std::exception& e) {
                showError(tr("Check elements"), QString::fromUtf8(e.what()));
            }
        }
    });
    a->setToolTip(tr("Weak and dead elements from the full matrix's transmit and receive energies"));
    a = tools->addAction(tr("&Weld geometry…"), this, &MainWindow::editWeld);
    a->setToolTip(tr("Plate thickness, weld centre, bevel, root and cap: drawn over every view with the back wall and its skip images"));
    a = tools->addAction(tr("Size the selected box tip to tip"), this, [this] {
        ctl_->changeSizingKind(ctl_->selectedMeasurement().toStdString(), core::MeasurementKind::TipSizing);
    });
    a->setToolTip(tr("Turns the selected −6 dB or −20 dB box into tip sizing (offered when the box holds two or more peaks)"));
    tools->addSeparator();
    a = tools->addAction(tr("Add &finding from selected measurement"), this, &MainWindow::addFindingFromSelection);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_F));
    tools->addSeparator();
    a = tools->addAction(tr("Add to distance–amplitude &curve"), this, &MainWindow::addCurvePointFromSelection);
    a->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_K));
    a->setToolTip(tr("The peak of the echo inside the selected box (or at the selected depth marker) on this frame "
                     "becomes a point of the case's distance–amplitude curve"));
    a = tools->addAction(tr("Make &TCG from curve"), this, &MainWindow::makeTcgFromCurve);
    a->setToolTip(tr("TCG gain that raises each depth by the curve's fall from its shallowest point: equal holes display equal"));
    a = tools->addAction(tr("Clear distance–amplitude curve"), this, [this] {
        ctl_->editCurve(std::nullopt, tr("Clear the distance–amplitude curve"));
    });

    tools->addSeparator();
    a = tools->addAction(tr("Inter-reader &agreement…"), this, [this] {
        auto* dlg = new AgreementDialog(this);
        dlg->setAttribute(Qt::WA_DeleteOnClose);
        dlg->show();
    });
    a->setToolTip(tr("Compare the findings of cases read independently on the same captures (kappa, Bland–Altman)"));

    QMenu* practice = menuBar()->addMenu(tr("&Practice"));
    practice->addAction(tr("Start practice set…"), this, [this] {
        const QString cap = QFileDialog::getOpenFileName(this, tr("Practice set capture (an answer file X.answers.json lies beside X.h5)"),
                                                         demo_dir_.isEmpty() ? caseFolder() : demo_dir_, tr("Captures (*.h5)"));
        if (cap.isEmpty()) return;
        bool ok = false;
        const QString who = QInputDialog::getText(this, tr("Trainee"), tr("Your name (your practice log is kept under it on this computer):"),
                                                  QLineEdit::Normal, practice_ ? practice_->trainee() : QString(), &ok);
        if (ok) startPractice(cap, who.trimmed());
    });
    practice->addAction(tr("Practice progress…"), this, [this] {
        if (practice_ && practice_->active()) practice_->showProgress(true);
        else showError(tr("Practice progress"), tr("Start a practice set first: the progress view shows that trainee's log."));
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
    a = view->addAction(tr("&Weld overlay"), view_, &ImageView::setWeldVisible);
    a->setCheckable(true);
    a->setChecked(view_->weldVisible());
    a->setShortcut(QKeySequence(Qt::Key_W));
    a->setToolTip(tr("Show the case's weld geometry over the image (Tools → Weld geometry… to enter it)"));
    a = view->addAction(tr("Co&verage contours"), view_, &ImageView::setCoverageVisible);
    a->setCheckable(true);
    a->setChecked(view_->coverageVisible());
    a->setToolTip(tr("−6 dB (dashed) and −12 dB (dotted) contours of the view's sensitivity: element directivity, spreading and "
                     "interface losses for a point reflector (reconstruction/coverage.h). A measurement outside −6 dB is warned about."));
    a = view->addAction(tr("Views &strip…"), strip_, &ViewsStrip::chooseViews);
    a->setShortcut(QKeySequence(Qt::Key_V));
    a->setToolTip(tr("Choose the views (delay_model.mode) shown small beside the large one; click one to show it large"));
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
    cine_ = new CineControls;
    tb->addWidget(cine_);
    // Playback waits for each frame to be beamformed and shown before asking for the next.
    cine_->setReadyCheck([this] {
        return ctl_->hasImage() && !ctl_->isBusy() && ctl_->envelope()->frame_index == ctl_->currentFrame();
    });
    connect(cine_, &CineControls::frameRequested, this, [this](qulonglong f) { ctl_->setCurrentFrame(static_cast<size_t>(f)); });
}

void MainWindow::buildStatusBar() {
    readout_ = new QLabel;
    readout_->setMinimumWidth(330);
    timing_ = new QLabel;
    timing_->setToolTip(tr("Display: time to re-map the stored image (TCG, log compression, colour). "
                           "Beamform: wall time of the last delay-and-sum run."));
    progress_label_ = new QLabel;
    progress_label_->setMaximumWidth(300);
    progress_label_->hide();
    progress_ = new QProgressBar;
    progress_->setMaximumWidth(140);
    progress_->setRange(0, 100);
    progress_->setFormat(QStringLiteral("%p%"));
    progress_->hide();
    cancel_ = new QToolButton;
    cancel_->setText(tr("Cancel"));
    cancel_->setToolTip(tr("Stop the reconstruction (Ctrl+.)"));
    cancel_->hide();
    connect(cancel_, &QToolButton::clicked, ctl_, &CaseController::cancelReconstruction);
    ref_warning_ = new QLabel;
    ref_warning_->setStyleSheet("color: #b3261e; font-weight: bold;");
    ref_warning_->hide();
    connect(ctl_, &CaseController::curveChanged, this, &MainWindow::updateReferenceWarning);
    connect(ctl_, &CaseController::recipeChanged, this, &MainWindow::updateReferenceWarning);
    statusBar()->addWidget(readout_);
    statusBar()->addPermanentWidget(ref_warning_);  // permanent: temporary messages never cover it
    statusBar()->addPermanentWidget(timing_);
    statusBar()->addPermanentWidget(progress_label_);
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
    // Playback rate: the capture's frame times when it records them, else 10 frames/s.
    {
        const auto& scan = ctl_->header().scan;
        double rate = 10;
        QString source = tr("default");
        if (ctl_->hasCapture() && scan && scan->time_s.size() > 1) {
            const double dt = (scan->time_s.back() - scan->time_s.front()) / double(scan->time_s.size() - 1);
            if (dt > 0 && std::isfinite(dt)) {
                rate = 1.0 / dt;
                source = tr("from the capture's frame times");
            }
        }
        cine_->setFrameRate(rate, source);
    }
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
    cine_->setFrameCount(n);
    cine_->setCurrentFrame(ctl_->currentFrame());
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
    const QString p = QFileDialog::getOpenFileName(this, tr("Open capture or case"), caseFolder(),
                                                   tr("Captures, cases and DICOM images (*.h5 *.hdf5 *.umbracase *.dcm *.dicom);;"
                                                      "DICOM ultrasound images (*.dcm *.dicom);;All files (*)"));
    if (!p.isEmpty()) openPath(p);
}

QString MainWindow::practiceFolder() {
    return QDir(QStandardPaths::writableLocation(QStandardPaths::AppLocalDataLocation)).filePath(QStringLiteral("practice"));
}

bool MainWindow::startPractice(const QString& capture_path, const QString& trainee, const QString& log_folder) {
    const std::string answers = core::PracticeSet::answersPathFor(capture_path.toStdString());
    if (answers.empty()) {
        showError(tr("Practice"), tr("%1 is not a practice set: there is no answer file %2 beside it.")
                                      .arg(capture_path, QFileInfo(capture_path).completeBaseName() + ".answers.json"));
        return false;
    }
    if (trainee.trimmed().isEmpty()) {
        showError(tr("Practice"), tr("Type the trainee's name: the practice log is kept under it."));
        return false;
    }
    try {
        const core::PracticeSet set = core::PracticeSet::load(answers);
        if (!openPath(capture_path)) return false;
        if (!practice_) {
            practice_ = new PracticePanel(ctl_);
            practice_dock_ = new QDockWidget(tr("Practice"), this);
            practice_dock_->setObjectName("PracticeDock");
            auto* scroll = new QScrollArea;  // the results never squeezed: scroll instead
            scroll->setWidgetResizable(true);
            scroll->setFrameShape(QFrame::NoFrame);
            scroll->setWidget(practice_);
            practice_dock_->setWidget(scroll);
            addDockWidget(Qt::RightDockWidgetArea, practice_dock_);
            // Practice takes the findings' place (a tab beside them): the results need the room.
            if (auto* fd = findChild<QDockWidget*>(QStringLiteral("FindingsDock"))) tabifyDockWidget(fd, practice_dock_);
            connect(practice_, &PracticePanel::lockedChanged, this, [this](bool locked) {
                if (locked) setTool(Tool::Select);
                tools_->setEnabled(!locked);
            });
        }
        // "practice_set_c" → "Practice set C"
        QStringList words = QString::fromStdString(set.scenario().empty() ? QFileInfo(capture_path).completeBaseName().toStdString()
                                                                          : set.scenario())
                                .split('_', Qt::SkipEmptyParts);
        for (QString& word : words)
            if (word.size() == 1) word = word.toUpper();
        if (!words.isEmpty()) words[0][0] = words[0][0].toUpper();
        const QString title = words.join(' ') + tr(" (synthetic)");
        practice_->start(set, trainee.trimmed(), log_folder.isEmpty() ? practiceFolder() : log_folder, title);
        tools_->setEnabled(true);
        practice_dock_->show();
        practice_dock_->raise();
        QTimer::singleShot(0, this, [this] {
            auto* md = findChild<QDockWidget*>(QStringLiteral("MeasurementsDock"));
            auto* fd = findChild<QDockWidget*>(QStringLiteral("FindingsDock"));
            if (md && fd) resizeDocks({fd, md}, {640, 160}, Qt::Vertical);
        });
    } catch (const std::exception& e) {
        showError(tr("Practice"), QString::fromStdString(e.what()));
        return false;
    }
    return true;
}

bool MainWindow::makeBlindCopy(const QString& path) {
    try {
        const core::CaseDocument blind = core::blindCopy(ctl_->document());
        core::saveCase(path.toStdString(), blind, /*absolute_fallback=*/false);
        statusBar()->showMessage(tr("Blind copy written to %1 (captures and recipes only)").arg(path), 10000);
    } catch (const std::exception& e) {
        showError(tr("Cannot write the blind copy"), QString::fromStdString(e.what()));
        return false;
    }
    return true;
}

void MainWindow::leavePractice() {
    if (!practice_ || !practice_->active()) return;
    practice_->stop();
    practice_dock_->hide();
}

bool MainWindow::openPath(const QString& path) {
    // A stored DICOM image opens in its own window; the case stays as it is.
    if (core::looksLikeDicom(path.toStdString()) || path.endsWith(".dcm", Qt::CaseInsensitive) ||
        path.endsWith(".dicom", Qt::CaseInsensitive))
        return openStoredImage(path) != nullptr;
    if (!maybeSave()) return false;
    leavePractice();  // another capture or case: the practice attempt ends (a submitted one is logged)
    try {
        if (path.endsWith(".umbracase", Qt::CaseInsensitive) || path.endsWith(".autosave", Qt::CaseInsensitive)) {
            QString case_path = path;
            if (case_path.endsWith(".autosave")) case_path.chop(9);
            // Leftovers of a save that was interrupted (the files themselves are intact).
            core::removeStaleTemporaries(case_path.toStdString());
            // The edit journal holds every edit up to the last one (newer than any autosave).
            std::optional<core::JournalRecovery> jr;
            try {
                jr = core::EditJournal::recover(core::journalPath(case_path.toStdString()));
            } catch (const std::exception& e) {
                showError(tr("Cannot read the edit journal"), QString::fromStdString(e.what()));
            }
            if (jr && offerJournalRecovery(*jr, case_path)) {
                ctl_->recoverFromJournal(case_path, *jr);
                reportRecovery(*jr);
                if (!ctl_->captureProblem().isEmpty()) offerRelocation();
                return true;
            }
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

bool MainWindow::offerJournalRecovery(const core::JournalRecovery& r, const QString& case_path) {
    if (opt_.recovery == Recovery::Recover) return true;
    if (opt_.recovery == Recovery::Ignore || !opt_.interactive) return false;
    QStringList edits;
    for (size_t i = r.edits.size() > 12 ? r.edits.size() - 12 : 0; i < r.edits.size(); ++i) edits << QString::fromStdString(r.edits[i]);
    return QMessageBox::question(this, tr("Recover unsaved edits?"),
                                 tr("%1 had %n unsaved edit(s) when Umbra last stopped; the last ones were:\n%2\n\n"
                                    "Recover them? (The case file is not changed until you save.)",
                                    "", int(r.edits.size()))
                                     .arg(case_path.isEmpty() ? tr("An untitled case") : case_path, edits.join("\n"))) == QMessageBox::Yes;
}

void MainWindow::reportRecovery(const core::JournalRecovery& r) {
    QStringList edits;
    for (auto& e : r.edits) edits << QString::fromStdString(e);
    const QString m = tr("Recovered %n unsaved edit(s): %1", "", int(r.edits.size())).arg(edits.join(", "));
    statusBar()->showMessage(m, 30000);
    if (!opt_.interactive) std::fprintf(stderr, "umbra: %s\n", m.toLocal8Bit().constData());
}

bool MainWindow::recoverUntitledJournal() {
    core::removeStaleTemporaries(QFileInfo(CaseController::untitledJournalFile()).path().toStdString() + "/untitled.umbracase");
    std::optional<core::JournalRecovery> jr;
    try {
        jr = core::EditJournal::recover(CaseController::untitledJournalFile().toStdString());
    } catch (const std::exception& e) {
        showError(tr("Cannot read the edit journal"), QString::fromStdString(e.what()));
        return false;
    }
    if (!jr || !offerJournalRecovery(*jr, QString())) return false;
    ctl_->recoverFromJournal(QString(), *jr);
    reportRecovery(*jr);
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
    QString p = QFileDialog::getSaveFileName(this, tr("Save case"), inCaseFolder(ctl_->displayName() + ".umbracase"),
                                             tr("Cases (*.umbracase)"));
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

bool MainWindow::exportImage(const QString& path, int width_px, Theme theme) {
    try {
        exportAnnotatedPng(path, *view_, *ctl_, width_px, theme);
    } catch (const std::exception& e) {
        showError(tr("Cannot export"), QString::fromStdString(e.what()));
        return false;
    }
    statusBar()->showMessage(tr("Exported %1").arg(path), 5000);
    return true;
}

void MainWindow::exportDialog() {
    if (!ctl_->hasImage()) return;
    QDialog d(this);
    d.setWindowTitle(tr("Export image"));
    auto* form = new QFormLayout(&d);
    auto* width = new QSpinBox(&d);
    width->setRange(400, 12000);
    width->setSingleStep(100);
    width->setValue(2400);
    width->setSuffix(tr(" px"));
    form->addRow(tr("Width of the PNG:"), width);
    auto* theme = new QComboBox(&d);
    theme->addItem(tr("Dark (screen)"), QStringLiteral("dark"));
    theme->addItem(tr("Light (print, reports)"), QStringLiteral("light"));
    theme->setCurrentIndex(export_theme_ == Theme::Light ? 1 : 0);
    form->addRow(tr("Theme:"), theme);
    auto* buttons = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel, &d);
    connect(buttons, &QDialogButtonBox::accepted, &d, &QDialog::accept);
    connect(buttons, &QDialogButtonBox::rejected, &d, &QDialog::reject);
    form->addRow(buttons);
    if (d.exec() != QDialog::Accepted) return;
    const int w = width->value();
    export_theme_ = themeFromName(theme->currentData().toString()).value_or(Theme::Dark);
    QString p = QFileDialog::getSaveFileName(this, tr("Export image"), inCaseFolder(ctl_->displayName() + ".png"), tr("PNG images (*.png)"));
    if (p.isEmpty()) return;
    if (!p.endsWith(".png", Qt::CaseInsensitive)) p += ".png";
    exportImage(p, w, export_theme_);
}

bool MainWindow::writeReport(const QString& path) {
    ctl_->setViewState(view_->viewState());
    report::ReportSettings settings;
    settings.software = QStringLiteral("Umbra %1 (workstation)").arg(QCoreApplication::applicationVersion());
    settings.progress = [this](const QString& what) {
        statusBar()->showMessage(tr("Report: %1…").arg(what));
        QCoreApplication::processEvents(QEventLoop::ExcludeUserInputEvents);
    };
    QApplication::setOverrideCursor(Qt::WaitCursor);
    try {
        const report::Report r(ctl_->document(), ctl_->casePath(), settings);
        r.writePdf(path);
    } catch (const std::exception& e) {
        QApplication::restoreOverrideCursor();
        showError(tr("Cannot write the report"), QString::fromStdString(e.what()));
        return false;
    }
    QApplication::restoreOverrideCursor();
    statusBar()->showMessage(tr("Report written to %1").arg(path), 8000);
    return true;
}

void MainWindow::reportDialog() {
    if (opt_.interactive && (ctl_->reportHeader().examiner.empty() || ctl_->reportHeader().part.empty())) {
        const auto b = QMessageBox::question(this, tr("Report"),
                                             tr("The report header has blank fields (part, examiner …); the report will leave "
                                                "lines to fill in by hand. Fill them in first?"),
                                             QMessageBox::Yes | QMessageBox::No, QMessageBox::Yes);
        if (b == QMessageBox::Yes) reportHeaderDialog();
    }
    QString p = QFileDialog::getSaveFileName(this, tr("Report"), inCaseFolder(ctl_->displayName() + ".pdf"), tr("PDF (*.pdf)"));
    if (p.isEmpty()) return;
    if (!p.endsWith(".pdf", Qt::CaseInsensitive)) p += ".pdf";
    writeReport(p);
}

void MainWindow::reportHeaderDialog() {
    QDialog d(this);
    d.setWindowTitle(tr("Report header"));
    auto* form = new QFormLayout(&d);
    auto* note = new QLabel(tr("What the report prints at its top. Blank fields are printed as lines to fill in by hand."), &d);
    note->setWordWrap(true);
    form->addRow(note);
    core::ReportHeader h = ctl_->reportHeader();
    const std::vector<std::pair<QString, std::string*>> fields = {
        {tr("Part:"), &h.part},         {tr("Site:"), &h.site},           {tr("Date of examination:"), &h.date},
        {tr("Examiner:"), &h.examiner}, {tr("Reviewer:"), &h.reviewer},   {tr("Procedure:"), &h.procedure},
        {tr("Acceptance criteria:"), &h.criteria}};
    std::vector<QLineEdit*> edits;
    for (const auto& [label, value] : fields) {
        auto* e = new QLineEdit(QString::fromStdString(*value), &d);
        e->setMinimumWidth(360);
        form->addRow(label, e);
        edits.push_back(e);
    }
    edits[2]->setPlaceholderText(tr("e.g. %1").arg(QDate::currentDate().toString(Qt::ISODate)));
    auto* buttons = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel, &d);
    connect(buttons, &QDialogButtonBox::accepted, &d, &QDialog::accept);
    connect(buttons, &QDialogButtonBox::rejected, &d, &QDialog::reject);
    form->addRow(buttons);
    if (d.exec() != QDialog::Accepted) return;
    for (size_t i = 0; i < fields.size(); ++i) *fields[i].second = edits[i]->text().trimmed().toStdString();
    ctl_->setReportHeader(h);
}

void MainWindow::exportDicomDialog() {
    if (!ctl_->hasImage()) return;
    QString p = QFileDialog::getSaveFileName(this, tr("Export DICOM"), inCaseFolder(ctl_->displayName() + ".dcm"),
                                             tr("DICOM images (*.dcm)"));
    if (p.isEmpty()) return;
    if (!p.endsWith(".dcm", Qt::CaseInsensitive)) p += ".dcm";
    exportDicom(p);
}

bool MainWindow::exportDicom(const QString& path) {
    const core::Frame* env = ctl_->envelope();
    const auto& db = ctl_->db();
    if (!env || db.size() != env->nx() * env->nz()) return false;
    // Grey levels of the display: 0 at the bottom of the dynamic range, 255 at 0 dB.
    const double range = ctl_->dynamicRangeDb();
    std::vector<uint8_t> px(db.size());
    for (size_t i = 0; i < db.size(); ++i) px[i] = uint8_t(std::lround(std::clamp(255.0 * (1.0 + double(db[i]) / range), 0.0, 255.0)));
    core::DicomExportInfo info;
    info.title = ctl_->displayName().toStdString();
    const auto& h = ctl_->header();
    if (auto it = h.provenance.find("part"); it != h.provenance.end()) info.part_id = it->second;
    info.capture_sha256 = env->capture_sha256;
    info.recipe_json = ctl_->recipe().toJson(-1);
    info.synthetic = h.isSynthetic();
    try {
        core::writeDicomFile(path.toStdString(), env->x_m, env->z_m, 1, 1, px, info);
    } catch (const std::exception& e) {
        showError(tr("Cannot export DICOM"), QString::fromStdString(e.what()));
        return false;
    }
    statusBar()->showMessage(tr("Frame %1 written as DICOM to %2").arg(ctl_->currentFrame() + 1).arg(path), 8000);
    return true;
}

StoredImageWindow* MainWindow::openStoredImage(const QString& path) {
    try {
        auto* w = new StoredImageWindow(path, this);
        w->show();
        return w;
    } catch (const std::exception& e) {
        showError(tr("Cannot open"), QString::fromStdString(e.what()));
        return nullptr;
    }
}

void MainWindow::loadRecipe() {
    const QString p = QFileDialog::getOpenFileName(this, tr("Load recipe"), caseFolder(), tr("Recipes (*.json);;All files (*)"));
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
    try {
        ctl_->editRecipe(r, tr("Load recipe %1").arg(QFileInfo(p).fileName()));
    } catch (const std::exception& e) {
        showError(tr("Recipe not loaded"), tr("%1 cannot be used with this capture: %2").arg(p, QString::fromStdString(e.what())));
    }
}

QString MainWindow::caseFolder() const {
    if (!ctl_->casePath().isEmpty()) return QFileInfo(ctl_->casePath()).absolutePath();
    if (!ctl_->capturePath().isEmpty()) return QFileInfo(ctl_->capturePath()).absolutePath();
    return {};
}

QString MainWindow::inCaseFolder(const QString& file_name) const {
    const QString dir = caseFolder();
    return dir.isEmpty() ? file_name : QDir(dir).filePath(file_name);
}

void MainWindow::hideProgress() {
    progress_label_->hide();
    progress_->hide();
    cancel_->hide();
}

void MainWindow::saveRecipe() {
    QString p = QFileDialog::getSaveFileName(this, tr("Save recipe"), inCaseFolder("recipe.json"), tr("Recipes (*.json)"));
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
    const std::string fid = ctl_->addFindingFromMeasurement(id.toStdString());
    if (auto* pane = findings_->findChild<FindingsPane*>()) pane->selectFinding(QString::fromStdString(fid));
    statusBar()->showMessage(tr("Finding added from %1: describe what is seen in the Findings pane").arg(id), 6000);
}

void MainWindow::addCurvePointFromSelection() {
    const QString id = ctl_->selectedMeasurement();
    if (id.isEmpty()) {
        statusBar()->showMessage(tr("Select an extent box or depth marker around a side-drilled hole's echo first"), 6000);
        return;
    }
    QString curve_label;
    if (!ctl_->curve() && opt_.interactive) {
        bool ok = false;
        curve_label = QInputDialog::getText(this, tr("Distance–amplitude curve"),
                                            tr("What are the reflectors (diameter, kind, block)? Every point of the curve "
                                               "must come from equal reflectors."),
                                            QLineEdit::Normal, QStringLiteral("Ø2.5 mm side-drilled holes, reference block"), &ok);
        if (!ok) return;
    }
    QString why;
    if (!ctl_->addCurvePointFrom(id.toStdString(), &why, curve_label))
        showError(tr("Cannot add the point"), why);
    else
        statusBar()->showMessage(tr("Added to the distance–amplitude curve (%n point(s))", "", static_cast<int>(ctl_->curve()->points.size())), 6000);
}

void MainWindow::makeTcgFromCurve() {
    QString why;
    if (!ctl_->makeTcgFromCurve(&why)) showError(tr("Cannot make a TCG from the curve"), why);
    else statusBar()->showMessage(tr("TCG set from the distance–amplitude curve: %1").arg(QString::fromStdString(ctl_->recipe().text("tgc.curve"))), 8000);
}

void MainWindow::updateReferenceWarning() {
    const auto& c = ctl_->curve();
    const QString w = ctl_->curveWarning();
    if (!w.isEmpty()) {
        ref_warning_->setStyleSheet("color: #b3261e; font-weight: bold;");
        ref_warning_->setText(w);
    } else if (const auto r = c ? core::depthRange(*c) : std::nullopt) {
        ref_warning_->setStyleSheet("color: #3b4250;");
        ref_warning_->setText(tr("0 dB = DAC, %1 (%2–%3 mm)")
                                  .arg(QString::fromStdString(c->label))
                                  .arg(r->first * 1e3, 0, 'f', 1)
                                  .arg(r->second * 1e3, 0, 'f', 1));
    }
    ref_warning_->setToolTip(c ? tr("Distance–amplitude curve: %1, %2 point(s), amplitudes read %3; recipe fingerprint %4")
                                     .arg(QString::fromStdString(c->label))
                                     .arg(c->points.size())
                                     .arg(QString::fromUtf8(core::basisName(c->basis)))
                                     .arg(c->recipe_fingerprint.empty() ? tr("not recorded") : QString::fromStdString(c->recipe_fingerprint))
                               : QString());
    ref_warning_->setVisible(c.has_value());
}

bool MainWindow::openDemo(const QString& dir) { return openDemoCase(dir, QStringLiteral("weld")); }

QStringList MainWindow::demoCaseNames() { return {QStringLiteral("weld"), QStringLiteral("wedge"), QStringLiteral("phantom")}; }

bool MainWindow::openDemoCase(const QString& dir, const QString& name) {
    const bool weld = name == "weld", wedge = name == "wedge";
    if (!weld && !wedge && name != "phantom") {
        showError(tr("Unknown demo case"), tr("There is no demo case \"%1\"; the demo cases are: %2.").arg(name, demoCaseNames().join(", ")));
        return false;
    }
    const QString main = dir + (weld ? "/weld_coupon.h5" : wedge ? "/weld_coupon_wedge.h5" : "/phantom_p2.h5");
    if (!QFileInfo::exists(main)) {
        showError(tr("Demo not found"), tr("%1 does not exist. Make the demo captures first: cmake --build build --target samples").arg(main));
        return false;
    }
    if (!maybeSave()) return false;
    demo_dir_ = QFileInfo(dir).absoluteFilePath();
    if (demo_menu_) demo_menu_->setEnabled(true);
    QString hint;
    try {
        leavePractice();
        ctl_->openCapture(main);
        core::CaseDocument t = ctl_->document();
        if (weld) {
            // The reference block belongs to the weld's examination: its side-drilled holes give
            // the amplitude reference the weld's echoes are reported against.
            const QString block = dir + "/reference_block.h5";
            if (QFileInfo::exists(block)) ctl_->addCapture(block, false);
            t.title = "Weld W-031, spool 14 (synthetic demo)";
            t.background = "Production weld, 5 % random selection for volumetric examination under the shop's written procedure. "
                           "Reference block RB-25 is the case's second capture.";
            // Start where there is something to see: y = 0 mm crosses the fusion-face reflector.
            if (ctl_->frameCount() > 10) ctl_->setCurrentFrame(10);
            hint = tr("Demo: this frame (y = 0 mm) crosses a fusion-face reflector near 10 mm depth, right of the weld centre. "
                      "Press S and drag a box around it to size it at −6 dB, then Ctrl+F for a finding. "
                      "The top view (bottom right) shows the reflector along the weld.");
        } else if (wedge) {
            t.title = "Weld W-031, spool 14, shear-wave wedge (synthetic demo)";
            t.background = "Production weld, 5 % random selection for volumetric examination under the shop's written procedure; "
                           "64-element array on a 36° wedge from the +x side, about 55° shear in the steel.";
            // The skip views see the lack of fusion on the +x fusion face; the direct shear view
            // sees mostly its tips. Show the double skip large, the others small.
            core::Recipe r = ctl_->recipe();
            r.set("delay_model.mode", "TT-TT");
            ctl_->applyRecipe(r);
            ctl_->setChosenViews({"TT-TT", "T-T", "TT-T", "T-TT"});
            if (ctl_->frameCount() > 1) ctl_->setCurrentFrame(1);
            hint = tr("Demo: the large view TT-TT (shear, skipped off the back wall both ways) shows the lack of fusion on the "
                      "+x fusion face, 9.5–12.5 mm deep near x = −34 mm. Click a small view below to show it large. "
                      "Press T and drag a box round the two tip echoes to size its height.");
        } else {
            t.title = "Phantom P-2 (synthetic demo)";
            t.background = "Invented tissue-mimicking training phantom: wires, a 6 mm anechoic cyst and a +6 dB inclusion.";
            hint = tr("Demo: the round dark region left of centre at about 25 mm depth is the 6 mm cyst. "
                      "Press E and drag from its centre to its edge to measure it with an ellipse.");
        }
        ctl_->setCaseText(t);
        if (weld) {
            // The coupon's weld as its scene describes it: single V in 20 mm plate, 30° bevels,
            // 2 mm root gap, no root face, ground flush, centred at x = 0.
            core::WeldGeometry g;
            g.shape = core::WeldShape::V;
            g.thickness_mm = 20;
            g.bevel_angle_deg = 30;
            g.root_gap_mm = 2;
            ctl_->setWeld(g);
        } else if (wedge) {
            // The same weld seen from the wedge: its centre 40 mm on the -x side of the array.
            core::WeldGeometry g;
            g.shape = core::WeldShape::V;
            g.thickness_mm = 20;
            g.centre_x_mm = -40;
            g.bevel_angle_deg = 30;
            g.root_gap_mm = 2;
            ctl_->setWeld(g);
        }
    } catch (const std::exception& e) {
        showError(tr("Cannot open the demo"), QString::fromStdString(e.what()));
        return false;
    }
    statusBar()->showMessage(hint, 60000);
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
    if (auto* pane = findings_->findChild<FindingsPane*>()) pane->selectFinding(QString::fromStdString(fid));
    auto fs = ctl_->findings();
    for (auto& x : fs)
        if (x.id == fid)
            x.indication.description = "Echo sized at −6 dB from its peak; demonstration annotation placed automatically.";
    ctl_->editFindings(fs, tr("Describe finding"));
}

bool MainWindow::demoCurve(const std::vector<double>& depths_mm) {
    const core::Frame* f = ctl_->envelope();
    if (!f || f->nx() < 3 || f->nz() < 3) return false;
    bool all = true;
    for (double depth_mm : depths_mm) {
        // A box across the image, ±1.5 mm about the stated depth: its peak is the hole's echo.
        core::Measurement box;
        box.kind = core::MeasurementKind::ExtentBox;
        box.frame_index = ctl_->currentFrame();
        box.points = {{f->x_m.front() * 1e3, depth_mm - 1.5}, {f->x_m.back() * 1e3, depth_mm + 1.5}};
        box.label = QStringLiteral("SDH at %1 mm").arg(depth_mm, 0, 'f', 0).toStdString();
        const std::string id = ctl_->addMeasurement(box);
        QString why;
        if (!ctl_->addCurvePointFrom(id, &why, QStringLiteral("Ø2.5 mm side-drilled holes, reference block RB-25"))) {
            std::fprintf(stderr, "umbra: demo curve at %.1f mm: %s\n", depth_mm, why.toLocal8Bit().constData());
            all = false;
        }
    }
    if (const auto& c = ctl_->curve(); c && !c->points.empty()) {
        std::fprintf(stderr, "umbra: distance–amplitude curve (%s, amplitudes %s):", c->label.c_str(), core::basisName(c->basis));
        for (const auto& p : c->points)
            std::fprintf(stderr, " %.2f mm %+.2f dB;", p.depth_m * 1e3, 20 * std::log10(p.amplitude / c->points.front().amplitude));
        std::fprintf(stderr, " (dB re the shallowest)\n");
    }
    return all;
}

// ------------------------------------------------------------------------------- events

void MainWindow::closeEvent(QCloseEvent* e) {
    if (maybeSave()) {
        // Saved or deliberately discarded: the auto-saves are no longer needed.
        if (!ctl_->casePath().isEmpty() && (!ctl_->isDirty() || opt_.interactive))
            QFile::remove(QString::fromStdString(core::autosavePath(ctl_->casePath().toStdString())));
        if (!ctl_->isDirty() || opt_.interactive) ctl_->discardJournal();
        if (opt_.interactive) {
            QFile::remove(CaseController::untitledAutosavePath());
            saveLayout();
        }
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
