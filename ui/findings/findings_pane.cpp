// SPDX-License-Identifier: MIT
#include "ui/findings/findings_pane.h"

#include <QComboBox>
#include <QDoubleValidator>
#include <QFormLayout>
#include <QGroupBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QLineEdit>
#include <QListWidget>
#include <QLocale>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QRegularExpression>
#include <QScrollArea>
#include <QSpinBox>
#include <QVBoxLayout>

#include <algorithm>
#include <cmath>

namespace umbra::ui {
namespace {

QString q(const std::string& s) { return QString::fromStdString(s); }

void setTextIfDifferent(QLineEdit* e, const QString& t) {
    if (e->text() != t) e->setText(t);
}
void setTextIfDifferent(QPlainTextEdit* e, const QString& t) {
    if (e->toPlainText() != t) e->setPlainText(t);
}

std::optional<double> parseNumber(const QString& text, bool* ok) {
    const QString t = text.trimmed();
    *ok = true;
    if (t.isEmpty()) return std::nullopt;
    const double v = QLocale::c().toDouble(t, ok);
    if (!*ok || !std::isfinite(v)) {
        *ok = false;
        return std::nullopt;
    }
    return v;
}

// Shows a stored number without disturbing what the user typed when it already means the same.
void showNumber(QLineEdit* e, const std::optional<double>& v) {
    bool ok = false;
    const auto shown = parseNumber(e->text(), &ok);
    if (ok && shown == v) return;
    e->setText(v ? QLocale::c().toString(*v, 'g', 12) : QString());
}

double round2(double v) { return std::round(v * 100.0) / 100.0; }

QLineEdit* numberEdit(const QString& name, const QString& placeholder) {
    auto* e = new QLineEdit;
    e->setObjectName(name);
    auto* v = new QDoubleValidator(e);
    v->setLocale(QLocale::c());
    v->setNotation(QDoubleValidator::StandardNotation);
    e->setValidator(v);
    e->setPlaceholderText(placeholder);
    return e;
}

std::vector<std::string> splitIds(const QString& text) {
    std::vector<std::string> ids;
    for (const QString& part : text.split(QRegularExpression(QStringLiteral("[,;\\s]+")), Qt::SkipEmptyParts))
        ids.push_back(part.toStdString());
    return ids;
}

QString joinIds(const std::vector<std::string>& ids) {
    QStringList l;
    for (const auto& id : ids) l << q(id);
    return l.join(QStringLiteral(", "));
}

QLabel* quietLabel(const QString& name) {
    auto* l = new QLabel;
    l->setObjectName(name);
    l->setWordWrap(true);
    l->setStyleSheet(QStringLiteral("color: palette(mid); font-size: small;"));
    return l;
}

/// A finding level that can be locked: a titled box holding a line saying why it is locked and
/// the fields, laid out as a form.
struct LevelBox {
    QGroupBox* box;
    QLabel* lock;
    QWidget* fields;
    QFormLayout* form;
};

LevelBox makeLevelBox(const QString& title, const QString& name) {
    LevelBox b;
    b.box = new QGroupBox(title);
    b.box->setObjectName(name + QStringLiteral("Group"));
    auto* layout = new QVBoxLayout(b.box);
    b.lock = quietLabel(name + QStringLiteral("Lock"));
    layout->addWidget(b.lock);
    b.fields = new QWidget;
    b.fields->setObjectName(name + QStringLiteral("Fields"));
    b.form = new QFormLayout(b.fields);
    b.form->setContentsMargins(0, 0, 0, 0);
    b.form->setRowWrapPolicy(QFormLayout::WrapLongRows);  // narrow dock: label above its field
    layout->addWidget(b.fields);
    return b;
}

}  // namespace

QString FindingsPane::cautionText() {
    return tr("Umbra helps you look; it does not decide. Acceptance and diagnosis are decided by "
              "the written procedure, the applicable code and qualified, licensed people.");
}

FindingsPane::FindingsPane(QWidget* parent) : QWidget(parent) {
    buildUi();
    refreshList();
    showSelected();
}

void FindingsPane::buildUi() {
    auto* outer = new QVBoxLayout(this);
    outer->setContentsMargins(4, 4, 4, 4);

    caution_ = new QLabel(cautionText());
    caution_->setObjectName(QStringLiteral("caution"));
    caution_->setWordWrap(true);
    caution_->setFrameShape(QFrame::StyledPanel);
    caution_->setMargin(4);
    outer->addWidget(caution_);  // outside the scroll area: always visible

    auto* scroll = new QScrollArea;
    scroll->setWidgetResizable(true);
    scroll->setFrameShape(QFrame::NoFrame);
    scroll->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);  // the pane wraps; it never scrolls sideways
    auto* content = new QWidget;
    auto* v = new QVBoxLayout(content);
    v->setContentsMargins(0, 0, 0, 0);
    scroll->setWidget(content);
    outer->addWidget(scroll, 1);

