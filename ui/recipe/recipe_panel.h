// SPDX-License-Identifier: MIT
#pragma once
// The recipe panel: one editor per declared parameter, grouped per stage, generated from the
// recipe's stage declarations (QDoubleSpinBox, QSpinBox, QComboBox, QCheckBox, QLineEdit per
// ParamKind). Edits go to the controller as undoable recipe edits; the panel follows the
// controller's recipe (undo, load, open).
#include <QWidget>

#include <map>
#include <string>

class QLabel;

namespace umbra::ui {

class CaseController;

class RecipePanel : public QWidget {
    Q_OBJECT
public:
    explicit RecipePanel(CaseController* controller, QWidget* parent = nullptr);
    /// The editor widget of a "stage.param" key (nullptr if unknown).
    QWidget* editorFor(const std::string& key) const;
    /// Sets every editor from the controller's recipe without emitting edits.
    void syncFromRecipe();

signals:
    void saveRecipeRequested();
    void loadRecipeRequested();

private:
    void build();
    void commit(const std::string& key, const std::string& value);

    CaseController* ctl_;
    std::map<std::string, QWidget*> editors_;
    QLabel* note_ = nullptr;
    bool syncing_ = false;
};

}  // namespace umbra::ui
