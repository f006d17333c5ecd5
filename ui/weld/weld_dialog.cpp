// SPDX-License-Identifier: MIT
#include "ui/weld/weld_dialog.h"

#include <QComboBox>
#include <QDialogButtonBox>
#include <QDoubleSpinBox>
#include <QFormLayout>
#include <QLabel>
#include <QPushButton>
#include <QVBoxLayout>

#include "core/error.h"

namespace umbra::ui {
namespace {

QDoubleSpinBox* spin(double lo, double hi, int decimals, const QString& suffix, const QString& name) {
    auto* s = new QDoubleSpinBox;
    s->setRange(lo, hi);
    s->setDecimals(decimals);
    s->setSuffix(suffix);
    s->setObjectName(name);
    s->setKeyboardTracking(false);
    return s;
}

}  // namespace

WeldDialog::WeldDialog(const core::WeldGeometry& initial, bool has_weld, QWidget* parent) : QDialog(parent) {
    setWindowTitle(tr("Weld geometry"));
    auto* lay = new QVBoxLayout(this);
    auto* intro = new QLabel(tr("Drawn over every view in the specimen frame (x along the scanning surface, depth "
                                "below it), with its mirror images for the first and second skip. Bevel angle: "
                                "fusion face from the plate normal."));
    intro->setWordWrap(true);
    lay->addWidget(intro);
    auto* form = new QFormLayout;
    shape_ = new QComboBox;
    shape_->setObjectName("weldShape");
    shape_->addItem(tr("Single V"), "V");
    shape_->addItem(tr("Double V (X)"), "X");
    shape_->addItem(tr("Single U"), "U");
    shape_->addItem(tr("Single J (+x plate prepared)"), "J");
    form->addRow(tr("Shape"), shape_);
    const QString mm = tr(" mm");
    thickness_ = spin(0.1, 1000, 2, mm, "weldThickness");
    centre_ = spin(-10000, 10000, 2, mm, "weldCentre");
    bevel_ = spin(0, 79.9, 1, QStringLiteral("°"), "weldBevel");
    gap_ = spin(0, 100, 2, mm, "weldGap");
    face_ = spin(0, 1000, 2, mm, "weldRootFace");
    radius_ = spin(0.1, 1000, 2, mm, "weldRadius");
    cap_w_ = spin(0, 1000, 2, mm, "weldCapWidth");
    cap_h_ = spin(0, 1000, 2, mm, "weldCapHeight");
    root_w_ = spin(0, 1000, 2, mm, "weldRootWidth");
    root_h_ = spin(0, 1000, 2, mm, "weldRootHeight");
    cap_w_->setSpecialValueText(tr("groove width"));
    root_w_->setSpecialValueText(tr("default"));
    root_w_->setToolTip(tr("0 = root gap + 2 mm (double V: the groove width at the back wall)"));
    form->addRow(tr("Plate thickness"), thickness_);
    form->addRow(tr("Weld centre x"), centre_);
    form->addRow(tr("Bevel angle"), bevel_);
    form->addRow(tr("Root gap"), gap_);
    form->addRow(tr("Root face"), face_);
    form->addRow(tr("Groove radius (U, J)"), radius_);
    form->addRow(tr("Cap width"), cap_w_);
    form->addRow(tr("Cap height"), cap_h_);
    form->addRow(tr("Root bead width"), root_w_);
    form->addRow(tr("Root bead height"), root_h_);
    lay->addLayout(form);
    problem_ = new QLabel;
    problem_->setObjectName("weldProblem");
    problem_->setWordWrap(true);
    problem_->setStyleSheet("color: #d65a4a");
    lay->addWidget(problem_);
    auto* box = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel);
    ok_ = box->button(QDialogButtonBox::Ok);
    if (has_weld) {
        auto* rm = box->addButton(tr("Remove overlay"), QDialogButtonBox::DestructiveRole);
        connect(rm, &QPushButton::clicked, this, [this] {
            remove_ = true;
            accept();
        });
    }
    connect(box, &QDialogButtonBox::accepted, this, &QDialog::accept);
    connect(box, &QDialogButtonBox::rejected, this, &QDialog::reject);
    lay->addWidget(box);

    setGeometry(initial);
    for (auto* s : {thickness_, centre_, bevel_, gap_, face_, radius_, cap_w_, cap_h_, root_w_, root_h_})
        connect(s, &QDoubleSpinBox::valueChanged, this, &WeldDialog::revalidate);
    connect(shape_, &QComboBox::currentIndexChanged, this, &WeldDialog::revalidate);
    revalidate();
}

void WeldDialog::setGeometry(const core::WeldGeometry& w) {
    shape_->setCurrentIndex(shape_->findData(QString::fromUtf8(core::weldShapeName(w.shape))));
    thickness_->setValue(w.thickness_mm);
    centre_->setValue(w.centre_x_mm);
    bevel_->setValue(w.bevel_angle_deg);
    gap_->setValue(w.root_gap_mm);
    face_->setValue(w.root_face_mm);
    radius_->setValue(w.groove_radius_mm);
    cap_w_->setValue(w.cap_width_mm);
    cap_h_->setValue(w.cap_height_mm);
    root_w_->setValue(w.root_width_mm);
    root_h_->setValue(w.root_height_mm);
}

core::WeldGeometry WeldDialog::geometry() const {
    core::WeldGeometry w;
    w.shape = core::weldShapeFromName(shape_->currentData().toString().toStdString()).value_or(core::WeldShape::V);
    w.thickness_mm = thickness_->value();
    w.centre_x_mm = centre_->value();
    w.bevel_angle_deg = bevel_->value();
    w.root_gap_mm = gap_->value();
    w.root_face_mm = face_->value();
    w.groove_radius_mm = radius_->value();
    w.cap_width_mm = cap_w_->value();
    w.cap_height_mm = cap_h_->value();
    w.root_width_mm = root_w_->value();
    w.root_height_mm = root_h_->value();
    return w;
}

QString WeldDialog::problem() const {
    try {
        core::checkWeld(geometry());
    } catch (const core::SettingError& e) {
        return QString::fromUtf8(e.what());
    }
    return {};
}

void WeldDialog::revalidate() {
    const bool curved = shape_->currentData().toString() == "U" || shape_->currentData().toString() == "J";
    radius_->setEnabled(curved);
    const QString p = problem();
    problem_->setText(p);
    ok_->setEnabled(p.isEmpty());
}

}  // namespace umbra::ui