    // Case background and technique.
    auto* case_box = new QGroupBox(tr("Case"));
    auto* cf = new QVBoxLayout(case_box);
    cf->addWidget(new QLabel(tr("Why the examination was ordered")));
    background_ = new QPlainTextEdit;
    background_->setObjectName(QStringLiteral("background"));
    background_->setMaximumHeight(70);
    background_->setPlaceholderText(tr("Why the examination was ordered: the request, the procedure, what to look for."));
    cf->addWidget(background_);
    cf->addWidget(new QLabel(tr("Technique (from the capture and the recipe)")));
    technique_ = new QPlainTextEdit;
    technique_->setObjectName(QStringLiteral("technique"));
    technique_->setReadOnly(true);
    technique_->setMaximumHeight(150);
    cf->addWidget(technique_);
    v->addWidget(case_box);

    // Findings list.
    auto* list_box = new QGroupBox(tr("Findings"));
    auto* lv = new QVBoxLayout(list_box);
    list_ = new QListWidget;
    list_->setObjectName(QStringLiteral("findingList"));
    list_->setMaximumHeight(110);
    list_->setWordWrap(true);
    list_->setTextElideMode(Qt::ElideNone);
    list_->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    lv->addWidget(list_);
    auto* lb = new QHBoxLayout;
    add_ = new QPushButton(tr("Add finding"));
    add_->setObjectName(QStringLiteral("addFinding"));
    remove_ = new QPushButton(tr("Remove finding"));
    remove_->setObjectName(QStringLiteral("removeFinding"));
    lb->addWidget(add_);
    lb->addWidget(remove_);
    lb->addStretch(1);
    lv->addLayout(lb);
    v->addWidget(list_box);

    no_selection_ = new QLabel(tr("Add a finding, or select one to describe it."));
    no_selection_->setObjectName(QStringLiteral("noSelection"));
    v->addWidget(no_selection_);

    // The selected finding: three separate boxes.
    editor_ = new QWidget;
    editor_->setObjectName(QStringLiteral("findingEditor"));
    auto* ev = new QVBoxLayout(editor_);
    ev->setContentsMargins(0, 0, 0, 0);

    indication_box_ = new QGroupBox(tr("1  Indication: what is seen"));
    indication_box_->setObjectName(QStringLiteral("indicationGroup"));
    auto* inf = new QFormLayout(indication_box_);
    inf->setRowWrapPolicy(QFormLayout::WrapLongRows);  // narrow dock: label above its field
    location_ = new QLineEdit;
    location_->setObjectName(QStringLiteral("location"));
    location_->setPlaceholderText(tr("e.g. frame 11 (y = 10.0 mm), x = 2.4 mm"));
    inf->addRow(tr("Location"), location_);
    auto* where = new QHBoxLayout;
    capture_ = new QSpinBox;
    capture_->setObjectName(QStringLiteral("capture"));
    capture_->setRange(1, 9999);
    frame_ = new QSpinBox;
    frame_->setObjectName(QStringLiteral("frame"));
    frame_->setRange(1, 999999);
    where->addWidget(new QLabel(tr("capture")));
    where->addWidget(capture_);
    where->addWidget(new QLabel(tr("frame")));
    where->addWidget(frame_);
    where->addStretch(1);
    inf->addRow(tr("On"), where);
    x_ = numberEdit(QStringLiteral("x"), tr("not measured"));
    depth_ = numberEdit(QStringLiteral("depth"), tr("not measured"));
    length_ = numberEdit(QStringLiteral("length"), tr("not measured"));
    height_ = numberEdit(QStringLiteral("height"), tr("not measured"));
    peak_ = numberEdit(QStringLiteral("peakDb"), tr("not measured"));
    inf->addRow(tr("x (mm)"), x_);
    inf->addRow(tr("Depth below surface (mm)"), depth_);
    inf->addRow(tr("Length (mm)"), length_);
    inf->addRow(tr("Height (mm)"), height_);
    inf->addRow(tr("Peak amplitude (dB)"), peak_);
    reference_ = new QLineEdit;
    reference_->setObjectName(QStringLiteral("reference"));
    reference_->setPlaceholderText(tr("what 0 dB is, e.g. Ø2.5 mm SDH at 10 mm"));
    inf->addRow(tr("dB relative to"), reference_);
    links_ = new QLineEdit;
    links_->setObjectName(QStringLiteral("links"));
    links_->setPlaceholderText(tr("measurement ids, e.g. M1, M3"));
    inf->addRow(tr("Linked measurements"), links_);
    link_note_ = quietLabel(QStringLiteral("linkNote"));
    link_note_->hide();
    inf->addRow(QString(), link_note_);
    description_ = new QPlainTextEdit;
    description_->setObjectName(QStringLiteral("description"));
    description_->setPlaceholderText(tr("Describe exactly what is seen: shape, size, position, amplitude."));
    description_->setMaximumHeight(80);
    inf->addRow(tr("Description"), description_);
    hedge_note_ = quietLabel(QStringLiteral("hedgeNote"));
    hedge_note_->hide();
    inf->addRow(QString(), hedge_note_);
    ev->addWidget(indication_box_);

