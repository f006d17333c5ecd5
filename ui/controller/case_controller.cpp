// SPDX-License-Identifier: MIT
#include "ui/controller/case_controller.h"
#include "ui/report/case_images.h"

#include <QDir>
#include <QElapsedTimer>
#include <QStandardPaths>
#include <QStringList>
#include <QFileInfo>

#include <algorithm>
#include <cmath>
#include <cstring>
#include <sstream>

#include "core/drop_sizing.h"
#include "core/error.h"
#include "reconstruction/calibration.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/tgc_stage.h"
#include "reconstruction/view_mode.h"
#include "ui/controller/capture_check.h"
#include "ui/controller/value_command.h"

namespace umbra::ui {

std::string findRecipeKey(const core::Recipe& r, const std::string& needle, bool display_only_only) {
    for (const auto& st : r.stages())
        for (const auto& p : st.params) {
            if (display_only_only && !p.display_only) continue;
            const std::string key = st.name + "." + p.name;
            if (key.find(needle) != std::string::npos) return key;
        }
    return {};
}

CaseController::CaseController(QObject* parent)
    : QObject(parent), worker_(new BeamformWorker(this)), strip_worker_(new BeamformWorker(this)) {
    recipe_ = recon::defaultRecipe();
    connect(worker_, &BeamformWorker::frameReady, this, &CaseController::onFrameReady);
    coverage_poll_ = new QTimer(this);
    coverage_poll_->setInterval(50);
    connect(coverage_poll_, &QTimer::timeout, this, [this] {
        std::erase_if(coverage_stale_, [](auto& f) { return f.wait_for(std::chrono::seconds(0)) == std::future_status::ready; });
        const bool ready = coverage_job_.valid() && coverage_job_.wait_for(std::chrono::seconds(0)) == std::future_status::ready;
        if (!coverage_job_.valid() || ready) {
            if (coverage_stale_.empty()) coverage_poll_->stop();
            if (ready) emit coverageReady();
        }
    });
    connect(strip_worker_, &BeamformWorker::frameReady, this,
            [this](quint64 gen, qulonglong frame, FramePtr img, double, double, bool) { onStripFrameReady(gen, frame, img); });
    connect(strip_worker_, &BeamformWorker::failed, this, [this](quint64 gen, const QString& msg) {
        if (gen != strip_generation_ || strip_running_.empty()) return;
        strip_problems_[strip_running_] = msg;
        strip_running_.clear();
        emit stripChanged();
        continueStrip();
    });
    connect(worker_, &BeamformWorker::progress, this,
            [this](quint64 gen, qulonglong frame, double f, bool background) {
                // Reports queued before a cancel arrive after it: nothing is running any more.
                if (gen != generation_ || (!busy_ && !top_running_)) return;
                emit progressChanged(f, background ? tr("Beamforming frame %1 for the top view").arg(frame + 1)
                                                   : tr("Beamforming frame %1").arg(frame + 1));
            });
    connect(worker_, &BeamformWorker::failed, this, [this](quint64 gen, const QString& msg) {
        if (gen != generation_) return;
        setBusy(false);
        stopTopViewRun();
        emit errorOccurred(tr("Reconstruction failed: %1").arg(msg));
    });
    connect(worker_, &BeamformWorker::cancelled, this, [this](quint64 gen) {
        if (gen != generation_) return;
        setBusy(false);
        stopTopViewRun();
        emit statusMessage(tr("Reconstruction cancelled"));
    });
    connect(worker_, &BeamformWorker::allFramesDone, this, [this](quint64 gen) {
        if (gen == generation_) stopTopViewRun();
    });
    connect(&undo_, &QUndoStack::cleanChanged, this, [this](bool) { emit dirtyChanged(isDirty()); });
    // Every undoable edit, undo and redo is journalled at once (kill -9 loses nothing).
    connect(&undo_, &QUndoStack::indexChanged, this, [this](int idx) {
        if (journal_off_) return;
        // idx == journal_index_: an edit merged into the last command (e.g. a dragged handle).
        const QString what = idx >= journal_index_ ? undo_.text(idx - 1) : tr("Undo %1").arg(undo_.text(idx));
        journal_index_ = idx;
        journal(what);
    });
}

CaseController::~CaseController() {
    // The undo stack clears itself when destroyed (after the journal): that is no user edit.
    journal_off_ = true;
    disconnect(&undo_, nullptr, this, nullptr);
    // Stop and join the workers while everything they report to is still alive.
    delete worker_;
    worker_ = nullptr;
    delete strip_worker_;
    strip_worker_ = nullptr;
}

// ---------------------------------------------------------------------------------- case

void CaseController::resetState() {
    ++generation_;
    worker_->cancel();
    clearStrip();
    reader_.reset();
    capture_problem_.clear();
    cache_.clear();
    envelope_.reset();
    db_.clear();
    tgc_amp_.clear();
    image_ = QImage();
    top_image_ = QImage();
    frame_ = 0;
    selected_.clear();
    fidelity_db_ = 0;
    setBusy(false);
    stopTopViewRun();
}

void CaseController::newCase() {
    resetState();
    doc_ = core::CaseDocument{};
    case_path_.clear();
    recipe_ = recon::defaultRecipe();
    view_ = {};
    // The previous case was saved or its changes discarded (the caller asked): its journal goes.
    discardJournal();
    journal_off_ = true;
    undo_.clear();
    journal_off_ = false;
    journal_index_ = 0;
    extra_dirty_ = false;
    emit caseChanged();
    emit captureChanged();
    emit recipeChanged();
    emit imageChanged();
    emit measurementsChanged();
    emit findingsChanged();
    emit topViewChanged();
    emit dirtyChanged(false);
}

void CaseController::openCapture(const QString& path) {
    checkCaptureOutOfProcess(path);  // throws InputError: a damaged file never reaches the HDF5 library here
    auto reader = std::make_unique<core::CaptureReader>(path.toStdString());  // throws InputError
    newCase();
    core::CaseCapture cc;
    cc.path = QFileInfo(path).absoluteFilePath().toStdString();
    cc.sha256 = core::fileSha256(path.toStdString());
    doc_.captures.push_back(cc);
    doc_.active_capture = 0;
    doc_.title = reader->header().title;
    reader_ = std::move(reader);
    openActiveCapture();
    emit caseChanged();
}

void CaseController::addCapture(const QString& path, bool activate) {
    checkCaptureOutOfProcess(path);  // throws InputError
    core::CaptureReader probe(path.toStdString());  // throws InputError
    storeActiveState();
    core::CaseCapture cc;
    cc.path = QFileInfo(path).absoluteFilePath().toStdString();
    cc.sha256 = core::fileSha256(path.toStdString());
    doc_.captures.push_back(cc);
    extra_dirty_ = true;
    if (activate) setActiveCapture(doc_.captures.size() - 1);
    else emit caseChanged();  // the list of captures changed
    emit dirtyChanged(true);
    journal(tr("Add capture %1").arg(QFileInfo(path).fileName()));
}

void CaseController::openCase(const QString& path, bool from_autosave) {
    const std::string src =
        from_autosave ? core::autosavePath(path.toStdString()) : path.toStdString();
    core::CaseDocument doc = core::loadCase(src);  // throws InputError
    newCase();
    doc_ = std::move(doc);
    if (doc_.active_capture >= doc_.captures.size()) doc_.active_capture = 0;
    case_path_ = QFileInfo(path).absoluteFilePath();
    extra_dirty_ = from_autosave;
    openActiveCapture();
    emit caseChanged();
    emit findingsChanged();
    emit dirtyChanged(isDirty());
}

void CaseController::storeActiveState() {
    if (doc_.captures.empty()) return;
    auto& c = active();
    c.recipe_json = recipe_.toJson();
    view_.frame = frame_;
    c.view = view_;
}

void CaseController::openActiveCapture() {
    resetState();
    recipe_ = recon::defaultRecipe();
    if (doc_.captures.empty()) {
        emit captureChanged();
        return;
    }
    auto& c = active();
    if (!c.recipe_json.empty()) {
        try {
            recipe_.mergeJson(c.recipe_json, c.path + " (recipe in case)");
        } catch (const std::exception& e) {
            emit errorOccurred(QString::fromStdString(e.what()));
        }
    }
    view_ = c.view;
    frame_ = c.view.frame;
    // The demo case may leave the hash empty: it is filled at first open.
    if (c.sha256.empty() && QFileInfo::exists(QString::fromStdString(c.path))) {
        try {
            c.sha256 = core::fileSha256(c.path);
            extra_dirty_ = true;
        } catch (const std::exception&) {
        }
    }
    const auto status = core::checkCapture(c);
    if (status == core::CaptureStatus::Missing) {
        capture_problem_ = tr("The capture %1 is missing (moved, renamed or on a drive that is not mounted). "
                              "Measurements and findings are kept; relocate the capture to see the image.")
                               .arg(QString::fromStdString(c.path));
    } else if (status == core::CaptureStatus::Changed) {
        capture_problem_ = tr("The capture %1 has changed since the case was saved (its SHA-256 differs from %2). "
                              "Measurements may no longer match the data; relocate the original capture.")
                               .arg(QString::fromStdString(c.path), QString::fromStdString(c.sha256));
    } else {
        try {
            checkCaptureOutOfProcess(QString::fromStdString(c.path));
            reader_ = std::make_unique<core::CaptureReader>(c.path);
        } catch (const std::exception& e) {
            capture_problem_ = QString::fromStdString(e.what());
        }
    }
    if (reader_ && frame_ >= frameCount()) frame_ = 0;
    emit captureChanged();
    emit recipeChanged();
    emit curveChanged();
    emit measurementsChanged();
    emit frameChanged(frame_);
    emit imageChanged();
    emit topViewChanged();
    emit stripChanged();
    if (reader_) requestBeamform();
}

void CaseController::setActiveCapture(size_t index) {
    if (index >= doc_.captures.size()) return;
    storeActiveState();
    doc_.active_capture = index;
    openActiveCapture();
}

void CaseController::ensureActiveCapture(size_t index) {
    if (index != doc_.active_capture && index < doc_.captures.size()) setActiveCapture(index);
}

template <typename T>
std::function<void(const T&)> CaseController::onThisCapture(std::function<void(const T&)> set) {
    const size_t index = doc_.active_capture;
    return [this, index, set = std::move(set)](const T& v) {
        ensureActiveCapture(index);
        set(v);
    };
}

void CaseController::saveCase(const QString& path) {
    const core::CaseDocument d = document();
    core::saveCase(path.toStdString(), d);  // throws InputError
    case_path_ = QFileInfo(path).absoluteFilePath();
    doc_ = d;
    extra_dirty_ = false;
    undo_.setClean();
    QFile::remove(QString::fromStdString(core::autosavePath(case_path_.toStdString())));
    QFile::remove(untitledAutosavePath());
    discardJournal();  // the saved file holds every edit now
    QFile::remove(untitledJournalFile());
    emit caseChanged();
    emit dirtyChanged(false);
}

QString CaseController::untitledAutosavePath() {
    const QString dir = QStandardPaths::writableLocation(QStandardPaths::AppDataLocation);
    return QString::fromStdString(core::autosavePath((dir + "/untitled.umbracase").toStdString()));
}

void CaseController::recoverUntitled() {
    core::CaseDocument doc = core::loadCase(untitledAutosavePath().toStdString());  // throws InputError
    newCase();
    doc_ = std::move(doc);
    if (doc_.active_capture >= doc_.captures.size()) doc_.active_capture = 0;
    extra_dirty_ = true;
    openActiveCapture();
    emit caseChanged();
    emit findingsChanged();
    emit dirtyChanged(true);
}

QString CaseController::autosave() {
    if (doc_.captures.empty() && doc_.findings.empty()) return {};
    std::string p;
    if (case_path_.isEmpty()) {
        p = untitledAutosavePath().toStdString();
        QDir().mkpath(QFileInfo(QString::fromStdString(p)).absolutePath());
    } else {
        p = core::autosavePath(case_path_.toStdString());
    }
    core::saveCase(p, document());
    return QString::fromStdString(p);
}

core::CaseDocument CaseController::document() const {
    core::CaseDocument d = doc_;
    if (!d.captures.empty()) {
        auto& c = d.captures[d.active_capture];
        c.recipe_json = recipe_.toJson();
        c.view = view_;
        c.view.frame = frame_;
    }
    if (reader_) d.technique = techniqueText().toStdString();
    return d;
}

QString CaseController::displayName() const {
    if (!doc_.title.empty()) return QString::fromStdString(doc_.title);
    if (!case_path_.isEmpty()) return QFileInfo(case_path_).completeBaseName();
    if (!doc_.captures.empty()) return QFileInfo(QString::fromStdString(doc_.captures[0].path)).fileName();
    return tr("Untitled case");
}

QString CaseController::untitledJournalFile() {
    const QString dir = QStandardPaths::writableLocation(QStandardPaths::AppDataLocation);
    return QString::fromStdString(core::journalPath((dir + "/untitled.umbracase").toStdString()));
}

QString CaseController::journalFile() const {
    return case_path_.isEmpty() ? untitledJournalFile() : QString::fromStdString(core::journalPath(case_path_.toStdString()));
}

void CaseController::journal(const QString& what) {
    if (journal_off_) return;
    const QString path = journalFile();
    try {
        if (!journal_ || journal_->path() != path.toStdString()) {
            if (journal_) journal_->discard();  // the case changed name (Save As): that journal is done
            QDir().mkpath(QFileInfo(path).absolutePath());
            journal_ = std::make_unique<core::EditJournal>(path.toStdString());
        }
        journal_->append(what.toStdString(), document());
    } catch (const std::exception& e) {
        if (!journal_error_shown_)
            emit errorOccurred(tr("Edits cannot be journalled, so a crash could lose them: %1").arg(QString::fromStdString(e.what())));
        journal_error_shown_ = true;
    }
}

void CaseController::discardJournal() {
    if (journal_) journal_->discard();
    journal_.reset();
}

void CaseController::recoverFromJournal(const QString& case_path, const core::JournalRecovery& r) {
    newCase();
    doc_ = r.doc;
    if (doc_.active_capture >= doc_.captures.size()) doc_.active_capture = 0;
    case_path_ = case_path.isEmpty() ? QString() : QFileInfo(case_path).absoluteFilePath();
    extra_dirty_ = true;
    journal_off_ = true;  // opening the capture is not an edit
    openActiveCapture();
    journal_off_ = false;
    emit caseChanged();
    emit findingsChanged();
    emit measurementsChanged();
    emit dirtyChanged(true);
}

bool CaseController::isDirty() const { return extra_dirty_ || !undo_.isClean(); }

void CaseController::markDirty() {
    extra_dirty_ = true;
    emit dirtyChanged(true);
}

void CaseController::setTitle(const QString& t) {
    doc_.title = t.toStdString();
    markDirty();
    journal(tr("Title"));
    emit caseChanged();
}

void CaseController::setCaseText(const core::CaseDocument& t) {
    const bool retitled = doc_.title != t.title;
    doc_.title = t.title;
    doc_.background = t.background;
    doc_.pertinent_negatives = t.pertinent_negatives;
    doc_.prior_comparison = t.prior_comparison;
    markDirty();
    journal(tr("Case texts"));
    // Only a new title changes what other widgets show; the editor that sent the texts has them.
    if (retitled) emit caseChanged();
}

core::CaseCapture& CaseController::active() { return doc_.captures.at(doc_.active_capture); }
const core::CaseCapture* CaseController::activeOrNull() const {
    return doc_.captures.empty() ? nullptr : &doc_.captures[doc_.active_capture];
}

// ---------------------------------------------------------------------------------- capture

const core::CaptureHeader& CaseController::header() const {
    static const core::CaptureHeader none;
    return reader_ ? reader_->header() : none;
}

QString CaseController::capturePath() const {
    const auto* c = activeOrNull();
    return c ? QString::fromStdString(c->path) : QString();
}

bool CaseController::relocateCapture(const QString& path, bool accept_changed, QString* why) {
    if (doc_.captures.empty()) return false;
    storeActiveState();
    auto& c = active();
    const std::string old_hash = c.sha256;
    const bool ok = core::relocateCapture(c, QFileInfo(path).absoluteFilePath().toStdString(), accept_changed);
    if (!ok && !accept_changed) {
        if (why)
            *why = tr("%1 is not the capture this case was made on: its SHA-256 differs from the recorded %2.")
                       .arg(path, QString::fromStdString(old_hash));
        return false;
    }
    markDirty();
    openActiveCapture();
    journal(tr("Relocate capture to %1").arg(path));
    return true;
}

std::vector<float> CaseController::rfTrace(size_t transmit, size_t receive) const {
    if (!reader_) return {};
    const auto& h = reader_->header();
    if (transmit >= h.transmits() || receive >= h.receives() || frame_ >= h.frames) return {};
    std::vector<float> block(h.blockSize());
    reader_->readBlock(frame_, transmit, block.data());
    return std::vector<float>(block.begin() + static_cast<long>(receive * h.samples),
                              block.begin() + static_cast<long>((receive + 1) * h.samples));
}

// ---------------------------------------------------------------------------------- recipe

void CaseController::checkRecipe(const core::Recipe& r) const {
    if (!reader_) return;
    const auto& h = reader_->header();
    recon::resolveGrid(h, r);  // region, step, pixel limit, speed of sound, f-number
    recon::tgcGain(h, r, {0.0});  // TCG mode and curve
}

void CaseController::editRecipeValue(const std::string& key, const std::string& value) {
    core::Recipe next = recipe_;
    next.set(key, value);  // throws SettingError
    if (next == recipe_) return;
    checkRecipe(next);  // throws SettingError: the recipe stays as it was
    const core::ParamSpec spec = recipe_.spec(key);
    const QString what = tr("Set %1 to %2").arg(QString::fromStdString(spec.label), QString::fromStdString(next.valueText(key)));
    // Spin-box steps on one value of one capture merge into one undo entry.
    const std::string merge_key = std::to_string(doc_.active_capture) + ":" + key;
    undo_.push(new RecipeEditCommand(what, recipe_, next,
                                     onThisCapture<core::Recipe>([this](const core::Recipe& v) { applyRecipe(v); }), merge_key));
}

void CaseController::editRecipe(const core::Recipe& r, const QString& what) {
    if (r == recipe_) return;
    checkRecipe(r);
    undo_.push(new RecipeEditCommand(what, recipe_, r, onThisCapture<core::Recipe>([this](const core::Recipe& v) { applyRecipe(v); })));
}

namespace {
constexpr const char* kModeKey = "delay_model.mode";
/// The recipe's view; "L-L" for a recipe without views.
std::string modeOf(const core::Recipe& r) { return r.has(kModeKey) ? r.text(kModeKey) : std::string("L-L"); }
double shearOf(const core::Recipe& r) {
    return r.has("delay_model.shear_speed_m_s") ? r.number("delay_model.shear_speed_m_s") : 0.0;
}
core::Recipe withMode(core::Recipe r, const std::string& mode) {
    if (r.has(kModeKey)) r.set(kModeKey, mode);
    return r;
}
}  // namespace

void CaseController::applyRecipe(const core::Recipe& r) {
    const bool display_only = recipe_ == r || recipe_.differsOnlyInDisplay(r);
    // Another view of the same frame with the same settings: the strip may already hold it.
    const std::string old_mode = modeOf(recipe_), new_mode = modeOf(r);
    const core::Recipe a = withMode(recipe_, "L-L"), b = withMode(r, "L-L");
    const bool view_only = !display_only && old_mode != new_mode && (a == b || a.differsOnlyInDisplay(b));
    recipe_ = r;
    emit recipeChanged();
    if (!reader_) return;
    if (display_only) {
        rerender();
        rebuildTopView();
        for (const auto& [mode, f] : strip_frames_) strip_images_[mode] = renderFrame(*f);
        if (!strip_frames_.empty()) emit stripChanged();
    } else if (view_only) {
        ++generation_;
        worker_->cancel();
        setBusy(false);
        stopTopViewRun();
        FramePtr was = envelope_;
        cache_.clear();
        top_image_ = QImage();
        emit topViewChanged();
        if (was && strip_frame_ == frame_) strip_frames_[old_mode] = was;  // the old large view joins the strip
        auto it = strip_frames_.find(new_mode);
        if (it != strip_frames_.end() && strip_frame_ == frame_) {
            envelope_ = it->second;
            cache_[frame_] = it->second;
            emit statusMessage(tr("View %1 of frame %2 (beamformed for the strip)").arg(QString::fromStdString(new_mode)).arg(frame_ + 1));
            rerender();
            if (topViewFits() && frameCount() > 1) requestBeamform();  // the other frames, for the top view
        } else {
            requestBeamform();
        }
        for (const auto& [mode, f] : strip_frames_) strip_images_[mode] = renderFrame(*f);
        emit stripChanged();
        continueStrip();
    } else {
        ++generation_;
        cache_.clear();
        clearStrip();
        emit stripChanged();
        top_image_ = QImage();
        emit topViewChanged();
        requestBeamform();
    }
}

// ---------------------------------------------------------------------------------- frames

size_t CaseController::frameCount() const { return reader_ ? reader_->header().frames : 0; }

bool CaseController::isEncodedScan() const {
    return reader_ && reader_->header().scan && reader_->header().scan->position_m.size() > 1 &&
           reader_->header().frames > 1;
}

QString CaseController::frameLabel(size_t f) const {
    if (!reader_) return {};
    const auto& h = reader_->header();
    if (h.scan && f < h.scan->position_m.size()) return QStringLiteral("y = %1 mm").arg(h.scan->position_m[f] * 1e3, 0, 'f', 1);
    if (h.scan && f < h.scan->time_s.size()) return QStringLiteral("t = %1 s").arg(h.scan->time_s[f], 0, 'f', 3);
    return {};
}

void CaseController::setCurrentFrame(size_t f) {
    if (!reader_ || f >= frameCount() || f == frame_) return;
    frame_ = f;
    emit frameChanged(f);
    clearStrip();
    emit stripChanged();
    auto it = cache_.find(f);
    if (it != cache_.end()) {
        envelope_ = it->second;
        rerender();
        continueStrip();
    } else {
        requestBeamform();
    }
}

namespace {
/// Frames kept in memory at most (bytes of linear envelopes); beyond it the farthest frames go
/// and the top view is not computed.
constexpr size_t kCacheBytes = size_t(1) << 30;
size_t frameBytes(const core::Frame& f) { return f.envelope.size() * sizeof(float); }
}  // namespace

bool CaseController::topViewFits() const {
    if (!isEncodedScan()) return false;
    if (!envelope_) return true;  // not known yet; decided when the first frame is there
    return frameBytes(*envelope_) * frameCount() <= kCacheBytes;
}

void CaseController::requestBeamform() {
    if (!reader_) return;
    setBusy(true);
    const bool all = topViewFits();
    top_running_ = all && cache_.size() < frameCount();
    worker_->request(generation_, reader_->path(), recipe_, frame_, all, frameCount());
}

void CaseController::cancelReconstruction() {
    worker_->cancel();
    setBusy(false);
    stopTopViewRun();
}

void CaseController::stopTopViewRun() {
    const bool was = top_running_;
    top_running_ = false;
    emit progressStopped();
    if (was) emit topViewChanged();
}

bool CaseController::topViewIncomplete() const {
    return reader_ && isEncodedScan() && topViewFits() && !top_running_ && cache_.size() < frameCount();
}

void CaseController::finishTopView() {
    if (!topViewIncomplete() || busy_) return;
    top_running_ = true;
    // Same generation: the worker keeps the frames it has done and goes on with the others.
    worker_->request(generation_, reader_->path(), recipe_, frame_, true, frameCount(), /*resume=*/true);
    emit topViewChanged();
}

void CaseController::setBusy(bool b) {
    if (b == busy_) return;
    busy_ = b;
    emit busyChanged(b);
}

void CaseController::onFrameReady(quint64 gen, qulonglong frame, FramePtr img, double seconds, double fidelity,
                                  bool background) {
    if (gen != generation_ || !reader_) return;
    fidelity_db_ = fidelity;
    cache_[frame] = img;
    // Keep the cache bounded: drop the frames farthest from the current one.
    size_t bytes = 0;
    for (const auto& [f, fr] : cache_) bytes += frameBytes(*fr);
    while (bytes > kCacheBytes && cache_.size() > 1) {
        auto far = cache_.begin();
        auto dist = [this](size_t f) { return f > frame_ ? f - frame_ : frame_ - f; };
        for (auto it = cache_.begin(); it != cache_.end(); ++it)
            if (dist(it->first) > dist(far->first)) far = it;
        if (far->first == frame_) break;
        bytes -= frameBytes(*far->second);
        cache_.erase(far);
    }
    if (isEncodedScan() && !topViewFits() && background) {
        worker_->cancel();  // too large to keep every frame: no top view
        stopTopViewRun();
        emit statusMessage(tr("Top view off: %1 frames of this grid do not fit in memory").arg(frameCount()));
    }
    if (frame == frame_) {
        if (!background) beamform_s_ = seconds;
        envelope_ = img;
        setBusy(false);
        emit statusMessage(tr("Beamformed frame %1 in %2 s").arg(frame + 1).arg(seconds, 0, 'f', 2));
        rerender();
        continueStrip();
    }
    if (topViewFits()) rebuildTopView();
}

double CaseController::dynamicRangeDb() const {
    const std::string k = findRecipeKey(recipe_, "dynamic_range");
    return k.empty() ? 60.0 : recipe_.number(k);
}

std::string CaseController::colourMap() const {
    for (const auto& st : recipe_.stages())
        for (const auto& p : st.params)
            if (p.kind == core::ParamKind::Choice && p.display_only &&
                (p.name.find("map") != std::string::npos || st.name.find("colour") != std::string::npos))
                return recipe_.text(st.name + "." + p.name);
    const auto names = recon::colourMapNames();
    return names.empty() ? std::string() : names.front();
}


QImage CaseController::renderFrame(const core::Frame& f) const {
    try {
        const core::Frame tgc = recon::applyTgc(f, reader_->header(), recipe_);
        return report::rgbImage(recon::colourise(recon::logCompress(tgc, recipe_), recipe_), f.nx(), f.nz());
    } catch (const std::exception&) {
        return {};  // the large view reports the same problem
    }
}

void CaseController::rerender() {
    if (!envelope_ || !reader_) return;
    QElapsedTimer t;
    t.start();
    try {
        const core::Frame tgc = recon::applyTgc(*envelope_, reader_->header(), recipe_);
        tgc_amp_ = tgc.envelope;
        sizing_setup_.reset();
        db_ = recon::logCompress(tgc, recipe_);
        image_ = report::rgbImage(recon::colourise(db_, recipe_), envelope_->nx(), envelope_->nz());
    } catch (const std::exception& e) {
        emit errorOccurred(QString::fromStdString(e.what()));
        return;
    }
    render_ms_ = static_cast<double>(t.nsecsElapsed()) / 1e6;
    emit imageChanged();
}

void CaseController::rebuildTopView() {
    if (!reader_ || !isEncodedScan() || cache_.empty()) {
        if (!top_image_.isNull()) {
            top_image_ = QImage();
            emit topViewChanged();
        }
        return;
    }
    const FramePtr any = cache_.begin()->second;
    const size_t nx = any->nx(), nf = frameCount();
    std::vector<float> peak(nf * nx, 0.0f);
    std::vector<bool> have(nf, false);
    float top = 0;
    try {
        const auto gain = recon::tgcGain(reader_->header(), recipe_, any->z_m);
        // Depth gate: leave out the near field and, for a plate of known thickness, the back
        // wall (which would otherwise be the peak of every column).
        const auto& zs = any->z_m;
        const double zspan = zs.back() - zs.front();
        double g0 = zs.front() + 0.04 * zspan, g1 = zs.back();
        if (const auto& t = reader_->header().medium.thickness_m; t && *t > 0) g1 = std::min(g1, *t - 1.5e-3);
        if (g1 <= g0) g0 = zs.front(), g1 = zs.back();
        top_gate_mm_ = {g0 * 1e3, g1 * 1e3};
        for (const auto& [f, fr] : cache_) {
            if (fr->nx() != nx || f >= nf) continue;
            have[f] = true;
            for (size_t z = 0; z < fr->nz(); ++z) {
                if (fr->z_m[z] < g0 || fr->z_m[z] > g1) continue;
                const float g = z < gain.size() ? gain[z] : 1.0f;
                const float* row = fr->envelope.data() + z * nx;
                for (size_t x = 0; x < nx; ++x) peak[f * nx + x] = std::max(peak[f * nx + x], row[x] * g);
            }
        }
        for (float v : peak) top = std::max(top, v);
        top_peak_ = peak;
        top_have_ = have;
        top_x_mm_.clear();
        for (double v : any->x_m) top_x_mm_.push_back(v * 1e3);
        const double dr = dynamicRangeDb();
        std::vector<float> db(peak.size(), static_cast<float>(-dr));
        for (size_t i = 0; i < peak.size(); ++i)
            if (peak[i] > 0 && top > 0)
                db[i] = static_cast<float>(std::clamp(20.0 * std::log10(peak[i] / top), -dr, 0.0));
        top_image_ = report::rgbImage(recon::colourise(db, recipe_), nx, nf);
        for (size_t f = 0; f < nf; ++f)
            if (!have[f])
                for (size_t x = 0; x < nx; ++x) top_image_.setPixelColor(static_cast<int>(x), static_cast<int>(f), QColor(40, 44, 52));
    } catch (const std::exception& e) {
        emit errorOccurred(QString::fromStdString(e.what()));
        return;
    }
    emit topViewChanged();
}

// ---------------------------------------------------------------------------------- measurements

const std::vector<core::Measurement>& CaseController::measurements() const {
    const auto* c = activeOrNull();
    return c ? c->measurements : empty_;
}

core::UncertaintyModel CaseController::uncertaintyModel() const {
    core::UncertaintyModel u;
    if (envelope_ && envelope_->nx() > 1 && envelope_->nz() > 1) {
        u.pixel_x_mm = std::abs(envelope_->x_m[1] - envelope_->x_m[0]) * 1e3;
        u.pixel_z_mm = std::abs(envelope_->z_m[1] - envelope_->z_m[0]) * 1e3;
    }
    u.speed_rel = 0.01;  // without an image: speed of sound taken as known to 1 %
    u.surface_z_mm = 0;  // the array face is the depth reference
    if (const auto* s = sizingSetup()) {
        u.speed_rel = s->context.speed_rel;
        u.speed_basis = s->context.speed_basis;
        if (s->context.resolution) {
            const core::ResolutionAt r = s->context.resolution;
            u.resolution = [r](double x, double z) {
                const auto w = r(x, z);
                return std::pair{w.lateral_mm, w.axial_mm};
            };
        }
    }
    return u;
}

const core::Measurement* CaseController::measurement(const std::string& id) const {
    for (const auto& m : measurements())
        if (m.id == id) return &m;
    return nullptr;
}

void CaseController::setMeasurements(const std::vector<core::Measurement>& ms) {
    if (doc_.captures.empty()) return;
    active().measurements = ms;
    if (!selected_.isEmpty() && !measurement(selected_.toStdString())) setSelectedMeasurement({});
    emit measurementsChanged();
}

std::string CaseController::addMeasurement(core::Measurement m) {
    if (doc_.captures.empty()) return {};
    std::vector<std::string> ids;
    for (const auto& c : doc_.captures)
        for (const auto& x : c.measurements) ids.push_back(x.id);
    for (const auto& f : doc_.findings) ids.insert(ids.end(), f.indication.measurement_ids.begin(), f.indication.measurement_ids.end());
    m.id = core::nextMeasurementId(ids);
    if (m.label.empty()) m.label = m.id;
    auto after = measurements();
    after.push_back(m);
    undo_.push(new AddMeasurementCommand(tr("Add %1 %2").arg(QString::fromStdString(core::kindName(m.kind)), QString::fromStdString(m.id)),
                                         measurements(), after, onThisCapture<MeasurementList>([this](const MeasurementList& v) { setMeasurements(v); })));
    setSelectedMeasurement(QString::fromStdString(m.id));
    return m.id;
}

void CaseController::moveMeasurement(const std::string& id, const std::vector<core::PointMm>& points) {
    auto after = measurements();
    for (auto& m : after)
        if (m.id == id) {
            if (m.points == points) return;
            m.points = points;
        }
    undo_.push(new MoveMeasurementCommand(tr("Move %1").arg(QString::fromStdString(id)), measurements(), after,
                                          onThisCapture<MeasurementList>([this](const MeasurementList& v) { setMeasurements(v); })));
}

void CaseController::deleteMeasurement(const std::string& id) {
    auto after = measurements();
    after.erase(std::remove_if(after.begin(), after.end(), [&](const auto& m) { return m.id == id; }), after.end());
    if (after.size() == measurements().size()) return;
    undo_.push(new DeleteMeasurementCommand(tr("Delete %1").arg(QString::fromStdString(id)), measurements(), after,
                                            onThisCapture<MeasurementList>([this](const MeasurementList& v) { setMeasurements(v); })));
}

void CaseController::relabelMeasurement(const std::string& id, const std::string& label) {
    auto after = measurements();
    for (auto& m : after)
        if (m.id == id) {
            if (m.label == label) return;
            m.label = label;
        }
    undo_.push(new RelabelMeasurementCommand(tr("Relabel %1").arg(QString::fromStdString(id)), measurements(), after,
                                             onThisCapture<MeasurementList>([this](const MeasurementList& v) { setMeasurements(v); })));
}

void CaseController::setSelectedMeasurement(const QString& id) {
    if (id == selected_) return;
    selected_ = id;
    emit selectionChanged(id);
}

// ---------------------------------------------------------------------------------- findings

void CaseController::setFindings(const std::vector<core::Finding>& fs) {
    doc_.findings = fs;
    emit findingsChanged();
}

void CaseController::editFindings(const std::vector<core::Finding>& fs, const QString& what) {
    if (fs == doc_.findings) return;
    undo_.push(new FindingEditCommand(what, doc_.findings, fs, [this](const FindingList& v) { setFindings(v); }));
}

// ---------------------------------------------------------------------------------- amplitude reference

template <class F>
void CaseController::forEachPixelIn(const core::Measurement& m, F&& f) const {
    if (!envelope_ || m.frame_index != frame_ || m.points.empty()) return;
    double x0 = 1e300, x1 = -1e300, z0 = 1e300, z1 = -1e300;
    for (const auto& p : m.points) {
        x0 = std::min(x0, p.x_mm), x1 = std::max(x1, p.x_mm);
        z0 = std::min(z0, p.z_mm), z1 = std::max(z1, p.z_mm);
    }
    if (m.kind == core::MeasurementKind::Ellipse && m.points.size() == 3) {
        const auto& c = m.points[0];
        const double r = std::max(std::hypot(m.points[1].x_mm - c.x_mm, m.points[1].z_mm - c.z_mm),
                                  std::hypot(m.points[2].x_mm - c.x_mm, m.points[2].z_mm - c.z_mm));
        x0 = c.x_mm - r, x1 = c.x_mm + r, z0 = c.z_mm - r, z1 = c.z_mm + r;
    }
    const bool marker = m.kind == core::MeasurementKind::DepthMarker;
    if (marker) z0 -= 0.5, z1 += 0.5;  // a depth marker: the band ±0.5 mm about its depth, all x
    const auto& xs = envelope_->x_m;
    const auto& zs = envelope_->z_m;
    for (size_t iz = 0; iz < zs.size(); ++iz) {
        const double z = zs[iz] * 1e3;
        if (z < z0 || z > z1) continue;
        for (size_t ix = 0; ix < xs.size(); ++ix) {
            const double x = xs[ix] * 1e3;
            if (!marker && (x < x0 || x > x1)) continue;
            f(ix, iz);
        }
    }
}

std::optional<CaseController::Peak> CaseController::peakOf(const core::Measurement& m, const std::vector<float>& amp) const {
    if (!envelope_ || amp.size() != envelope_->nx() * envelope_->nz()) return std::nullopt;
    std::optional<Peak> best;
    forEachPixelIn(m, [&](size_t ix, size_t iz) {
        const double a = amp[iz * envelope_->nx() + ix];
        if (a > 0 && (!best || a > best->amplitude)) best = Peak{a, envelope_->x_m[ix] * 1e3, envelope_->z_m[iz] * 1e3};
    });
    return best;
}

std::optional<CaseController::Peak> CaseController::peakIn(const core::Measurement& m) const { return peakOf(m, tgc_amp_); }

std::optional<CaseController::Peak> CaseController::peakBeforeTcgIn(const core::Measurement& m) const {
    return envelope_ ? peakOf(m, envelope_->envelope) : std::nullopt;
}

std::optional<CaseController::CurvePeak> CaseController::peakReCurveIn(const core::Measurement& m) const {
    std::optional<CurvePeak> best;
    forEachPixelIn(m, [&](size_t ix, size_t iz) {
        const auto r = dbReCurveAt(ix, iz);
        if (r && (!best || r->db > best->reading.db)) best = CurvePeak{*r, envelope_->x_m[ix] * 1e3, envelope_->z_m[iz] * 1e3};
    });
    return best;
}

const recon::SizingSetup* CaseController::sizingSetup() const {
    if (!envelope_ || !reader_ || tgc_amp_.size() != envelope_->nx() * envelope_->nz()) return nullptr;
    if (!sizing_setup_) {
        try {
            recon::SizingSettings settings;
            settings.medium = doc_.sizing_medium;
            settings.speed_rel = doc_.speed_uncertainty_rel;
            sizing_setup_ = recon::sizingSetup(recipe_, recon::acquisitionOf(reader_->header()), tgc_amp_, settings);
        } catch (const std::exception&) {
            return nullptr;
        }
    }
    return &*sizing_setup_;
}

std::optional<core::SizingResult> CaseController::sizing(const core::Measurement& m) const {
    if (!core::isImageSizing(m.kind) || m.points.size() != 2 || m.frame_index != frame_) return std::nullopt;
    const auto* setup = sizingSetup();
    if (!setup) return std::nullopt;
    std::vector<double> xs, zs;
    for (double v : envelope_->x_m) xs.push_back(v * 1e3);
    for (double v : envelope_->z_m) zs.push_back(v * 1e3);
    const core::SizingTool tool = m.kind == core::MeasurementKind::TipSizing      ? core::SizingTool::Tips
                                  : m.kind == core::MeasurementKind::Drop20Sizing ? core::SizingTool::Drop20
                                                                                  : core::SizingTool::Drop6;
    try {
        return core::measureInBox(tool, tgc_amp_, xs, zs, m.points[0], m.points[1], setup->context);
    } catch (const std::exception&) {
        return std::nullopt;
    }
}

std::optional<CaseController::TopViewMeasure> CaseController::topViewMeasure(double xa, double ya, double xb, double yb) const {
    if (!reader_ || !isEncodedScan() || top_x_mm_.empty() || !reader_->header().scan) return std::nullopt;
    const auto& pos = reader_->header().scan->position_m;
    const size_t nx = top_x_mm_.size();
    std::vector<double> y, proj;
    const double lo = std::min(xa, xb), hi = std::max(xa, xb);
    for (size_t f = 0; f < top_have_.size() && f < pos.size(); ++f) {
        if (!top_have_[f]) continue;
        double m = 0;
        for (size_t x = 0; x < nx; ++x)
            if (top_x_mm_[x] >= lo - 1e-9 && top_x_mm_[x] <= hi + 1e-9) m = std::max(m, double(top_peak_[f * nx + x]));
        y.push_back(pos[f] * 1e3);
        proj.push_back(m);
    }
    const auto* setup = sizingSetup();
    const double elev = setup ? setup->elevation_width_mm : 0;
    double lateral = 0;
    if (setup && setup->context.resolution)
        lateral = setup->context.resolution(0.5 * (xa + xb), 0.5 * (top_gate_mm_.first + top_gate_mm_.second)).lateral_mm;
    const double step_x = nx > 1 ? (top_x_mm_.back() - top_x_mm_.front()) / double(nx - 1) : 0;
    const double step_y = pos.size() > 1 ? std::abs(pos.back() - pos.front()) * 1e3 / double(pos.size() - 1) : 0;
    TopViewMeasure out;
    out.end_to_end = core::endToEnd({xa, ya}, {xb, yb}, lateral, elev, step_x, step_y);
    try {
        if (y.size() >= 2) out.scan_length = core::scanLength(y, proj, core::kSixDbDropRatio, elev);
    } catch (const std::exception&) {
    }
    return out;
}

void CaseController::setSpeedUncertainty(const std::string& medium, std::optional<double> relative) {
    using Setting = std::pair<std::string, std::optional<double>>;
    const Setting before{doc_.sizing_medium, doc_.speed_uncertainty_rel}, after{medium, relative};
    if (before == after) return;
    undo_.push(new ValueCommand<Setting>(tr("Set speed-of-sound uncertainty"), before, after, [this](const Setting& v) {
        doc_.sizing_medium = v.first;
        doc_.speed_uncertainty_rel = v.second;
        sizing_setup_.reset();
        markDirty();
        emit measurementsChanged();  // every value's budget changes
        emit imageChanged();
    }));
}

void CaseController::setReportHeader(const core::ReportHeader& header) {
    if (header == doc_.header) return;
    undo_.push(new ValueCommand<core::ReportHeader>(tr("Edit report header"), doc_.header, header, [this](const core::ReportHeader& v) {
        doc_.header = v;
        markDirty();
        emit caseChanged();
    }));
}

std::pair<std::string, double> CaseController::speedUncertainty() const {
    if (const auto* s = sizingSetup()) return {s->medium, s->context.speed_rel};
    const std::string m = doc_.sizing_medium.empty() ? "other" : doc_.sizing_medium;
    return {m, doc_.speed_uncertainty_rel.value_or(core::speedUncertaintyDefault(m).relative)};
}

QString CaseController::budgetText(const std::string& id) const {
    const core::Measurement* m = measurement(id);
    if (!m) return {};
    QStringList parts;
    parts << tr("%1 (%2), frame %3").arg(QString::fromStdString(m->label.empty() ? m->id : m->label),
                                        QString::fromStdString(core::kindName(m->kind)), QString::number(m->frame_index + 1));
    try {
        for (const auto& q : quantities(*m)) parts << QString::fromStdString(core::formatBudget(core::toMeasured(q)));
    } catch (const std::exception& e) {
        parts << tr("cannot be measured: %1").arg(QString::fromUtf8(e.what()));
    }
    if (const auto s = sizing(*m)) {
        if (s->resolution.lateral_mm > 0)
            parts << tr("Point-spread widths at the peak (−6 dB): lateral %1 mm, axial %2 mm (model).")
                         .arg(s->resolution.lateral_mm, 0, 'f', 2)
                         .arg(s->resolution.axial_mm, 0, 'f', 2);
        for (const auto& w : s->warnings) parts << tr("Warning: %1").arg(QString::fromStdString(w));
    }
    if (const QString cw = coverageWarning(*m); !cw.isEmpty()) parts << tr("Warning: %1").arg(cw);
    parts << tr("Expanded uncertainties use k = 2 (about 95 %). A sizing aid: the written procedure, the applicable code and "
                "qualified people decide.");
    return parts.join(QStringLiteral("\n\n"));
}

void CaseController::changeSizingKind(const std::string& id, core::MeasurementKind kind) {
    auto after = measurements();
    for (auto& m : after)
        if (m.id == id) {
            if (!core::isImageSizing(m.kind) || !core::isImageSizing(kind) || m.kind == kind) return;
            m.kind = kind;
        }
    undo_.push(new MoveMeasurementCommand(tr("Change %1 to %2").arg(QString::fromStdString(id), QString::fromStdString(core::kindName(kind))),
                                          measurements(), after, [this](const MeasurementList& v) { setMeasurements(v); }));
}

std::optional<core::DropSizing> CaseController::dropSizing(const core::Measurement& m) const {
    if (m.kind == core::MeasurementKind::TipSizing) return std::nullopt;
    const auto s = sizing(m);
    if (!s) return std::nullopt;
    return s->drop;
}

std::vector<core::Quantity> CaseController::quantities(const core::Measurement& m) const {
    if (const auto s = sizing(m); s && s->found) {
        // Extents first (the label shows them), then the position.
        std::vector<core::Quantity> q;
        for (const auto* v : {&s->length, &s->height, &s->x, &s->depth})
            if (*v) q.push_back(core::fromMeasured(**v));
        return q;
    }
    return core::evaluate(m, uncertaintyModel());
}

bool CaseController::addCurvePointFrom(const std::string& measurement_id, QString* why, const QString& curve_label) {
    const core::Measurement* m = measurement(measurement_id);
    auto fail = [&](const QString& w) {
        if (why) *why = w;
        return false;
    };
    if (!m) return fail(tr("Select a measurement (extent box or depth marker) around the hole's echo first."));
    if (m->frame_index != frame_) return fail(tr("The measurement is on frame %1; go to that frame first.").arg(m->frame_index + 1));
    if (doc_.curve && doc_.curve->basis != core::AmplitudeBasis::BeforeTcg)
        return fail(tr("The case's curve was converted from a single amplitude reference read after TCG. "
                       "Clear it (Tools → Clear distance–amplitude curve) before picking holes for a new curve."));
    if (doc_.curve && !doc_.curve->points.empty()) {
        const auto d = curveRecipeDifferences();
        if (!d.empty()) {
            QStringList keys;
            for (const auto& k : d) keys << QString::fromStdString(k);
            return fail(tr("The recipe differs from the curve's in %1; a point read with it would not belong to the curve. "
                           "Put those settings back or clear the curve.")
                            .arg(keys.join(", ")));
        }
    }
    const auto pk = peakBeforeTcgIn(*m);
    if (!pk) return fail(tr("No echo inside the measurement on this frame (no image yet, or amplitude zero)."));
    core::DistanceAmplitudeCurve c;
    if (doc_.curve) {
        c = *doc_.curve;
    } else {
        c.label = curve_label.trimmed().toStdString();
        if (c.label.empty()) c.label = "side-drilled holes, reference block";
        c.basis = core::AmplitudeBasis::BeforeTcg;
        c.recipe_json = recipe_.toJson();
        c.recipe_fingerprint = core::amplitudeFingerprint(recipe_, c.basis);
    }
    core::DacPoint p;
    p.depth_m = pk->z_mm * 1e-3;
    p.x_m = pk->x_mm * 1e-3;
    p.amplitude = pk->amplitude;
    p.label = m->label.empty() || m->label == m->id ? QStringLiteral("echo at %1 mm").arg(pk->z_mm, 0, 'f', 1).toStdString()
                                                    : m->label;
    p.capture_sha256 = activeOrNull() ? activeOrNull()->sha256 : std::string();
    p.frame = frame_;
    editCurve(core::withPoint(std::move(c), p), tr("Add %1 mm to the distance–amplitude curve").arg(pk->z_mm, 0, 'f', 1));
    return true;
}

void CaseController::removeCurvePoint(size_t index) {
    if (!doc_.curve || index >= doc_.curve->points.size()) return;
    auto c = *doc_.curve;
    const double z = c.points[index].depth_m * 1e3;
    c.points.erase(c.points.begin() + static_cast<long>(index));
    editCurve(c.points.empty() ? std::nullopt : std::optional(c),
              tr("Remove %1 mm from the distance–amplitude curve").arg(z, 0, 'f', 1));
}

void CaseController::relabelCurve(const QString& label) {
    if (!doc_.curve) return;
    auto c = *doc_.curve;
    c.label = label.toStdString();
    editCurve(c, tr("Rename the distance–amplitude curve"));
}

void CaseController::editCurve(const std::optional<core::DistanceAmplitudeCurve>& c, const QString& what) {
    if (c == doc_.curve) return;
    undo_.push(new ValueCommand<std::optional<core::DistanceAmplitudeCurve>>(
        what, doc_.curve, c, [this](const std::optional<core::DistanceAmplitudeCurve>& v) { setCurve(v); }));
}

namespace {
using CalibrationLines = std::pair<std::vector<std::string>, std::vector<std::string>>;  // speed, elements

// The speed calibration lines of a capture hold up to two blocks: the speed's and the fixed
// delay's (a head line and its indented notes). Each calibration replaces its own block only.
constexpr const char* kDelayHead = "Fixed delay (calibrated from a";
std::vector<std::string> withBlock(const std::vector<std::string>& old, const std::vector<std::string>& block, bool delay) {
    std::vector<std::string> speed, del;
    bool in_delay = false;
    for (const auto& l : old) {
        if (l.rfind("  ", 0) != 0) in_delay = l.rfind(kDelayHead, 0) == 0;
        (in_delay ? del : speed).push_back(l);
    }
    (delay ? del : speed) = block;
    speed.insert(speed.end(), del.begin(), del.end());
    return speed;
}
}  // namespace

void CaseController::recordCalibration(const QString& what, const std::pair<std::vector<std::string>, std::vector<std::string>>& after) {
    const CalibrationLines before{active().speed_calibration, active().element_health};
    undo_.push(new ValueCommand<CalibrationLines>(what, before, after, onThisCapture<CalibrationLines>([this](const CalibrationLines& v) {
                                                      active().speed_calibration = v.first;
                                                      active().element_health = v.second;
                                                      emit caseChanged();
                                                  })));
}

std::optional<recon::DelayCalibration> CaseController::calibrateDelay(double x_mm, double z_mm, double dia_mm, double tol_mm,
                                                                      QString* why) {
    if (!reader_) {
        if (why) *why = tr("Open a capture first.");
        return std::nullopt;
    }
    try {
        const auto c = recon::fixedDelayFromReflector(*reader_, x_mm * 1e-3, z_mm * 1e-3, dia_mm * 0.5e-3, tol_mm * 1e-3,
                                                      recon::defaultDelayWave(reader_->header()), frame_);
        std::vector<std::string> lines = recon::delayLines(c);
        lines.front() += " (frame " + std::to_string(frame_ + 1) + ", position ± " + QString::number(tol_mm, 'g', 3).toStdString() + " mm)";
        recordCalibration(tr("Calibrate the fixed delay"), {withBlock(active().speed_calibration, lines, true), active().element_health});
        return c;
    } catch (const std::exception& e) {
        if (why) *why = QString::fromUtf8(e.what());
        return std::nullopt;
    }
}

std::optional<core::MeasuredValue> CaseController::calibrateSpeed(double thickness_mm, double tol_mm, QString* why) {
    if (!reader_) {
        if (why) *why = tr("Open a capture first.");
        return std::nullopt;
    }
    try {
        const auto c = recon::speedFromBackWall(*reader_, thickness_mm * 1e-3, tol_mm * 1e-3, frame_);
        std::vector<std::string> lines = recon::calibrationLines(c);
        lines.front() += " (frame " + std::to_string(frame_ + 1) + ", plate " +
                         core::formatWithUncertainty(thickness_mm, tol_mm, "mm") + ")";
        recordCalibration(tr("Calibrate the speed of sound"), {withBlock(active().speed_calibration, lines, false), active().element_health});
        return c.speed;
    } catch (const std::exception& e) {
        if (why) *why = QString::fromUtf8(e.what());
        return std::nullopt;
    }
}

std::optional<std::vector<int>> CaseController::checkElements(QString* why) {
    if (!reader_) {
        if (why) *why = tr("Open a capture first.");
        return std::nullopt;
    }
    try {
        const auto h = recon::elementHealth(*reader_, frame_);
        std::vector<std::string> lines = recon::healthLines(h);
        lines.front() += " (frame " + std::to_string(frame_ + 1) + ")";
        recordCalibration(tr("Check the elements"), {active().speed_calibration, lines});
        return h.flagged();
    } catch (const std::exception& e) {
        if (why) *why = QString::fromUtf8(e.what());
        return std::nullopt;
    }
}

std::vector<std::string> CaseController::calibrationLines() const {
    const core::CaseCapture* c = activeOrNull();
    if (!c) return {};
    std::vector<std::string> out = c->speed_calibration;
    out.insert(out.end(), c->element_health.begin(), c->element_health.end());
    return out;
}

std::string CaseController::coverageKey(std::string* mode, recon::Grid* grid) const {
    if (!reader_ || !envelope_ || envelope_->nx() < 2 || envelope_->nz() < 2) return {};
    *mode = largeView();
    recon::Grid& g = *grid;
    g.x_min_m = envelope_->x_m.front();
    g.x_max_m = envelope_->x_m.back();
    g.z_min_m = envelope_->z_m.front();
    g.z_max_m = envelope_->z_m.back();
    g.step_m = std::max(envelope_->x_m[1] - envelope_->x_m[0], kCoverageStepMm * 1e-3);
    std::ostringstream key;
    key.precision(17);
    key << reader_->path() << '|' << *mode << '|' << g.x_min_m << '|' << g.x_max_m << '|' << g.z_min_m << '|' << g.z_max_m << '|'
        << g.step_m << '|' << speedMps() << '|' << shearOf(recipe_);
    return key.str();
}

void CaseController::startCoverage(const std::string& key, const std::string& mode, const recon::Grid& g) const {
    if (coverage_job_.valid() && coverage_job_key_ == key) return;
    if (coverage_job_.valid()) coverage_stale_.push_back(std::move(coverage_job_));  // never wait for a superseded map
    coverage_job_key_ = key;
    coverage_job_ = std::async(std::launch::async, [h = reader_->header(), mode, g, r = recipe_]() -> std::optional<recon::CoverageMap> {
        try {
            recon::CoverageOptions o;
            o.threads = 2;
            return recon::coverageMap(h, mode, g, o, &r);
        } catch (const std::exception&) {
            return std::nullopt;  // the view cannot be mapped for this capture: no contours, no warning
        }
    });
    if (!coverage_poll_->isActive()) coverage_poll_->start();
}

void CaseController::takeCoverage() const {
    coverage_ = coverage_job_.get();
    coverage_key_ = coverage_job_key_;
    coverage_job_key_.clear();
}

const recon::CoverageMap* CaseController::coverageIfReady() const {
    std::string mode;
    recon::Grid g;
    const std::string key = coverageKey(&mode, &g);
    if (key.empty()) return nullptr;
    if (coverage_key_ == key) return coverage_ ? &*coverage_ : nullptr;
    if (coverage_job_.valid() && coverage_job_key_ == key) {
        if (coverage_job_.wait_for(std::chrono::seconds(0)) != std::future_status::ready) return nullptr;
        takeCoverage();
        return coverage_ ? &*coverage_ : nullptr;
    }
    startCoverage(key, mode, g);
    return nullptr;
}

const recon::CoverageMap* CaseController::coverage() const {
    std::string mode;
    recon::Grid g;
    const std::string key = coverageKey(&mode, &g);
    if (key.empty()) return nullptr;
    if (coverage_key_ == key) return coverage_ ? &*coverage_ : nullptr;
    startCoverage(key, mode, g);
    takeCoverage();  // waits
    return coverage_ ? &*coverage_ : nullptr;
}

std::optional<double> CaseController::coverageDbAt(double x_mm, double z_mm) const {
    const recon::CoverageMap* c = coverage();
    if (!c || c->x_m.size() < 2 || c->z_m.size() < 2) return std::nullopt;
    double fx = (x_mm * 1e-3 - c->x_m.front()) / (c->x_m[1] - c->x_m[0]);
    double fz = (z_mm * 1e-3 - c->z_m.front()) / (c->z_m[1] - c->z_m[0]);
    const double mx = double(c->x_m.size() - 1), mz = double(c->z_m.size() - 1), eps = 1e-6;
    if (fx < -eps || fz < -eps || fx > mx + eps || fz > mz + eps) return std::nullopt;
    fx = std::clamp(fx, 0.0, mx);
    fz = std::clamp(fz, 0.0, mz);
    const size_t ix = std::min(size_t(fx), c->x_m.size() - 2), iz = std::min(size_t(fz), c->z_m.size() - 2);
    const double ax = fx - double(ix), az = fz - double(iz);
    return (1 - az) * ((1 - ax) * c->at(iz, ix) + ax * c->at(iz, ix + 1)) + az * ((1 - ax) * c->at(iz + 1, ix) + ax * c->at(iz + 1, ix + 1));
}

QString CaseController::coverageWarning(const core::Measurement& m) const {
    if (m.points.empty()) return {};
    double x = 0, z = 0;
    for (const auto& p : m.points) {
        x += p.x_mm;
        z += p.z_mm;
    }
    x /= double(m.points.size());
    z /= double(m.points.size());
    const auto db = coverageDbAt(x, z);
    if (!db || *db >= -6.0) return {};
    return tr("Outside the −6 dB coverage of view %1 (%2 dB at its centre): the view is weak there; confirm with another view")
        .arg(QString::fromStdString(coverage_ ? coverage_->mode : std::string("?")))
        .arg(*db, 0, 'f', 1);
}

// ---------------------------------------------------------------------------------- views

std::string CaseController::largeView() const { return modeOf(recipe_); }

std::vector<std::string> CaseController::validViews() const {
    return reader_ ? recon::validViewModes(reader_->header()) : std::vector<std::string>{};
}

void CaseController::setChosenViews(const std::vector<std::string>& modes) {
    std::vector<std::string> next;
    for (const auto& m : modes) {
        const recon::ViewMode v = recon::parseViewMode(m);  // throws SettingError
        if (reader_) recon::checkViewMode(reader_->header(), v, shearOf(recipe_));
        if (std::find(next.begin(), next.end(), v.name) == next.end()) next.push_back(v.name);
    }
    if (next == view_.views) return;
    view_.views = next;
    markDirty();
    QStringList names;
    for (const auto& m : next) names << QString::fromStdString(m);
    journal(next.empty() ? tr("Hide the views strip") : tr("Choose views %1").arg(names.join(", ")));
    emit stripChanged();
    continueStrip();
}

std::vector<std::string> CaseController::stripViews() const {
    std::vector<std::string> out;
    const std::string large = largeView();
    for (const auto& m : view_.views)
        if (m != large) out.push_back(m);
    return out;
}

CaseController::StripTile CaseController::stripTile(const std::string& mode) const {
    StripTile t;
    if (auto it = strip_problems_.find(mode); it != strip_problems_.end()) t.problem = it->second;
    if (auto it = strip_images_.find(mode); it != strip_images_.end()) t.image = it->second;
    return t;
}

long CaseController::stripRuns() const { return strip_worker_->runs(); }

void CaseController::showViewLarge(const std::string& mode) {
    if (mode == largeView()) return;
    editRecipeValue(kModeKey, mode);
}

void CaseController::clearStrip() {
    ++strip_generation_;
    if (strip_worker_) strip_worker_->cancel();
    strip_running_.clear();
    strip_frames_.clear();
    strip_images_.clear();
    strip_problems_.clear();
    strip_frame_ = frame_;
}

void CaseController::continueStrip() {
    if (!reader_ || busy_ || !strip_running_.empty() || !envelope_) return;
    if (strip_frame_ != frame_) clearStrip();
    for (const auto& mode : stripViews()) {
        if (strip_frames_.count(mode) || strip_problems_.count(mode)) continue;
        core::Recipe r;
        try {
            r = withMode(recipe_, mode);
            recon::checkViewMode(reader_->header(), recon::parseViewMode(mode), shearOf(r));
            checkRecipe(r);
        } catch (const std::exception& e) {
            strip_problems_[mode] = QString::fromUtf8(e.what());
            emit stripChanged();
            continue;
        }
        strip_running_ = mode;
        strip_worker_->request(++strip_generation_, reader_->path(), r, frame_, false, frameCount());
        emit stripChanged();
        return;
    }
}

void CaseController::onStripFrameReady(quint64 gen, qulonglong frame, FramePtr img) {
    if (gen != strip_generation_ || strip_running_.empty() || !reader_) return;
    const std::string mode = strip_running_;
    strip_running_.clear();
    if (frame == strip_frame_ && frame == frame_) {
        strip_frames_[mode] = img;
        strip_images_[mode] = renderFrame(*img);
    }
    emit stripChanged();
    continueStrip();
}

void CaseController::editWeld(const std::optional<core::WeldGeometry>& w, const QString& what) {
    if (w) core::checkWeld(*w);  // throws SettingError before anything changes
    if (w == doc_.weld) return;
    undo_.push(new ValueCommand<std::optional<core::WeldGeometry>>(
        what, doc_.weld, w, [this](const std::optional<core::WeldGeometry>& v) { setWeld(v); }));
}

void CaseController::setWeld(const std::optional<core::WeldGeometry>& w) {
    doc_.weld = w;
    emit weldChanged();
}

std::vector<core::WeldPolyline> CaseController::weldOverlay() const {
    if (!doc_.weld) return {};
    double x0 = doc_.weld->centre_x_mm - 50, x1 = doc_.weld->centre_x_mm + 50;
    if (envelope_ && envelope_->nx() > 1) {
        x0 = std::min(x0, envelope_->x_m.front() * 1e3);
        x1 = std::max(x1, envelope_->x_m.back() * 1e3);
    }
    return core::weldOverlay(*doc_.weld, x0, x1);
}

void CaseController::setCurve(const std::optional<core::DistanceAmplitudeCurve>& c) {
    doc_.curve = c;
    emit curveChanged();
}

bool CaseController::makeTcgFromCurve(QString* why) {
    if (!doc_.curve) {
        if (why) *why = tr("There is no distance–amplitude curve yet.");
        return false;
    }
    core::Recipe r = recipe_;
    try {
        const std::string text = core::tcgCurveText(core::tcgFromCurve(*doc_.curve));
        r.setText("tgc.mode", "curve");
        r.setText("tgc.curve", text);
    } catch (const std::exception& e) {
        if (why) *why = QString::fromStdString(e.what());
        return false;
    }
    if (!(r == recipe_)) editRecipe(r, tr("Make TCG from the distance–amplitude curve"));
    return true;
}

QString CaseController::amplitudeUnit() const {
    if (!doc_.curve) return tr("dB re frame peak");
    return tr("dB re DAC (%1)").arg(QString::fromStdString(doc_.curve->label));
}

std::optional<double> CaseController::curveBasisAmplitude(size_t ix, size_t iz) const {
    if (!envelope_ || !doc_.curve || ix >= envelope_->nx() || iz >= envelope_->nz()) return std::nullopt;
    const size_t i = iz * envelope_->nx() + ix;
    if (doc_.curve->basis == core::AmplitudeBasis::BeforeTcg) return envelope_->envelope[i];
    if (tgc_amp_.size() != envelope_->nx() * envelope_->nz()) return std::nullopt;
    return tgc_amp_[i];
}

std::optional<core::DacReading> CaseController::dbReCurveAt(size_t ix, size_t iz) const {
    const auto a = curveBasisAmplitude(ix, iz);
    if (!a) return std::nullopt;
    return core::dbReCurve(*doc_.curve, *a, envelope_->z_m[iz]);
}

std::optional<core::DacReading> CaseController::dbReCurveAtMm(double x_mm, double z_mm) const {
    const core::Frame* f = envelope_.get();
    if (!f || f->nx() < 2 || f->nz() < 2) return std::nullopt;
    const double dx = (f->x_m[1] - f->x_m[0]) * 1e3, dz = (f->z_m[1] - f->z_m[0]) * 1e3;
    const long ix = std::lround((x_mm - f->x_m[0] * 1e3) / dx), iz = std::lround((z_mm - f->z_m[0] * 1e3) / dz);
    if (ix < 0 || iz < 0 || ix >= static_cast<long>(f->nx()) || iz >= static_cast<long>(f->nz())) return std::nullopt;
    return dbReCurveAt(static_cast<size_t>(ix), static_cast<size_t>(iz));
}

std::vector<std::string> CaseController::curveRecipeDifferences() const {
    if (!doc_.curve || doc_.curve->recipe_json.empty()) return {};
    core::Recipe ref = recon::defaultRecipe();
    try {
        ref.mergeJson(doc_.curve->recipe_json, "distance–amplitude curve");
    } catch (const std::exception&) {
        return {"(the curve's recipe cannot be read)"};
    }
    return core::amplitudeDifferences(recipe_, ref, doc_.curve->basis);
}

QString CaseController::curveWarning() const {
    if (!doc_.curve) return {};
    if (doc_.curve->recipe_json.empty())
        return tr("The curve's recipe is not recorded: amplitudes cannot be checked as comparable with it.");
    const auto d = curveRecipeDifferences();
    if (d.empty()) return {};
    QStringList keys;
    for (const auto& k : d) keys << QString::fromStdString(k);
    return tr("Amplitudes not comparable with the distance–amplitude curve: the recipe differs from the curve's in %1.")
        .arg(keys.join(", "));
}

QString CaseController::outsideText() const {
    const auto r = doc_.curve ? core::depthRange(*doc_.curve) : std::nullopt;
    if (!r) return {};
    if (r->second - r->first < 1e-9)
        return tr("outside the curve (one point, at %1 mm: level held)").arg(r->first * 1e3, 0, 'f', 1);
    return tr("outside the curve's depth range %1–%2 mm (end level held)").arg(r->first * 1e3, 0, 'f', 1).arg(r->second * 1e3, 0, 'f', 1);
}

std::map<std::string, std::string> CaseController::roundIndication(core::Indication& ind, const core::Measurement& m) const {
    // Each number rounded to its expanded uncertainty (GUM 7.2.6) with the same budgets as the
    // readout: image sizing from its own budgets; other kinds through an extent box and a depth
    // marker on the measurement's bounding box.
    std::map<std::string, double> U;
    if (const auto sz = sizing(m); sz && sz->found) {
        if (sz->x) U["x"] = sz->x->budget.expanded();
        if (sz->depth) U["depth"] = sz->depth->budget.expanded();
        if (sz->length) U["length"] = sz->length->budget.expanded();
        if (sz->height) U["height"] = sz->height->budget.expanded();
    } else if (ind.x_mm && ind.depth_mm) {
        const auto u = uncertaintyModel();
        core::Measurement box;
        box.kind = core::MeasurementKind::ExtentBox;
        const double hl = ind.length_mm.value_or(0) / 2;
        box.points = {{*ind.x_mm - hl, *ind.depth_mm}, {*ind.x_mm + hl, *ind.depth_mm + ind.height_mm.value_or(0)}};
        const auto q = core::evaluate(box, u);
        U["length"] = core::kCoverageFactor * q[0].uncertainty;
        U["height"] = core::kCoverageFactor * q[1].uncertainty;
        U["x"] = U["length"] / 2;
        core::Measurement dm;
        dm.kind = core::MeasurementKind::DepthMarker;
        dm.points = {{*ind.x_mm, *ind.depth_mm}};
        U["depth"] = core::kCoverageFactor * core::evaluate(dm, u)[0].uncertainty;
    }
    std::map<std::string, std::string> text;
    auto round = [&](std::optional<double>& v, const char* key) {
        if (!v || !U.count(key)) return;
        text[key] = core::roundToUncertainty(*v, U[key]).value_text;
        *v = std::stod(text[key]);
    };
    round(ind.x_mm, "x");
    round(ind.depth_mm, "depth");
    round(ind.length_mm, "length");
    round(ind.height_mm, "height");
    if (ind.peak_db) {
        // Peak level: the pixel grid may miss the true peak by up to the fidelity target of the
        // automatic grid (rectangular over [0, target]: target/√12, expanded k = 2).
        const double target = recipe_.number("grid.max_loss_db");
        *ind.peak_db = std::stod(core::roundToUncertainty(*ind.peak_db, core::kCoverageFactor * target / std::sqrt(12.0)).value_text);
    }
    return text;
}

core::Indication CaseController::indicationFrom(const core::Measurement* m) const {
    core::Finding f;
    f.indication.capture_index = doc_.active_capture;
    f.indication.frame_index = frame_;
    if (m) {
        f.indication.frame_index = m->frame_index;
        f.indication.measurement_ids = {m->id};
        double x0 = 1e300, x1 = -1e300, z0 = 1e300, z1 = -1e300;
        for (const auto& p : m->points) {
            x0 = std::min(x0, p.x_mm), x1 = std::max(x1, p.x_mm);
            z0 = std::min(z0, p.z_mm), z1 = std::max(z1, p.z_mm);
        }
        if (m->kind == core::MeasurementKind::Ellipse && m->points.size() == 3) {
            const auto& c = m->points[0];
            const double a = std::hypot(m->points[1].x_mm - c.x_mm, m->points[1].z_mm - c.z_mm);
            const double b = std::hypot(m->points[2].x_mm - c.x_mm, m->points[2].z_mm - c.z_mm);
            const double r = std::max(a, b);
            x0 = c.x_mm - r, x1 = c.x_mm + r, z0 = c.z_mm - r, z1 = c.z_mm + r;
        }
        f.indication.x_mm = (x0 + x1) / 2;
        f.indication.depth_mm = z0;
        if (m->kind != core::MeasurementKind::DepthMarker) {
            f.indication.length_mm = x1 - x0;
            f.indication.height_mm = z1 - z0;
        }
        // Peak of the displayed dB inside the measurement's bounding box.
        if (envelope_ && m->frame_index == frame_ && !db_.empty()) {
            const auto& xs = envelope_->x_m;
            const auto& zs = envelope_->z_m;
            float best = -1e30f;
            const double pad = m->kind == core::MeasurementKind::DepthMarker ? 0.5 : 0.0;
            for (size_t iz = 0; iz < zs.size(); ++iz) {
                const double z = zs[iz] * 1e3;
                if (z < z0 - pad || z > z1 + pad) continue;
                for (size_t ix = 0; ix < xs.size(); ++ix) {
                    const double x = xs[ix] * 1e3;
                    if (m->kind != core::MeasurementKind::DepthMarker && (x < x0 || x > x1)) continue;
                    best = std::max(best, db_[iz * xs.size() + ix]);
                }
            }
            if (best > -1e29f) {
                f.indication.peak_db = best;
                f.indication.reference = "frame peak (display reference, recipe log compression)";
            }
            // With a curve: the highest dB re the curve at its depth inside the measurement.
            if (doc_.curve) {
                f.indication.peak_db.reset();
                if (const auto pk = peakReCurveIn(*m)) {
                    f.indication.peak_db = pk->reading.db;
                    std::ostringstream ref;
                    ref.setf(std::ios::fixed);
                    ref.precision(1);
                    ref << "distance–amplitude curve (" << doc_.curve->label << ") at " << pk->z_mm << " mm";
                    f.indication.reference = ref.str();
                    if (pk->reading.outside) f.indication.reference += ", " + outsideText().toStdString();
                    if (!curveWarning().isEmpty())
                        f.indication.reference += " (recipe differs from the curve's: not comparable)";
                }
            }
        }
        if (const auto sz = sizing(*m); sz && sz->found) {
            // From the image sizing: the peak (upper tip) position and the sized extents.
            f.indication.x_mm = sz->x ? std::optional(sz->x->value) : std::nullopt;
            f.indication.depth_mm = sz->depth ? std::optional(sz->depth->value) : std::nullopt;
            f.indication.length_mm = sz->length ? std::optional(sz->length->value) : std::nullopt;
            f.indication.height_mm = sz->height ? std::optional(sz->height->value) : std::nullopt;
            if (sz->depth) z0 = sz->depth->value;
        }
        const auto rounded = roundIndication(f.indication, *m);
        z0 = f.indication.depth_mm.value_or(z0);
        std::ostringstream loc;
        loc.setf(std::ios::fixed);
        loc.precision(1);
        loc << "frame " << (f.indication.frame_index + 1);
        const QString fl = frameLabel(f.indication.frame_index);
        if (!fl.isEmpty()) loc << " (" << fl.toStdString() << ")";
        auto text = [&](const char* key, double v) {
            const auto it = rounded.find(key);
            if (it != rounded.end()) return it->second;
            std::ostringstream o;
            o.setf(std::ios::fixed);
            o.precision(1);
            o << v;
            return o.str();
        };
        loc << ", x = " << text("x", f.indication.x_mm.value_or(0)) << " mm, depth " << text("depth", z0) << " mm";
        f.indication.location = loc.str();
    }
    return f.indication;
}

std::string CaseController::addFindingFromMeasurement(const std::string& measurement_id) {
    core::Finding f;
    f.id = core::nextFindingId(doc_.findings);
    f.number = 1;
    for (const auto& x : doc_.findings) f.number = std::max(f.number, x.number + 1);
    f.indication = indicationFrom(measurement(measurement_id));
    if (const core::Measurement* m = measurement(measurement_id))
        if (const QString cw = coverageWarning(*m); !cw.isEmpty()) f.indication.description = cw.toStdString() + ".";
    auto after = doc_.findings;
    after.push_back(f);
    editFindings(after, tr("Add finding %1").arg(f.number));
    return f.id;
}

double CaseController::speedMps() const {
    if (!reader_) return 0;
    try {
        return recon::resolvedSpeed(reader_->header(), recipe_);
    } catch (const std::exception&) {
        return reader_->header().medium.speed_of_sound_m_s;
    }
}

QString CaseController::speedText() const {
    if (!reader_) return {};
    const double c = speedMps();
    const double recorded = reader_->header().medium.speed_of_sound_m_s;
    if (recipe_.number("delay_model.speed_of_sound_m_s") > 0)
        return tr("%1 m/s (recipe; the capture records %2 m/s)").arg(c, 0, 'f', 0).arg(recorded, 0, 'f', 0);
    return tr("%1 m/s (from the capture)").arg(c, 0, 'f', 0);
}

QString CaseController::tgcText() const {
    if (!reader_) return {};
    const std::string mode = recipe_.text("tgc.mode");
    if (mode == "off") return tr("off");
    if (mode == "curve") {
        QStringList pts;
        try {
            for (const auto& [z_m, db] : recon::parseTgcCurve(recipe_.text("tgc.curve")))
                pts << tr("%1 dB at %2 mm").arg(db, 0, 'g', 4).arg(z_m * 1e3, 0, 'g', 5);
        } catch (const std::exception&) {
            return tr("gain curve (cannot be read)");
        }
        return tr("gain curve, %1; linear between, held beyond").arg(pts.join(", "));
    }
    if (mode != "attenuation") return QString::fromStdString(mode);
    recon::TgcInputs in;
    try {
        in = recon::resolvedTgcInputs(reader_->header(), recipe_);
    } catch (const std::exception&) {
        return tr("attenuation (recipe cannot be read)");
    }
    const QString alpha_src = !in.attenuation_from_capture ? tr("recipe")
                              : in.attenuation_recorded    ? tr("from the capture")
                                                           : tr("none recorded in the capture: no gain");
    const QString f_src = in.frequency_from_capture ? tr("array centre frequency, from the capture") : tr("recipe");
    return tr("attenuation, round-trip gain 2·α·f·z with α = %1 dB/cm/MHz one way (%2), f = %3 MHz (%4)")
        .arg(in.attenuation_db_per_cm_mhz, 0, 'f', 2)
        .arg(alpha_src)
        .arg(in.frequency_mhz, 0, 'f', 2)
        .arg(f_src);
}

namespace {
bool sameNumbers(const core::Indication& a, const core::Indication& b) {
    auto same = [](const std::optional<double>& x, const std::optional<double>& y) {
        return x.has_value() == y.has_value() && (!x || std::abs(*x - *y) < 1e-9);
    };
    return same(a.x_mm, b.x_mm) && same(a.depth_mm, b.depth_mm) && same(a.length_mm, b.length_mm) && same(a.height_mm, b.height_mm);
}
}  // namespace

std::vector<std::string> CaseController::outOfDateFindings() const {
    std::vector<std::string> ids;
    for (const auto& f : doc_.findings) {
        if (f.indication.measurement_ids.empty() || f.indication.capture_index != doc_.active_capture) continue;
        const core::Measurement* m = measurement(f.indication.measurement_ids.front());
        // Only what can be recomputed now: a measurement on the frame shown (sizing reads the image).
        if (!m || m->frame_index != frame_ || !envelope_) continue;
        if (!f.indication.x_mm && !f.indication.depth_mm && !f.indication.length_mm && !f.indication.height_mm) continue;
        if (!sameNumbers(f.indication, indicationFrom(m))) ids.push_back(f.id);
    }
    return ids;
}

void CaseController::acceptMeasuredValues(const std::string& finding_id) {
    auto after = doc_.findings;
    for (auto& f : after)
        if (f.id == finding_id && !f.indication.measurement_ids.empty())
            if (const core::Measurement* m = measurement(f.indication.measurement_ids.front())) {
                const core::Indication fresh = indicationFrom(m);
                f.indication.x_mm = fresh.x_mm;
                f.indication.depth_mm = fresh.depth_mm;
                f.indication.length_mm = fresh.length_mm;
                f.indication.height_mm = fresh.height_mm;
                f.indication.peak_db = fresh.peak_db;
                f.indication.reference = fresh.reference;
                f.indication.location = fresh.location;
            }
    editFindings(after, tr("Update finding numbers from %1").arg(QString::fromStdString(finding_id)));
}

QString CaseController::viewText() const {
    if (!reader_) return {};
    const auto& h = reader_->header();
    const std::string mode = largeView();
    if (mode == "L-L" && !h.medium.wedge) return {};
    try {
        const recon::ViewMode v = recon::parseViewMode(mode);
        QString s = tr("%1 (%2)").arg(QString::fromStdString(v.name), QString::fromStdString(recon::describeViewMode(v)));
        const double cs = recon::viewShearSpeed(h, shearOf(recipe_));
        if (v.usesShear() && cs > 0)
            s += tr("; shear speed %1 m/s (%2)").arg(cs, 0, 'f', 0).arg(shearOf(recipe_) > 0 ? tr("recipe") : tr("from the capture"));
        if (h.medium.wedge)
            s += tr("; wedge %1 m/s, surface tilt %2°, image in the specimen frame")
                     .arg(h.medium.wedge->speed_of_sound_m_s, 0, 'f', 0)
                     .arg(h.medium.wedge->surface_tilt_rad * 180 / M_PI, 0, 'f', 1);
        if (v.usesBackWall() && h.medium.thickness_m) s += tr("; back wall at %1 mm").arg(*h.medium.thickness_m * 1e3, 0, 'f', 1);
        return s;
    } catch (const std::exception&) {
        return QString::fromStdString(mode);
    }
}

QString CaseController::techniqueText() const {
    if (!reader_) return {};
    const auto& h = reader_->header();
    QStringList lines;
    const bool fmc = h.transmit.kind == core::TransmitKind::SingleElement;
    lines << tr("Array: %1 elements, pitch %2 mm, %3 MHz, %4 % bandwidth")
                 .arg(h.array.elementCount())
                 .arg(h.array.pitch_m() * 1e3, 0, 'f', 2)
                 .arg(h.array.centre_frequency_hz / 1e6, 0, 'f', 2)
                 .arg(h.array.fractional_bandwidth * 100, 0, 'f', 0);
    lines << tr("Transmit: %1, %2 transmits%3; sampling %4 MHz")
                 .arg(QString::fromUtf8(core::transmitLabel(h.transmit.kind)))
                 .arg(h.transmits())
                 .arg(fmc ? tr(" (total focusing)") : QString())
                 .arg(h.receive.sampling_frequency_hz / 1e6, 0, 'f', 1);
    {
        const auto [medium, rel] = speedUncertainty();
        lines << tr("Speed of sound: %1 (standard uncertainty %2 %, %3)")
                     .arg(speedText())
                     .arg(rel * 100, 0, 'g', 2)
                     .arg(QString::fromStdString(medium));
    }
    if (const QString v = viewText(); !v.isEmpty()) lines << tr("View: %1").arg(v);
    if (const double d = recipe_.number("delay_model.fixed_delay_us"); d != 0)
        lines << tr("Fixed delay removed from every trace: %1 µs (recipe, delay_model.fixed_delay_us)").arg(d, 0, 'g', 6);
    if (envelope_ && envelope_->nx() > 1 && envelope_->nz() > 1)
        lines << tr("Grid: step %1 mm, x %2 to %3 mm, depth %4 to %5 mm; amplitude fidelity %6 dB")
                     .arg((envelope_->x_m[1] - envelope_->x_m[0]) * 1e3, 0, 'f', 3)
                     .arg(envelope_->x_m.front() * 1e3, 0, 'f', 1)
                     .arg(envelope_->x_m.back() * 1e3, 0, 'f', 1)
                     .arg(envelope_->z_m.front() * 1e3, 0, 'f', 1)
                     .arg(envelope_->z_m.back() * 1e3, 0, 'f', 1)
                     .arg(fidelity_db_, 0, 'f', 2);
    lines << tr("TCG: %1").arg(tgcText());
    for (const auto& l : calibrationLines()) lines << QString::fromStdString(l);
    if (doc_.weld) lines << QString::fromStdString(core::weldSummary(*doc_.weld));
    if (h.isSynthetic()) lines << tr("Data: synthetic demonstration data (simulated capture)");
    return lines.join('\n');
}

QString CaseController::techniqueLine() const {
    if (!reader_) return {};
    const auto& h = reader_->header();
    QString s = tr("%1 elements, %2 MHz, %3, %4 transmits, speed of sound %5 m/s")
                    .arg(h.array.elementCount())
                    .arg(h.array.centre_frequency_hz / 1e6, 0, 'f', 1)
                    .arg(QString::fromUtf8(core::transmitLabel(h.transmit.kind)))
                    .arg(h.transmits())
                    .arg(speedMps(), 0, 'f', 0);
    if (!viewText().isEmpty()) {
        s += tr(", view %1").arg(QString::fromStdString(largeView()));
        const double cs = recon::viewShearSpeed(h, shearOf(recipe_));
        if (cs > 0 && recon::parseViewMode(largeView()).usesShear()) s += tr(", shear %1 m/s").arg(cs, 0, 'f', 0);
        if (h.medium.wedge) s += tr(", wedge %1° at %2 m/s").arg(std::abs(h.medium.wedge->surface_tilt_rad) * 180 / M_PI, 0, 'f', 1)
                                     .arg(h.medium.wedge->speed_of_sound_m_s, 0, 'f', 0);
    }
    if (envelope_ && envelope_->nx() > 1)
        s += tr(", pixel %1 mm, amplitude fidelity %2 dB").arg((envelope_->x_m[1] - envelope_->x_m[0]) * 1e3, 0, 'f', 3).arg(fidelity_db_, 0, 'f', 1);
    s += tr(", dynamic range %1 dB").arg(dynamicRangeDb(), 0, 'f', 0);
    return s;
}

}  // namespace umbra::ui
