// SPDX-License-Identifier: MIT
#pragma once
// A table of the measurements of the active capture: id, kind, label (editable), the measured
// quantities with their uncertainty and unit ("Δx 3.00 ± 0.07 mm; ..."), and the frame.
// The quantities cell's tooltip explains each uncertainty (reading and speed of sound).
// Delete or Backspace on a selected row asks for its deletion.
//
//   auto* t = new MeasurementTable;
//   t->setMeasurements(ctl->measurements(), ctl->uncertaintyModel());
//   connect(t, &MeasurementTable::labelEdited, ...);
#include <QString>
#include <QTableWidget>

#include <map>
#include <string>
#include <vector>

#include "core/measurement.h"

namespace umbra::ui {

class MeasurementTable : public QTableWidget {
    Q_OBJECT
public:
    enum Column { IdColumn = 0, KindColumn, LabelColumn, QuantitiesColumn, FrameColumn, ColumnCount };

    explicit MeasurementTable(QWidget* parent = nullptr);

    /// Shows `ms`, evaluated with `u` (pixel size, speed-of-sound uncertainty, surface).
    /// Keeps the selected row when its id is still present. Emits no signal.
    /// `given`: quantities by measurement id that need the image (−6 dB sizing); others are
    /// computed with core::evaluate.
    void setMeasurements(const std::vector<core::Measurement>& ms, const core::UncertaintyModel& u,
                         const std::map<std::string, std::vector<core::Quantity>>& given = {});
    /// Selects the row of `id` ("" clears the selection). Emits no signal.
    void selectMeasurement(const QString& id);
    /// Id of the selected row ("" when none).
    QString selectedId() const;
    /// Id shown in `row` ("" when out of range).
    QString idAt(int row) const;

signals:
    /// The user selected a row ("" when the selection was cleared).
    void selected(const QString& id);
    /// The user changed a label.
    void labelEdited(const QString& id, const QString& text);
    /// The user asked to delete a measurement (Delete / Backspace).
    void deleteRequested(const QString& id);

protected:
    void keyPressEvent(QKeyEvent* event) override;

private:
    int updating_ = 0;
};

}  // namespace umbra::ui