    const LevelBox ib = makeLevelBox(tr("2  Interpretation: what it is"), QStringLiteral("interpretation"));
    interpretation_box_ = ib.box;
    interpretation_lock_ = ib.lock;
    interpretation_fields_ = ib.fields;
    interpretation_ = new QComboBox;
    interpretation_->setObjectName(QStringLiteral("interpretationClass"));
    for (auto i : {core::Interpretation::Unset, core::Interpretation::False, core::Interpretation::NonRelevant,
                   core::Interpretation::Relevant})
        interpretation_->addItem(q(core::interpretationLabel(i)), static_cast<int>(i));
    reason_ = new QLineEdit;
    reason_->setObjectName(QStringLiteral("interpretationReason"));
    reason_->setPlaceholderText(tr("why: what shows it"));
    ib.form->addRow(tr("Class"), interpretation_);
    ib.form->addRow(tr("Reason"), reason_);
    ev->addWidget(interpretation_box_);

    const LevelBox eb = makeLevelBox(tr("3  Evaluation: against the criterion"), QStringLiteral("evaluation"));
    evaluation_box_ = eb.box;
    evaluation_lock_ = eb.lock;
    evaluation_fields_ = eb.fields;
    evaluation_ = new QComboBox;
    evaluation_->setObjectName(QStringLiteral("evaluationOutcome"));
    for (auto e : {core::Evaluation::Unset, core::Evaluation::Acceptable, core::Evaluation::Rejectable,
                   core::Evaluation::ReferForReview})
        evaluation_->addItem(q(core::evaluationLabel(e)), static_cast<int>(e));
    criterion_ = new QLineEdit;
    criterion_->setObjectName(QStringLiteral("criterion"));
    criterion_->setPlaceholderText(tr("the acceptance criterion used (procedure, clause, limit)"));
    eb.form->addRow(tr("Outcome"), evaluation_);
    eb.form->addRow(tr("Criterion"), criterion_);
    ev->addWidget(evaluation_box_);
    v->addWidget(editor_);

    // Pertinent negatives and prior comparison.
    auto* neg_box = new QGroupBox(tr("Pertinent negatives: looked for, not present"));
    auto* nv = new QVBoxLayout(neg_box);
    negatives_ = new QListWidget;
    negatives_->setObjectName(QStringLiteral("negatives"));
    negatives_->setMaximumHeight(90);
    negatives_->setEditTriggers(QAbstractItemView::DoubleClicked | QAbstractItemView::EditKeyPressed |
                                QAbstractItemView::SelectedClicked);
    nv->addWidget(negatives_);
    auto* nb = new QHBoxLayout;
    add_negative_ = new QPushButton(tr("Add"));
    add_negative_->setObjectName(QStringLiteral("addNegative"));
    remove_negative_ = new QPushButton(tr("Remove"));
    remove_negative_->setObjectName(QStringLiteral("removeNegative"));
    nb->addWidget(add_negative_);
    nb->addWidget(remove_negative_);
    nb->addStretch(1);
    nv->addLayout(nb);
    v->addWidget(neg_box);

