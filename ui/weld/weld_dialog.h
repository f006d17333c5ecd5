// SPDX-License-Identifier: MIT
#pragma once
// Entry of the case's weld geometry: shape, plate thickness, weld centre, bevel, root gap and
// face, groove radius (U, J), cap and root reinforcement. Values are checked as they are typed
// (core::checkWeld); OK is enabled only for a valid geometry.
#include <QDialog>

#include "core/weld_geometry.h"

class QComboBox;
class QDoubleSpinBox;
class QLabel;
class QPushButton;

namespace umbra::ui {

class WeldDialog : public QDialog {
    Q_OBJECT
public:
    /// `initial`: the case's geometry, or defaults for a new one; `has_weld`: offers "Remove".
    WeldDialog(const core::WeldGeometry& initial, bool has_weld, QWidget* parent = nullptr);
    core::WeldGeometry geometry() const;
    void setGeometry(const core::WeldGeometry& w);
    /// True when the user chose "Remove overlay" (the dialog is then accepted).
    bool removeRequested() const { return remove_; }
    /// The problem with the values as typed ("" when valid).
    QString problem() const;

private:
    void revalidate();

    QComboBox* shape_ = nullptr;
    QDoubleSpinBox *thickness_ = nullptr, *centre_ = nullptr, *bevel_ = nullptr, *gap_ = nullptr, *face_ = nullptr,
                   *radius_ = nullptr, *cap_w_ = nullptr, *cap_h_ = nullptr, *root_w_ = nullptr, *root_h_ = nullptr;
    QLabel* problem_ = nullptr;
    QPushButton* ok_ = nullptr;
    bool remove_ = false;
};

}  // namespace umbra::ui
