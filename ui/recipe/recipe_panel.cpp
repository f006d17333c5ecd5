// SPDX-License-Identifier: MIT
#include "ui/recipe/recipe_panel.h"

#include <QCheckBox>
#include <QCoreApplication>
#include <QComboBox>
#include <QDoubleSpinBox>
#include <QFormLayout>
#include <QGroupBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QLineEdit>
#include <QLocale>
#include <QPushButton>
#include <QScrollArea>
#include <QSpinBox>
#include <QVBoxLayout>

#include <QValidator>

#include <algorithm>
#include <map>
#include <utility>
#include <cmath>

#include "core/error.h"
#include "ui/controller/case_controller.h"
#include "ui/recipe/gain_curve_editor.h"

namespace umbra::ui {

namespace {
/// Spin-box step for a range: about 1/200 of it, rounded to 1, 2 or 5 x 10^n.
double niceStepFor(double span) {
    if (!(span > 0)) return 0.1;
    const double raw = span / 200.0;
    const double mag = std::pow(10.0, std::floor(std::log10(raw)));
    const double n = raw / mag;
    return (n < 2 ? 1 : n < 5 ? 2 : 5) * mag;
}
int decimalsFor(double step) {
    if (!(step > 0)) return 3;
    return std::clamp(static_cast<int>(std::ceil(-std::log10(step) - 1e-9)), 0, 6);
}
/// Double spin box for a declared real parameter. It keeps every value the parameter can take
/// to 6 decimals and shows as many decimals as the value needs (at least those of its step), so
/// a typed 0.013 mm stays 0.013 mm instead of being rounded to the step's decimals. It shows
/// `zero` (e.g. "from capture") instead of 0 when 0 is a mode; the unit is part of its text.
class RealSpinBox : public QDoubleSpinBox {
public:
    RealSpinBox(QString zero, QString unit, int min_decimals)
        : zero_(std::move(zero)), unit_(std::move(unit)), min_decimals_(min_decimals) {
        setDecimals(kMaxDecimals);
    }
    QString textFromValue(double v) const override {
        if (v == 0.0 && !zero_.isEmpty()) return zero_;
        QLocale loc = locale();
        loc.setNumberOptions(loc.numberOptions() | QLocale::OmitGroupSeparator);
        QString t = loc.toString(v, 'f', kMaxDecimals);
        const QChar point = loc.decimalPoint().front();
        const int dot = t.indexOf(point);
        if (dot >= 0) {
            int keep = t.size();
            while (keep > dot + 1 + min_decimals_ && t[keep - 1] == '0') --keep;
            if (keep == dot + 1) --keep;  // no decimals left: drop the point
            t.truncate(keep);
        }
        return t + unit_;
    }
    /// Re-renders the text with this class's textFromValue (Qt calls it only on changes).
    void refreshText() { setSuffix(QString()); }
    double valueFromText(const QString& text) const override {
        const QString t = stripped(text);
        if (!zero_.isEmpty() && (t.isEmpty() || zero_.startsWith(t, Qt::CaseInsensitive))) return 0.0;
        return QDoubleSpinBox::valueFromText(t);
    }
    QValidator::State validate(QString& input, int& pos) const override {
        if (!zero_.isEmpty() && !input.trimmed().isEmpty() && zero_.startsWith(input.trimmed(), Qt::CaseInsensitive))
            return input.trimmed().compare(zero_, Qt::CaseInsensitive) == 0 ? QValidator::Acceptable : QValidator::Intermediate;
        QString t = stripped(input);
        return QDoubleSpinBox::validate(t, pos);
    }

private:
    static constexpr int kMaxDecimals = 6;
    QString stripped(const QString& text) const {
        QString t = text.trimmed();
        const QString u = unit_.trimmed();
        if (!u.isEmpty() && t.endsWith(u)) t.chop(u.size());
        return t.trimmed();
    }
    QString zero_, unit_;
    int min_decimals_;
};

/// What a user reads for a choice value (the recipe stores the value itself).
QString choiceLabel(const std::string& value) {
    static const std::map<std::string, const char*> labels = {
        {"grayscale", QT_TRANSLATE_NOOP("RecipePanel", "Grayscale")},
        {"lab_gray", QT_TRANSLATE_NOOP("RecipePanel", "Gray, even lightness steps")},
        {"lab_heat", QT_TRANSLATE_NOOP("RecipePanel", "Heat: violet, red, orange, yellow")},
        {"lab_ice", QT_TRANSLATE_NOOP("RecipePanel", "Ice: blue to cyan")},
        {"off", QT_TRANSLATE_NOOP("RecipePanel", "Off")},
        {"attenuation", QT_TRANSLATE_NOOP("RecipePanel", "Attenuation (2·α·f·z)")},
        {"curve", QT_TRANSLATE_NOOP("RecipePanel", "Gain curve")},
    };
    const auto it = labels.find(value);
    if (it != labels.end()) return QCoreApplication::translate("RecipePanel", it->second);
    QString t = QString::fromStdString(value).replace('_', ' ');
    if (!t.isEmpty()) t[0] = t[0].toUpper();
    return t;
}

QString tooltipFor(const core::StageSpec& st, const core::ParamSpec& p) {
    QString t = QStringLiteral("<b>%1</b> <code>%2.%3</code><br>%4")
                    .arg(QString::fromStdString(p.label).toHtmlEscaped(), QString::fromStdString(st.name),
                         QString::fromStdString(p.name), QString::fromStdString(p.description).toHtmlEscaped());
    if (!p.unit.empty()) t += QStringLiteral("<br>Unit: %1").arg(QString::fromStdString(p.unit).toHtmlEscaped());
    if (p.kind == core::ParamKind::Real || p.kind == core::ParamKind::Integer)
        t += QStringLiteral("<br>Range: %1 to %2").arg(p.min).arg(p.max);
    if (!p.zero_means.empty())
        t += QStringLiteral("<br>0 = %1").arg(QString::fromStdString(p.zero_means).toHtmlEscaped());
    t += p.display_only ? QStringLiteral("<br><i>Display setting: re-maps the stored image, no re-beamforming.</i>")
                        : QStringLiteral("<br><i>Reconstruction setting: the frame is beamformed again.</i>");
    return t;
}
}  // namespace

RecipePanel::RecipePanel(CaseController* controller, QWidget* parent) : QWidget(parent), ctl_(controller) {
    build();
    connect(ctl_, &CaseController::recipeChanged, this, &RecipePanel::syncFromRecipe);
}

void RecipePanel::build() {
    auto* outer = new QVBoxLayout(this);
    outer->setContentsMargins(0, 0, 0, 0);
    auto* buttons = new QHBoxLayout;
    buttons->setContentsMargins(8, 6, 8, 2);
    auto* load = new QPushButton(tr("Load…"));
    auto* save = new QPushButton(tr("Save…"));
    load->setToolTip(tr("Load a recipe (JSON) over the current one"));
    save->setToolTip(tr("Save the current recipe as JSON"));
    connect(load, &QPushButton::clicked, this, &RecipePanel::loadRecipeRequested);
    connect(save, &QPushButton::clicked, this, &RecipePanel::saveRecipeRequested);
    buttons->addWidget(new QLabel(tr("Recipe")));
    buttons->addStretch();
    buttons->addWidget(load);
    buttons->addWidget(save);
    outer->addLayout(buttons);
    note_ = new QLabel;
    note_->setWordWrap(true);
    note_->setStyleSheet("color: #b3261e; padding: 2px 8px;");
    note_->hide();
    outer->addWidget(note_);

    auto* scroll = new QScrollArea;
    scroll->setWidgetResizable(true);
    scroll->setFrameShape(QFrame::NoFrame);
    scroll->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    auto* inner = new QWidget;
    auto* v = new QVBoxLayout(inner);
    v->setContentsMargins(6, 2, 6, 6);
    v->setSpacing(6);
    const core::Recipe& r = ctl_->recipe();
    for (const auto& st : r.stages()) {
        if (st.params.empty()) continue;
        auto* box = new QGroupBox(QString::fromStdString(st.label.empty() ? st.name : st.label));
        box->setToolTip(QString::fromStdString(st.description));
        auto* form = new QFormLayout(box);
        form->setFieldGrowthPolicy(QFormLayout::AllNonFixedFieldsGrow);
        form->setContentsMargins(8, 6, 8, 6);
        for (const auto& p : st.params) {
            const std::string key = st.name + "." + p.name;
            QWidget* w = nullptr;
            const QString unit = p.unit.empty() ? QString() : " " + QString::fromStdString(p.unit);
            switch (p.kind) {
                case core::ParamKind::Real: {
                    const double step = p.step > 0 ? p.step : niceStepFor(p.max - p.min);
                    auto* s = new RealSpinBox(QString::fromStdString(p.zero_means), unit, decimalsFor(step));
                    s->setRange(p.min, p.max);
                    s->setSingleStep(step);
                    s->refreshText();
                    s->setKeyboardTracking(false);
                    connect(s, &QDoubleSpinBox::valueChanged, this, [this, key, s](double x) {
                        commit(key, QString::number(x, 'g', 12).toStdString());
                        (void)s;
                    });
                    w = s;
                    break;
                }
                case core::ParamKind::Integer: {
                    auto* s = new QSpinBox;
                    s->setRange(static_cast<int>(p.min), static_cast<int>(p.max));
                    s->setSingleStep(p.step > 0 ? static_cast<int>(p.step) : 1);
                    s->setSuffix(unit);
                    if (!p.zero_means.empty() && p.min == 0) s->setSpecialValueText(QString::fromStdString(p.zero_means));
                    s->setKeyboardTracking(false);
                    connect(s, &QSpinBox::valueChanged, this, [this, key](int x) { commit(key, std::to_string(x)); });
                    w = s;
                    break;
                }
                case core::ParamKind::Choice: {
                    auto* c = new QComboBox;
                    for (const auto& ch : p.choices) c->addItem(choiceLabel(ch), QString::fromStdString(ch));
                    connect(c, &QComboBox::currentIndexChanged, this, [this, key, c](int i) {
                        if (i >= 0) commit(key, c->itemData(i).toString().toStdString());
                    });
                    w = c;
                    break;
                }
                case core::ParamKind::Flag: {
                    auto* c = new QCheckBox;
                    connect(c, &QCheckBox::toggled, this, [this, key](bool on) { commit(key, on ? "1" : "0"); });
                    w = c;
                    break;
                }
                case core::ParamKind::Text: {
                    if (p.unit == "mm:dB") {  // a gain curve: a table of points, not the text form
                        auto* g = new GainCurveEditor;
                        connect(g, &GainCurveEditor::curveEdited, this, [this, key](const QString& t) { commit(key, t.toStdString()); });
                        w = g;
                        break;
                    }
                    auto* e = new QLineEdit;
                    e->setPlaceholderText(tr("(default)"));
                    connect(e, &QLineEdit::editingFinished, this, [this, key, e] { commit(key, e->text().toStdString()); });
                    w = e;
                    break;
                }
            }
            const QString tip = tooltipFor(st, p);
            w->setToolTip(tip);
            w->setObjectName(QString::fromStdString(key));
            auto* label = new QLabel(QString::fromStdString(p.label.empty() ? p.name : p.label));
            label->setToolTip(tip);
            if (p.display_only) label->setStyleSheet("color: #1f5f9e;");
            form->addRow(label, w);
            editors_[key] = w;
        }
        v->addWidget(box);
    }
    auto* legend = new QLabel(tr("<span style='color:#1f5f9e'>Blue</span> settings only re-map the stored image; "
                                 "the others beamform again (in the background; Ctrl+. or the Cancel button in the status bar stops it)."));
    legend->setWordWrap(true);
    legend->setStyleSheet("color: #5b6470; font-size: 9pt; padding: 4px;");
    v->addWidget(legend);
    v->addStretch();
    scroll->setWidget(inner);
    outer->addWidget(scroll);
    syncFromRecipe();
}



QWidget* RecipePanel::editorFor(const std::string& key) const {
    auto it = editors_.find(key);
    return it == editors_.end() ? nullptr : it->second;
}

void RecipePanel::commit(const std::string& key, const std::string& value) {
    if (syncing_) return;
    try {
        ctl_->editRecipeValue(key, value);
        note_->hide();
    } catch (const std::exception& e) {
        // The recipe is unchanged: say so, and put the editor back to the value in use.
        const core::Recipe& r = ctl_->recipe();
        const QString label = r.has(key) ? QString::fromStdString(r.spec(key).label) : QString::fromStdString(key);
        const QString kept = r.has(key) ? QString::fromStdString(r.valueText(key)) : QString();
        note_->setText(tr("%1 not changed (still %2): %3").arg(label, kept, QString::fromStdString(e.what())));
        note_->show();
        syncFromRecipe();
    }
}

void RecipePanel::syncFromRecipe() {
    syncing_ = true;
    const core::Recipe& r = ctl_->recipe();
    for (auto& [key, w] : editors_) {
        if (!r.has(key)) continue;
        const auto& p = r.spec(key);
        switch (p.kind) {
            case core::ParamKind::Real: static_cast<QDoubleSpinBox*>(w)->setValue(r.number(key)); break;
            case core::ParamKind::Integer: static_cast<QSpinBox*>(w)->setValue(r.integer(key)); break;
            case core::ParamKind::Choice: {
                auto* c = static_cast<QComboBox*>(w);
                c->setCurrentIndex(c->findData(QString::fromStdString(r.text(key))));
                break;
            }
            case core::ParamKind::Flag: static_cast<QCheckBox*>(w)->setChecked(r.flag(key)); break;
            case core::ParamKind::Text:
                if (auto* g = qobject_cast<GainCurveEditor*>(w)) g->setCurve(QString::fromStdString(r.text(key)));
                else static_cast<QLineEdit*>(w)->setText(QString::fromStdString(r.text(key)));
                break;
        }
    }
    syncing_ = false;
}

}  // namespace umbra::ui