    auto* prior_box = new QGroupBox(tr("Comparison with prior examination"));
    auto* pv = new QVBoxLayout(prior_box);
    prior_ = new QPlainTextEdit;
    prior_->setObjectName(QStringLiteral("priorComparison"));
    prior_->setMaximumHeight(70);
    prior_->setPlaceholderText(tr("none available, or what changed since"));
    pv->addWidget(prior_);
    v->addWidget(prior_box);
    v->addStretch(1);

    // ---- wiring
    connect(add_, &QPushButton::clicked, this, &FindingsPane::addFinding);
    connect(remove_, &QPushButton::clicked, this, &FindingsPane::removeSelectedFinding);
    connect(list_, &QListWidget::currentItemChanged, this, [this](QListWidgetItem* item, QListWidgetItem*) {
        if (updating_) return;
        selected_ = item ? item->data(Qt::UserRole).toString() : QString();
        showSelected();
        emit findingSelected(selected_);
    });

    connect(background_, &QPlainTextEdit::textChanged, this, [this] {
        if (updating_) return;
        doc_.background = background_->toPlainText().toStdString();
        caseTextChanged();
    });
    connect(prior_, &QPlainTextEdit::textChanged, this, [this] {
        if (updating_) return;
        doc_.prior_comparison = prior_->toPlainText().toStdString();
        caseTextChanged();
    });
    connect(negatives_, &QListWidget::itemChanged, this, [this](QListWidgetItem*) {
        if (updating_) return;
        std::vector<std::string> ns;
        for (int i = 0; i < negatives_->count(); ++i) {
            const QString t = negatives_->item(i)->text().trimmed();
            if (!t.isEmpty()) ns.push_back(t.toStdString());
        }
        if (ns == doc_.pertinent_negatives) return;
        doc_.pertinent_negatives = ns;
        caseTextChanged();
    });
    connect(add_negative_, &QPushButton::clicked, this, [this] {
        auto* item = new QListWidgetItem;
        item->setFlags(item->flags() | Qt::ItemIsEditable);
        ++updating_;
        negatives_->addItem(item);
        --updating_;
        negatives_->setCurrentItem(item);
        negatives_->editItem(item);
    });
    connect(remove_negative_, &QPushButton::clicked, this, [this] {
        const int row = negatives_->currentRow();
        if (row < 0) return;
        ++updating_;
        delete negatives_->takeItem(row);
        --updating_;
        std::vector<std::string> ns;
        for (int i = 0; i < negatives_->count(); ++i) {
            const QString t = negatives_->item(i)->text().trimmed();
            if (!t.isEmpty()) ns.push_back(t.toStdString());
        }
        if (ns == doc_.pertinent_negatives) return;
        doc_.pertinent_negatives = ns;
        caseTextChanged();
    });

    // Indication fields.
    connect(location_, &QLineEdit::textEdited, this, [this](const QString& t) {
        if (auto* f = current()) {
            f->indication.location = t.toStdString();
            findingChanged(tr("Edit location"));
        }
    });
    connect(capture_, &QSpinBox::valueChanged, this, [this](int v) {
        if (updating_) return;
        if (auto* f = current()) {
            f->indication.capture_index = static_cast<size_t>(v - 1);
            findingChanged(tr("Edit capture"));
        }
    });
    connect(frame_, &QSpinBox::valueChanged, this, [this](int v) {
        if (updating_) return;
        if (auto* f = current()) {
            f->indication.frame_index = static_cast<size_t>(v - 1);
            findingChanged(tr("Edit frame"));
        }
    });
    onNumberEdited(x_, &core::Indication::x_mm, tr("Edit x"));
    onNumberEdited(depth_, &core::Indication::depth_mm, tr("Edit depth"));
    onNumberEdited(length_, &core::Indication::length_mm, tr("Edit length"));
    onNumberEdited(height_, &core::Indication::height_mm, tr("Edit height"));
    onNumberEdited(peak_, &core::Indication::peak_db, tr("Edit peak amplitude"));
    connect(reference_, &QLineEdit::textEdited, this, [this](const QString& t) {
        if (auto* f = current()) {
            f->indication.reference = t.toStdString();
            findingChanged(tr("Edit reference"));
        }
    });
    connect(links_, &QLineEdit::textEdited, this, [this](const QString& t) {
        if (auto* f = current()) {
            const auto ids = splitIds(t);
            updateLinkNote();
            if (ids == f->indication.measurement_ids) return;
            f->indication.measurement_ids = ids;
            findingChanged(tr("Edit linked measurements"));
        }
    });
    connect(description_, &QPlainTextEdit::textChanged, this, [this] {
        if (updating_) return;
        if (auto* f = current()) {
            const std::string t = description_->toPlainText().toStdString();
            if (t == f->indication.description) return;
            f->indication.description = t;
            updateHedgeNote();
            findingChanged(tr("Edit description"));
        }
    });

