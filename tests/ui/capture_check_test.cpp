// SPDX-License-Identifier: MIT
// The workstation reads no untrusted capture in-process before a separate checker program has
// read its header within a time limit: a damaged file, a checker that hangs or crashes, and a
// missing checker are each refused with a message naming the file; a sound capture opens.
#include <gtest/gtest.h>

#include <QFile>
#include <QStatusBar>

#include <fstream>

#include "core/error.h"
#include "ui/controller/capture_check.h"
#include "ui/controller/case_controller.h"
#include "ui/main/main_window.h"
#include "ui_test_support.h"

using namespace umbra;

namespace {
std::string refusal(const QString& path, int seconds = 30) {
    try {
        ui::checkCaptureOutOfProcess(path, seconds);
    } catch (const core::InputError& e) {
        return e.what();
    }
    return "";
}
bool has(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }

// Uses a stand-in checker for the life of the object, then the real one again.
struct CheckerOverride {
    QString saved = ui::captureCheckerPath();
    explicit CheckerOverride(const QString& p) { ui::setCaptureCheckerPath(p); }
    ~CheckerOverride() { ui::setCaptureCheckerPath(saved); }
};

QString script(const QString& dir, const QString& name, const std::string& body) {
    const QString p = dir + "/" + name;
    std::ofstream(p.toStdString()) << "#!/bin/sh\n" << body << "\n";
    QFile::setPermissions(p, QFile::ReadOwner | QFile::WriteOwner | QFile::ExeOwner);
    return p;
}
}  // namespace

TEST(capture_check_test, sound_capture_passes_and_opens) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString());
    EXPECT_EQ(refusal(cap), "");
    ui::CaseController ctl;
    ctl.openCapture(cap);
    EXPECT_TRUE(ctl.hasCapture());
}

TEST(capture_check_test, damaged_file_is_refused_with_its_name_and_the_window_says_so) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString());
    // Truncate the capture to its first 3000 bytes: the HDF5 superblock stays, the objects go.
    QFile f(cap);
    ASSERT_TRUE(f.resize(3000));
    const auto e = refusal(cap);
    EXPECT_TRUE(has(e, cap.toStdString())) << e;
    ui::CaseController ctl;
    EXPECT_THROW(ctl.openCapture(cap), core::InputError);
    EXPECT_FALSE(ctl.hasCapture());
    ui::MainWindow w(ui::test::quietOptions());
    EXPECT_FALSE(w.openPath(cap));
    EXPECT_TRUE(w.statusBar()->currentMessage().contains("point.h5")) << w.statusBar()->currentMessage().toStdString();
}

TEST(capture_check_test, hanging_checker_is_stopped_at_the_time_limit) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString());
    CheckerOverride o(script(dir, "hangs", "exec sleep 600"));
    const auto e = refusal(cap, 2);
    EXPECT_TRUE(has(e, "did not finish within 2 s")) << e;
}

TEST(capture_check_test, crashing_checker_is_a_refusal) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString());
    CheckerOverride o(script(dir, "crashes", "kill -SEGV $$"));
    const auto e = refusal(cap);
    EXPECT_TRUE(has(e, "stopped abnormally")) << e;
}

TEST(capture_check_test, missing_checker_refuses_and_says_where_it_looked) {
    const QString dir = ui::test::tempDir();
    const QString cap = dir + "/point.h5";
    ui::test::writePointCapture(cap.toStdString());
    CheckerOverride o(dir + "/no-such-checker");
    const auto e = refusal(cap);
    EXPECT_TRUE(has(e, "no-such-checker")) << e;
    EXPECT_TRUE(has(e, "is missing")) << e;
    ui::CaseController ctl;
    EXPECT_THROW(ctl.openCapture(cap), core::InputError);
}
