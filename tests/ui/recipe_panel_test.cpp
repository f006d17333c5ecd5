// SPDX-License-Identifier: MIT
// Recipe panel: a numeric parameter whose declaration says what 0 stands for (zero_means) shows
// that text for 0 instead of "0 m/s", for a range starting at 0 (Qt's special-value text), for a
// range around 0 (the panel's own spin box) and for whole numbers; other values keep the unit.
#include <gtest/gtest.h>

#include <QDoubleSpinBox>
#include <QLineEdit>
#include <QSpinBox>

#include "core/parameters.h"
#include "ui/controller/case_controller.h"
#include "ui/recipe/recipe_panel.h"

using namespace umbra;

namespace {
core::ParamSpec realSpec(const char* name, double min, double max, const char* zero, const char* unit) {
    core::ParamSpec p;
    p.name = name;
    p.label = name;
    p.description = "test parameter";
    p.unit = unit;
    p.kind = core::ParamKind::Real;
    p.min = min;
    p.max = max;
    p.zero_means = zero;
    return p;
}
QString shown(QAbstractSpinBox* s) { return s->findChild<QLineEdit*>()->text(); }
}  // namespace

TEST(recipe_panel_test, zero_means_text_replaces_zero_value) {
    core::StageSpec st{"t", "Test stage", "stage for the test", {}};
    st.params.push_back(realSpec("speed_m_s", 0, 20000, "from capture", "m/s"));
    st.params.push_back(realSpec("x_min_mm", -100, 100, "aperture", "mm"));
    st.params.push_back(realSpec("gain_db", 0, 50, "", "dB"));
    core::ParamSpec n = realSpec("count", 0, 10, "automatic", "");
    n.kind = core::ParamKind::Integer;
    st.params.push_back(n);

    ui::CaseController ctl;
    ctl.applyRecipe(core::Recipe({st}));
    ui::RecipePanel panel(&ctl);

    auto* speed = qobject_cast<QDoubleSpinBox*>(panel.editorFor("t.speed_m_s"));
    auto* xmin = qobject_cast<QDoubleSpinBox*>(panel.editorFor("t.x_min_mm"));
    auto* gain = qobject_cast<QDoubleSpinBox*>(panel.editorFor("t.gain_db"));
    auto* count = qobject_cast<QSpinBox*>(panel.editorFor("t.count"));
    ASSERT_TRUE(speed && xmin && gain && count);

    // All at their default 0.
    EXPECT_EQ(shown(speed), "from capture");
    EXPECT_EQ(shown(xmin), "aperture");
    EXPECT_EQ(shown(count), "automatic");
    EXPECT_FALSE(shown(gain).contains("from"));  // no zero_means: an ordinary "0 dB"
    EXPECT_TRUE(shown(gain).endsWith("dB"));

    // Non-zero values show the number with the unit, and go back to the text at 0.
    ctl.editRecipeValue("t.speed_m_s", "5920");
    ctl.editRecipeValue("t.x_min_mm", "-12");
    EXPECT_TRUE(shown(speed).startsWith("5920")) << shown(speed).toStdString();
    EXPECT_TRUE(shown(speed).endsWith("m/s"));
    EXPECT_TRUE(shown(xmin).startsWith("-12")) << shown(xmin).toStdString();
    EXPECT_TRUE(shown(xmin).endsWith("mm"));
    ctl.editRecipeValue("t.x_min_mm", "0");
    EXPECT_EQ(shown(xmin), "aperture");

    // Typing works through the zero text: the own box parses numbers with and without the unit.
    EXPECT_DOUBLE_EQ(xmin->valueFromText("7 mm"), 7.0);
    EXPECT_DOUBLE_EQ(xmin->valueFromText("aperture"), 0.0);
}