    // Interpretation and evaluation.
    connect(interpretation_, &QComboBox::currentIndexChanged, this, [this](int) {
        if (updating_) return;
        if (auto* f = current()) {
            f->interpretation = static_cast<core::Interpretation>(interpretation_->currentData().toInt());
            findingChanged(tr("Interpret finding"));
        }
    });
    connect(reason_, &QLineEdit::textEdited, this, [this](const QString& t) {
        if (auto* f = current()) {
            f->interpretation_reason = t.toStdString();
            updateHedgeNote();
            findingChanged(tr("Edit interpretation reason"));
        }
    });
    connect(evaluation_, &QComboBox::currentIndexChanged, this, [this](int) {
        if (updating_) return;
        if (auto* f = current()) {
            f->evaluation = static_cast<core::Evaluation>(evaluation_->currentData().toInt());
            findingChanged(tr("Evaluate finding"));
        }
    });
    connect(criterion_, &QLineEdit::textEdited, this, [this](const QString& t) {
        if (auto* f = current()) {
            f->criterion = t.toStdString();
            findingChanged(tr("Edit criterion"));
        }
    });
}

void FindingsPane::onNumberEdited(QLineEdit* edit, std::optional<double> core::Indication::*field,
                                  const QString& what) {
    connect(edit, &QLineEdit::textEdited, this, [this, edit, field, what](const QString& t) {
        bool ok = false;
        const auto v = parseNumber(t, &ok);
        if (!ok) return;  // half-typed ("-", "1e"): wait for more
        if (auto* f = current()) {
            if (f->indication.*field == v) return;
            f->indication.*field = v;
            findingChanged(what);
        }
        (void)edit;
    });
}

core::Finding* FindingsPane::current() {
    if (selected_.isEmpty()) return nullptr;
    for (auto& f : doc_.findings)
        if (q(f.id) == selected_) return &f;
    return nullptr;
}

QString FindingsPane::selectedFindingId() const { return selected_; }

void FindingsPane::selectFinding(const QString& id) {
    for (int i = 0; i < list_->count(); ++i)
        if (list_->item(i)->data(Qt::UserRole).toString() == id) {
            list_->setCurrentRow(i);  // emits through currentItemChanged
            return;
        }
}

void FindingsPane::setDocument(const core::CaseDocument& doc) {
    doc_ = doc;
    ++updating_;
    setTextIfDifferent(background_, q(doc_.background));
    setTextIfDifferent(technique_, q(doc_.technique));
    setTextIfDifferent(prior_, q(doc_.prior_comparison));
    --updating_;
    refreshNegatives();
    refreshList();
    showSelected();
}

void FindingsPane::setFindings(const std::vector<core::Finding>& findings) {
    if (findings == doc_.findings) return;
    doc_.findings = findings;
    refreshList();
    showSelected();
}

void FindingsPane::setTechnique(const QString& text) {
    doc_.technique = text.toStdString();
    ++updating_;
    setTextIfDifferent(technique_, text);
    --updating_;
}

void FindingsPane::setKnownMeasurements(const std::vector<std::string>& ids) {
    known_measurements_ = ids;
    known_set_ = true;
    updateLinkNote();
}

void FindingsPane::refreshNegatives() {
    std::vector<std::string> shown;
    for (int i = 0; i < negatives_->count(); ++i) {
        const QString t = negatives_->item(i)->text().trimmed();
        if (!t.isEmpty()) shown.push_back(t.toStdString());
    }
    if (shown == doc_.pertinent_negatives) return;
    ++updating_;
    negatives_->clear();
    for (const auto& n : doc_.pertinent_negatives) {
        auto* item = new QListWidgetItem(q(n));
        item->setFlags(item->flags() | Qt::ItemIsEditable);
        negatives_->addItem(item);
    }
    --updating_;
}

