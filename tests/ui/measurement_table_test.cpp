// SPDX-License-Identifier: MIT
// The measurement table shows each measurement's quantities with uncertainty and unit, lets
// the user edit labels, select and delete rows.
#include <QHeaderView>
#include <QSignalSpy>
#include <QTest>

#include <gtest/gtest.h>

#include "ui/calipers/measurement_table.h"

using namespace umbra;
using umbra::ui::MeasurementTable;

namespace {

// Pixel 0.1 × 0.05 mm, speed of sound known to 1 %, surface at z = 0.
const core::UncertaintyModel kModel{0.1, 0.05, 0.01, 0.0};

std::vector<core::Measurement> sample() {
    return {
        {"M1", core::MeasurementKind::Caliper, {{1, 2}, {4, 6}}, "root gap", 3},
        {"M2", core::MeasurementKind::DepthMarker, {{0, 20}}, "", 0},
    };
}

}  // namespace

// 3-4-5 caliper; uncertainties by hand (see tests/core/measurement_test.cpp):
// Δx ±0.0707, Δdepth ±0.0534, distance ±0.0602 mm; depth 20 mm ± √(0.025² + 0.2²) = 0.2016
// (standard); shown as expanded U = 2u (k = 2) rounded to two digits (JCGM 100:2008 6.2.1, 7.2.6).
TEST(measurement_table_test, shows_values_with_uncertainty_and_unit) {
    MeasurementTable t;
    t.setMeasurements(sample(), kModel);
    ASSERT_EQ(t.rowCount(), 2);
    EXPECT_EQ(t.item(0, MeasurementTable::IdColumn)->text(), "M1");
    EXPECT_EQ(t.item(0, MeasurementTable::KindColumn)->text(), "caliper");
    EXPECT_EQ(t.item(0, MeasurementTable::LabelColumn)->text(), "root gap");
    EXPECT_EQ(t.item(0, MeasurementTable::QuantitiesColumn)->text(),
              QString::fromUtf8("Δx 3.00 ± 0.14 mm; Δdepth 4.00 ± 0.11 mm; distance 5.00 ± 0.12 mm"));
    EXPECT_EQ(t.item(0, MeasurementTable::FrameColumn)->text(), "4");  // frames shown 1-based
    EXPECT_EQ(t.item(1, MeasurementTable::QuantitiesColumn)->text(), QString::fromUtf8("depth 20.00 ± 0.40 mm"));
    EXPECT_TRUE(t.item(1, MeasurementTable::QuantitiesColumn)->toolTip().contains("speed of sound"));
    EXPECT_TRUE(t.item(1, MeasurementTable::QuantitiesColumn)->toolTip().contains("1 %"));
    // Only the label is editable.
    EXPECT_TRUE(t.item(0, MeasurementTable::LabelColumn)->flags() & Qt::ItemIsEditable);
    EXPECT_FALSE(t.item(0, MeasurementTable::QuantitiesColumn)->flags() & Qt::ItemIsEditable);
}

TEST(measurement_table_test, label_edit_selection_and_delete_are_signalled) {
    MeasurementTable t;
    t.resize(600, 200);
    t.show();
    QSignalSpy labels(&t, &MeasurementTable::labelEdited);
    QSignalSpy selected(&t, &MeasurementTable::selected);
    QSignalSpy deletes(&t, &MeasurementTable::deleteRequested);
    t.setMeasurements(sample(), kModel);
    EXPECT_EQ(labels.count(), 0);  // filling the table is not an edit
    EXPECT_EQ(selected.count(), 0);

    const QRect r = t.visualItemRect(t.item(1, MeasurementTable::KindColumn));
    QTest::mouseClick(t.viewport(), Qt::LeftButton, {}, r.center());
    ASSERT_GE(selected.count(), 1);
    EXPECT_EQ(selected.last().at(0).toString(), "M2");
    EXPECT_EQ(t.selectedId(), "M2");

    t.item(1, MeasurementTable::LabelColumn)->setText("back wall");  // what committing the editor does
    ASSERT_EQ(labels.count(), 1);
    EXPECT_EQ(labels.at(0).at(0).toString(), "M2");
    EXPECT_EQ(labels.at(0).at(1).toString(), "back wall");

    QTest::keyClick(&t, Qt::Key_Delete);
    ASSERT_EQ(deletes.count(), 1);
    EXPECT_EQ(deletes.at(0).at(0).toString(), "M2");
}

TEST(measurement_table_test, selection_survives_refresh_and_follows_program) {
    MeasurementTable t;
    QSignalSpy selected(&t, &MeasurementTable::selected);
    t.setMeasurements(sample(), kModel);
    t.selectMeasurement("M2");
    EXPECT_EQ(t.selectedId(), "M2");
    auto ms = sample();
    ms.insert(ms.begin(), core::Measurement{"M3", core::MeasurementKind::ExtentBox, {{0, 0}, {1, 1}}, "", 0});
    t.setMeasurements(ms, kModel);
    EXPECT_EQ(t.selectedId(), "M2");
    EXPECT_EQ(t.idAt(2), "M2");
    t.selectMeasurement("");
    EXPECT_EQ(t.selectedId(), "");
    EXPECT_EQ(selected.count(), 0);  // program-driven selection is not reported back
}

TEST(measurement_table_test, malformed_measurement_is_shown_not_thrown) {
    MeasurementTable t;
    t.setMeasurements({{"M9", core::MeasurementKind::Ellipse, {{0, 0}}, "", 0}}, kModel);
    EXPECT_TRUE(t.item(0, MeasurementTable::QuantitiesColumn)->text().contains("cannot be measured"));
}
