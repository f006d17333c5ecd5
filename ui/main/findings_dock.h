// SPDX-License-Identifier: MIT
#pragma once
// Wires the findings pane and the measurement table to the controller: technique block text,
// "add finding from selected measurement", edits as undoable commands, selection both ways.
#include <QWidget>

namespace umbra::ui {

class CaseController;

struct FindingsDocks {
    QWidget* findings = nullptr;      ///< the findings pane (with the caution line)
    QWidget* measurements = nullptr;  ///< the measurement table
};

/// Builds both widgets, parented to `parent`, connected to `controller`.
FindingsDocks buildFindingsDocks(CaseController* controller, QWidget* parent);

}  // namespace umbra::ui
