// SPDX-License-Identifier: MIT
// −6 dB sizing through the controller, on the test's own point-reflector capture (one point at
// x = 0, depth 10 mm): the tool's quantities equal core::dropSize on the same envelope, and its
// table row lists them. (The amplitude reference is tested in distance_amplitude_curve_test.)
#include <gtest/gtest.h>

#include <QUndoStack>

#include <algorithm>
#include <cmath>

#include "core/drop_sizing.h"
#include "ui/calipers/measurement_table.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {
MainWindow::Options quiet() { return ui::test::quietOptions(); }
core::Measurement box(core::MeasurementKind k, double x0, double z0, double x1, double z1) {
    core::Measurement m;
    m.kind = k;
    m.points = {{x0, z0}, {x1, z1}};
    return m;
}
}  // namespace

TEST(amplitude_reference_test, six_db_sizing_matches_core_and_is_listed) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    MainWindow w(quiet());
    auto* ctl = w.controller();
    ASSERT_TRUE(w.openPath(cap));
    ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
    const std::string id = ctl->addMeasurement(box(core::MeasurementKind::DropSizing, -3, 7, 3, 13));
    const core::Measurement* m = ctl->measurement(id);
    ASSERT_NE(m, nullptr);
    const auto d = ctl->dropSizing(*m);
    ASSERT_TRUE(d && d->found);
    EXPECT_FALSE(d->anyOpen());
    EXPECT_NEAR(d->peak_z_mm, 10.0, 0.5);
    // Independent: the same sizing straight from core on the controller's envelope.
    std::vector<double> xs, zs;
    for (double v : ctl->envelope()->x_m) xs.push_back(v * 1e3);
    for (double v : ctl->envelope()->z_m) zs.push_back(v * 1e3);
    const auto c = core::dropSize(ctl->tgcAmplitude(), xs, zs, {-3, 7}, {3, 13});
    EXPECT_DOUBLE_EQ(d->lengthMm(), c.lengthMm());
    EXPECT_DOUBLE_EQ(d->heightMm(), c.heightMm());
    // At the −6 dB edges the envelope is half the peak (linear interpolation between pixels).
    const auto q = ctl->quantities(*m);
    ASSERT_EQ(q.size(), 4u);  // length, height, x, depth
    EXPECT_EQ(q[0].name, "length −6 dB");
    EXPECT_EQ(q[2].name, "x");
    EXPECT_GT(q[0].value, 0.0);
    EXPECT_LT(q[0].value, 6.0);
    // Finding from the sizing takes its length and height, rounded to their expanded
    // uncertainties (GUM 7.2.6): equal to the rounded readout text.
    ctl->addFindingFromMeasurement(id);
    const auto& ind = ctl->findings().back().indication;
    EXPECT_EQ(*ind.length_mm, std::stod(core::roundToUncertainty(q[0].value, 2 * q[0].uncertainty).value_text));
    EXPECT_EQ(*ind.height_mm, std::stod(core::roundToUncertainty(q[1].value, 2 * q[1].uncertainty).value_text));
    EXPECT_NEAR(*ind.length_mm, d->lengthMm(), 2 * q[0].uncertainty);
    // The measurement table lists the sizing quantities when given them.
    ui::MeasurementTable t;
    t.setMeasurements(ctl->measurements(), ctl->uncertaintyModel(), {{id, q}});
    ASSERT_EQ(t.rowCount(), 1);
    EXPECT_EQ(t.item(0, ui::MeasurementTable::KindColumn)->text(), "-6 dB sizing");
    EXPECT_TRUE(t.item(0, ui::MeasurementTable::QuantitiesColumn)->text().contains("length −6 dB"));
}
