// SPDX-License-Identifier: MIT
// Child of the journal kill test: makes the edits of journal_kill_edits.h through the
// workstation's CaseController and prints "ack K" after edit K returned (the journal has then
// been flushed to disk). The parent kills it with SIGKILL at a random moment.
// Usage: journal_kill_child CASE.umbracase EDITS
#include <QApplication>
#include <QStandardPaths>

#include <cstdio>
#include <cstdlib>

#include "journal_kill_edits.h"
#include "ui/controller/case_controller.h"

int main(int argc, char** argv) {
    if (argc != 3) return 2;
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    QStandardPaths::setTestModeEnabled(true);
    QApplication app(argc, argv);
    const QString case_path = QString::fromLocal8Bit(argv[1]);
    const int n = std::atoi(argv[2]);
    umbra::ui::CaseController ctl;
    ctl.saveCase(case_path);  // the case has a name: its journal lies beside it
    std::printf("ready\n");
    std::fflush(stdout);
    for (int i = 1; i <= n; ++i) {
        if (umbra::ui::test::isTitleEdit(i))
            ctl.setTitle(QString::fromStdString(umbra::ui::test::titleAfter(i)));
        else
            ctl.editFindings(umbra::ui::test::findingsAfter(i), QString("Add finding %1").arg(i));
        std::printf("ack %d\n", i);
        std::fflush(stdout);
    }
    return 0;
}