void FindingsPane::refreshList() {
    ++updating_;
    const bool still_there = std::any_of(doc_.findings.begin(), doc_.findings.end(),
                                         [this](const core::Finding& f) { return q(f.id) == selected_; });
    if (!still_there) selected_.clear();
    // Rebuild only when the set of findings changed; otherwise just relabel the rows.
    bool same_ids = list_->count() == static_cast<int>(doc_.findings.size());
    for (int i = 0; same_ids && i < list_->count(); ++i)
        same_ids = list_->item(i)->data(Qt::UserRole).toString() == q(doc_.findings[size_t(i)].id);
    if (!same_ids) {
        list_->clear();
        for (const auto& f : doc_.findings) {
            auto* item = new QListWidgetItem;
            item->setData(Qt::UserRole, q(f.id));
            list_->addItem(item);
        }
    }
    for (int i = 0; i < list_->count(); ++i) {
        const auto& f = doc_.findings[size_t(i)];
        QString text = tr("#%1  %2").arg(f.number).arg(f.indication.location.empty()
                                                           ? tr("(no location yet)")
                                                           : q(f.indication.location));
        text += QStringLiteral(" — ") + q(core::interpretationLabel(f.interpretation));
        if (f.evaluationUnlocked() && f.evaluation != core::Evaluation::Unset)
            text += QStringLiteral(", ") + q(core::evaluationLabel(f.evaluation));
        if (list_->item(i)->text() != text) list_->item(i)->setText(text);
        if (q(f.id) == selected_ && list_->currentRow() != i) list_->setCurrentRow(i);
    }
    if (selected_.isEmpty()) list_->setCurrentRow(-1);
    --updating_;
    remove_->setEnabled(!selected_.isEmpty());
}

void FindingsPane::showSelected() {
    const core::Finding* f = current();
    editor_->setVisible(f != nullptr);
    no_selection_->setVisible(f == nullptr);
    remove_->setEnabled(f != nullptr);
    if (!f) return;
    ++updating_;
    const core::Indication& in = f->indication;
    setTextIfDifferent(location_, q(in.location));
    if (capture_->value() != int(in.capture_index) + 1) capture_->setValue(int(in.capture_index) + 1);
    if (frame_->value() != int(in.frame_index) + 1) frame_->setValue(int(in.frame_index) + 1);
    showNumber(x_, in.x_mm);
    showNumber(depth_, in.depth_mm);
    showNumber(length_, in.length_mm);
    showNumber(height_, in.height_mm);
    showNumber(peak_, in.peak_db);
    setTextIfDifferent(reference_, q(in.reference));
    if (splitIds(links_->text()) != in.measurement_ids) links_->setText(joinIds(in.measurement_ids));
    setTextIfDifferent(description_, q(in.description));
    const int ii = interpretation_->findData(static_cast<int>(f->interpretation));
    if (interpretation_->currentIndex() != ii) interpretation_->setCurrentIndex(ii);
    setTextIfDifferent(reason_, q(f->interpretation_reason));
    const int ei = evaluation_->findData(static_cast<int>(f->evaluation));
    if (evaluation_->currentIndex() != ei) evaluation_->setCurrentIndex(ei);
    setTextIfDifferent(criterion_, q(f->criterion));
    --updating_;
    updateLocks();
    updateHedgeNote();
    updateLinkNote();
}

void FindingsPane::updateLocks() {
    const core::Finding* f = current();
    if (!f) return;
    const bool i_open = f->interpretationUnlocked();
    interpretation_fields_->setEnabled(i_open);
    interpretation_lock_->setText(q(f->interpretationLockReason()));
    interpretation_lock_->setVisible(!i_open);
    const bool e_open = f->evaluationUnlocked();
    evaluation_fields_->setEnabled(e_open);
    evaluation_lock_->setText(q(f->evaluationLockReason()));
    evaluation_lock_->setVisible(!e_open);
}

void FindingsPane::updateHedgeNote() {
    const core::Finding* f = current();
    // Hedges weaken the description and the interpretation's reason alike (the reason may say
    // what the indication is "consistent with": that is its job).
    std::vector<std::string> words;
    if (f) {
        words = core::hedgingWords(f->indication.description);
        for (const auto& w : core::hedgingWordsInReason(f->interpretation_reason))
            if (std::find(words.begin(), words.end(), w) == words.end()) words.push_back(w);
    }
    const std::string note = core::hedgingNote(words);
    hedge_note_->setText(q(note));
    hedge_note_->setVisible(!note.empty());
}

