// SPDX-License-Identifier: MIT
// Amplitude reference and −6 dB sizing through the controller, on the test's own point-reflector
// capture (one point at x = 0, depth 10 mm): the reference is the peak of the TCG-corrected
// envelope inside the selected box; findings give the peak in dB re that reference with its label;
// a reconstruction-setting change makes amplitudes "not comparable" (a display setting does
// not); the reference survives a case save and load and is undoable. The −6 dB sizing tool's
// quantities equal core::dropSize on the same envelope, and its table row lists them.
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

TEST(amplitude_reference_test, reference_sets_finding_db_warns_and_round_trips) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString(), 8, 1);
    const QString case_path = dir + "/ref.umbracase";
    core::AmplitudeReference kept;
    {
        MainWindow w(quiet());
        auto* ctl = w.controller();
        ASSERT_TRUE(w.openPath(cap));
        ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
        EXPECT_EQ(ctl->amplitudeUnit(), "dB re frame peak");

        // Without a reference: today's behaviour, labelled as re frame peak.
        const std::string id = ctl->addMeasurement(box(core::MeasurementKind::ExtentBox, -2, 8, 2, 12));
        const std::string f0 = ctl->addFindingFromMeasurement(id);
        EXPECT_EQ(ctl->findings().back().indication.reference.rfind("frame peak", 0), 0u);
        (void)f0;

        ASSERT_TRUE(ctl->setAmplitudeReferenceFrom(id, "Ø2.5 mm SDH at 10 mm, reference block"));
        ASSERT_TRUE(ctl->amplitudeReference().has_value());
        const auto& a = ctl->tgcAmplitude();
        ASSERT_FALSE(a.empty());
        // The point reflector is the strongest echo of the frame and lies inside the box.
        EXPECT_FLOAT_EQ(float(ctl->amplitudeReference()->amplitude), *std::max_element(a.begin(), a.end()));
        EXPECT_NEAR(ctl->amplitudeReference()->z_mm, 10.0, 0.5);
        EXPECT_EQ(ctl->amplitudeUnit(), "dB re Ø2.5 mm SDH at 10 mm, reference block");
        EXPECT_TRUE(ctl->referenceWarning().isEmpty());
        EXPECT_NEAR(*ctl->dbReReference(ctl->amplitudeReference()->amplitude * 0.5), 20 * std::log10(0.5), 1e-9);  // −6.02 dB

        // The same echo re itself is 0 dB; the finding names the reference.
        ctl->addFindingFromMeasurement(id);
        ASSERT_TRUE(ctl->findings().back().indication.peak_db.has_value());
        EXPECT_NEAR(*ctl->findings().back().indication.peak_db, 0.0, 1e-6);
        EXPECT_EQ(ctl->findings().back().indication.reference, "Ø2.5 mm SDH at 10 mm, reference block");

        // A display setting (gain) keeps amplitudes comparable; a reconstruction setting does not.
        core::Recipe r = ctl->recipe();
        r.setNumber(ui::findRecipeKey(r, "gain_db"), 6);
        ctl->applyRecipe(r);
        EXPECT_TRUE(ctl->referenceWarning().isEmpty());
        std::string fkey;
        for (const auto& st : r.stages())
            for (const auto& p : st.params)
                if (!p.display_only && p.name == "f_number") fkey = st.name + "." + p.name;
        ASSERT_FALSE(fkey.empty());
        r.setNumber(fkey, r.number(fkey) + 0.5);
        ctl->applyRecipe(r);
        EXPECT_TRUE(ctl->referenceWarning().contains(QString::fromStdString(fkey))) << ctl->referenceWarning().toStdString();
        ASSERT_TRUE(waitUntil([&] { return ctl->hasImage() && !ctl->isBusy(); }));
        ctl->addFindingFromMeasurement(id);
        EXPECT_NE(ctl->findings().back().indication.reference.find("not comparable"), std::string::npos);

        kept = *ctl->amplitudeReference();
        ASSERT_TRUE(w.saveCaseTo(case_path));

        // Undo of the reference (the findings and recipe edits come after it on the stack).
        while (ctl->amplitudeReference() && ctl->undoStack()->canUndo()) ctl->undoStack()->undo();
        EXPECT_FALSE(ctl->amplitudeReference().has_value());
        ctl->undoStack()->redo();
        EXPECT_TRUE(ctl->amplitudeReference().has_value());
    }
    MainWindow w2(quiet());
    ASSERT_TRUE(w2.openPath(case_path));
    ASSERT_TRUE(w2.controller()->amplitudeReference().has_value());
    EXPECT_EQ(*w2.controller()->amplitudeReference(), kept);
}

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
