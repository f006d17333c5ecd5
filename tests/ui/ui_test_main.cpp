// SPDX-License-Identifier: MIT
// main() for the workstation tests: a QApplication on the offscreen platform, then GoogleTest.
#include <QApplication>
#include <QStandardPaths>

#include <gtest/gtest.h>

#include "ui/controller/capture_check.h"

int main(int argc, char** argv) {
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    // Keep the tests out of the user's real settings and auto-save folders.
    QStandardPaths::setTestModeEnabled(true);
    QApplication app(argc, argv);
    umbra::ui::setCaptureCheckerPath(UMBRA_CLI_PATH);  // the tests run from their build folder
    ::testing::InitGoogleTest(&argc, argv);
    return RUN_ALL_TESTS();
}