void FindingsPane::updateLinkNote() {
    const core::Finding* f = current();
    QStringList unknown;
    if (f && known_set_)
        for (const auto& id : splitIds(links_->text()))
            if (std::find(known_measurements_.begin(), known_measurements_.end(), id) == known_measurements_.end())
                unknown << q(id);
    link_note_->setText(unknown.isEmpty() ? QString() : tr("No measurement called %1 in this case.").arg(unknown.join(", ")));
    link_note_->setVisible(!unknown.isEmpty());
}

void FindingsPane::findingChanged(const QString& what) {
    updateLocks();
    refreshList();
    emit findingsEdited(doc_.findings, what);
    emit edited(doc_);
}

void FindingsPane::caseTextChanged() {
    emit caseTextEdited(doc_);
    emit edited(doc_);
}

void FindingsPane::addFinding() {
    core::Finding f;
    f.id = core::nextFindingId(doc_.findings);
    f.number = 1;
    for (const auto& x : doc_.findings) f.number = std::max(f.number, x.number + 1);
    doc_.findings.push_back(f);
    selected_ = q(f.id);
    refreshList();
    showSelected();
    emit findingsEdited(doc_.findings, tr("Add finding %1").arg(f.number));
    emit edited(doc_);
    emit findingSelected(selected_);
}

void FindingsPane::addFindingFromMeasurement(const core::Measurement& m, double surface_z_mm,
                                             const QString& frame_label) {
    core::Finding f;
    f.id = core::nextFindingId(doc_.findings);
    f.number = 1;
    for (const auto& x : doc_.findings) f.number = std::max(f.number, x.number + 1);
    core::Indication& in = f.indication;
    in.capture_index = doc_.active_capture;
    in.frame_index = m.frame_index;
    in.measurement_ids = {m.id};
    if (m.points.size() == core::pointCount(m.kind) && !m.points.empty()) {
        double x0 = m.points[0].x_mm, x1 = x0, z0 = m.points[0].z_mm, z1 = z0;
        if (m.kind == core::MeasurementKind::Ellipse) {
            // Bounding box of the ellipse with semi-axis vectors u, v from the centre.
            const auto& c = m.points[0];
            const double ux = m.points[1].x_mm - c.x_mm, uz = m.points[1].z_mm - c.z_mm;
            const double vx = m.points[2].x_mm - c.x_mm, vz = m.points[2].z_mm - c.z_mm;
            const double hx = std::hypot(ux, vx), hz = std::hypot(uz, vz);
            x0 = c.x_mm - hx, x1 = c.x_mm + hx, z0 = c.z_mm - hz, z1 = c.z_mm + hz;
        } else {
            for (const auto& p : m.points) {
                x0 = std::min(x0, p.x_mm), x1 = std::max(x1, p.x_mm);
                z0 = std::min(z0, p.z_mm), z1 = std::max(z1, p.z_mm);
            }
        }
        in.x_mm = round2((x0 + x1) / 2);
        in.depth_mm = round2(z0 - surface_z_mm);
        if (m.kind != core::MeasurementKind::DepthMarker) {
            in.length_mm = round2(x1 - x0);
            in.height_mm = round2(z1 - z0);
        }
        QString loc = tr("frame %1").arg(m.frame_index + 1);
        if (!frame_label.isEmpty()) loc += QStringLiteral(" (") + frame_label + QStringLiteral(")");
        loc += tr(", x = %1 mm").arg(*in.x_mm, 0, 'f', 2);
        in.location = loc.toStdString();
    }
    doc_.findings.push_back(f);
    selected_ = q(f.id);
    refreshList();
    showSelected();
    emit findingsEdited(doc_.findings, tr("Add finding %1 from %2").arg(f.number).arg(q(m.id)));
    emit edited(doc_);
    emit findingSelected(selected_);
}

void FindingsPane::removeSelectedFinding() {
    auto it = std::find_if(doc_.findings.begin(), doc_.findings.end(),
                           [this](const core::Finding& f) { return q(f.id) == selected_; });
    if (it == doc_.findings.end()) return;
    const int number = it->number;
    doc_.findings.erase(it);
    selected_.clear();
    refreshList();
    showSelected();
    emit findingsEdited(doc_.findings, tr("Remove finding %1").arg(number));
    emit edited(doc_);
    emit findingSelected(selected_);
}

}  // namespace umbra::ui
