// SPDX-License-Identifier: MIT
// Report-ready output from the workstation: the report header edit is undoable and saved with
// the case; File → Report writes a PDF with the header, finding and page numbers (read back
// with poppler's pdftotext); the light export theme; labels that name length and height;
// caption lines that wrap instead of running off the picture.
#include <gtest/gtest.h>

#include <QFile>
#include <QFontMetricsF>
#include <QProcess>
#include <QUndoStack>

#include <algorithm>

#include "core/case_file.h"
#include "ui/controller/case_controller.h"
#include "ui/export/image_export.h"
#include "ui/main/main_window.h"
#include "ui/viewer/image_view.h"
#include "ui/viewer/scene_painter.h"
#include "ui_test_support.h"

using namespace umbra;
using umbra::ui::MainWindow;
using umbra::ui::test::waitUntil;

namespace {

bool openAndWait(MainWindow& w, const QString& path) {
    if (!w.openPath(path)) return false;
    return waitUntil([&] { return w.controller()->hasImage() || !w.controller()->captureProblem().isEmpty(); });
}

QString pdfText(const QString& pdf) {
    QProcess p;
    p.start(QStringLiteral("pdftotext"), {QStringLiteral("-layout"), pdf, QStringLiteral("-")});
    p.waitForFinished(60000);
    return QString::fromUtf8(p.readAllStandardOutput()).simplified();
}

}  // namespace

TEST(report_test, header_edit_is_undoable_and_saved) {
    MainWindow w(ui::test::quietOptions());
    const QString dir = ui::test::tempDir();
    ui::test::writePointCapture((dir + "/cap.h5").toStdString());
    ASSERT_TRUE(openAndWait(w, dir + "/cap.h5"));
    auto* ctl = w.controller();
    core::ReportHeader h;
    h.examiner = "E. Xaminer";
    h.part = "Block 1";
    ctl->setReportHeader(h);
    EXPECT_EQ(ctl->reportHeader().examiner, "E. Xaminer");
    ctl->undoStack()->undo();
    EXPECT_TRUE(ctl->reportHeader().empty());
    ctl->undoStack()->redo();
    EXPECT_EQ(ctl->reportHeader().part, "Block 1");
    ctl->saveCase(dir + "/c.umbracase");
    EXPECT_EQ(core::loadCase((dir + "/c.umbracase").toStdString()).header, h);
}

TEST(report_test, workstation_report_has_header_finding_and_page_numbers) {
    MainWindow w(ui::test::quietOptions());
    const QString dir = ui::test::tempDir();
    ui::test::writePointCapture((dir + "/cap.h5").toStdString());
    ASSERT_TRUE(openAndWait(w, dir + "/cap.h5"));
    auto* ctl = w.controller();
    core::Measurement m;
    m.kind = core::MeasurementKind::ExtentBox;
    m.points = {{-1.0, 9.0}, {1.0, 11.0}};  // around the point reflector at x = 0, depth 10 mm
    const std::string id = ctl->addMeasurement(m);
    ctl->addFindingFromMeasurement(id);
    core::ReportHeader h;
    h.examiner = "E. Xaminer";
    ctl->setReportHeader(h);
    const QString pdf = dir + "/r.pdf";
    ASSERT_TRUE(w.writeReport(pdf));
    const QString t = pdfText(pdf);
    EXPECT_TRUE(t.contains("E. Xaminer")) << t.toStdString();
    EXPECT_TRUE(t.contains("F1"));
    EXPECT_TRUE(t.contains("page 1 of"));
    EXPECT_TRUE(t.contains("synthetic data", Qt::CaseInsensitive));  // the test capture is labelled synthetic
    // Section headings in order (each searched after the previous one).
    qsizetype at = 0;
    for (const char* heading : {"Technique", "Findings", "Images", "Cautions", "Provenance", "Sign-"}) {
        const qsizetype i = t.indexOf(QLatin1String(heading), at);
        EXPECT_GE(i, at) << heading;
        at = std::max(at, i);
    }
}

TEST(report_test, light_theme_export_is_on_white_with_named_values) {
    MainWindow w(ui::test::quietOptions());
    const QString dir = ui::test::tempDir();
    ui::test::writePointCapture((dir + "/cap.h5").toStdString());
    ASSERT_TRUE(openAndWait(w, dir + "/cap.h5"));
    auto* ctl = w.controller();
    core::Measurement m;
    m.kind = core::MeasurementKind::ExtentBox;
    m.points = {{-1.0, 9.0}, {1.0, 11.0}};
    ctl->addMeasurement(m);
    const QImage light = ui::renderAnnotatedImage(*w.imageView(), *ctl, 900, ui::Theme::Light);
    const QImage dark = ui::renderAnnotatedImage(*w.imageView(), *ctl, 900, ui::Theme::Dark);
    ASSERT_FALSE(light.isNull());
    EXPECT_EQ(light.pixelColor(2, 2), QColor(Qt::white));
    EXPECT_LT(dark.pixelColor(2, 2).lightness(), 40);
    const QString label = ui::measurementLabel(ctl->measurements().front(), ctl->uncertaintyModel());
    EXPECT_TRUE(label.contains("length ")) << label.toStdString();
    EXPECT_TRUE(label.contains(", height ")) << label.toStdString();
    EXPECT_TRUE(label.contains("± ")) << label.toStdString();
    EXPECT_FALSE(label.contains(QStringLiteral("×")));
}

TEST(report_test, caption_lines_wrap_within_the_width) {
    ui::SceneStyle st = ui::themedStyle(ui::Theme::Light);
    st.scale = 1.5;
    const QString long_line = QStringLiteral(
        "F1: frame 11 (y = 0.0 mm), x = 2.4 mm, depth 12.3 mm, peak -17.6 dB re frame peak (0 dB = the frame's strongest echo); "
        "F2: frame 11 (y = 0.0 mm), x = -6.1 mm, depth 8.0 mm, peak -22.0 dB re frame peak");
    const double width = 400;
    const QStringList lines = ui::wrapCaption({long_line, QStringLiteral("short")}, st, width);
    ASSERT_GT(lines.size(), 2);
    QFont f;
    f.setPointSizeF(8.5 * st.scale);
    const QFontMetricsF fm(f);
    for (const auto& l : lines) EXPECT_LE(fm.horizontalAdvance(l), width) << l.toStdString();
    // Nothing lost: the words read back in order.
    QStringList joined = lines;
    joined.removeLast();
    EXPECT_EQ(joined.join(' '), long_line);
    EXPECT_EQ(lines.back(), QStringLiteral("short"));
}
