// SPDX-License-Identifier: MIT
#include "ui/controller/capture_check.h"

#include <QCoreApplication>
#include <QFileInfo>
#include <QProcess>
#include <QStringList>

#include <algorithm>
#include <vector>

#include "core/error.h"

namespace umbra::ui {
namespace {
QString& checkerOverride() {
    static QString p;
    return p;
}
}  // namespace

QString captureCheckerPath() {
    if (!checkerOverride().isEmpty()) return checkerOverride();
    return QCoreApplication::applicationDirPath() + "/umbra-cli";
}

void setCaptureCheckerPath(const QString& path) { checkerOverride() = path; }

void checkCaptureOutOfProcess(const QString& path, int seconds) {
    const std::string file = path.toStdString();
    const QString checker = captureCheckerPath();
    const QFileInfo ci(checker);
    if (!ci.isFile() || !ci.isExecutable())
        throw core::InputError(file, "", "was not opened: the capture checker " + checker.toStdString() +
                                             " is missing, so the file cannot be checked safely (reinstall Umbra)");
    QProcess p;
    p.setProgram(checker);
    // The checker's own child gives up on the header a little before we give up on the checker.
    auto env = QProcessEnvironment::systemEnvironment();
    env.insert("UMBRA_HEADER_TIMEOUT_S", QString::number(std::max(1, seconds - 2)));
    p.setProcessEnvironment(env);
    p.setArguments({"validate", "--quiet", "--header", path});
    p.start();
    if (!p.waitForStarted(10000))
        throw core::InputError(file, "", "was not opened: the capture checker " + checker.toStdString() + " could not be started");
    if (!p.waitForFinished(seconds * 1000)) {
        p.kill();
        p.waitForFinished(5000);
        throw core::InputError(file, "", "was not opened: checking its header did not finish within " + std::to_string(seconds) +
                                             " s (damaged file?)");
    }
    if (p.exitStatus() == QProcess::CrashExit)
        throw core::InputError(file, "", "was not opened: the capture checker stopped abnormally while reading it (damaged file?)");
    if (p.exitCode() == 0) return;
    // One line per problem: "FILE: where: what" (umbra-cli validate); the file name is ours.
    std::vector<core::Problem> problems;
    const QString prefix = path + ": ";
    for (QString line : QString::fromUtf8(p.readAllStandardError()).split('\n', Qt::SkipEmptyParts)) {
        if (line.startsWith(prefix)) line = line.mid(prefix.size());
        if (line.startsWith("warning: ")) continue;
        problems.push_back({"", line.toStdString()});
    }
    if (problems.empty()) problems.push_back({"", "the capture checker refused it (exit code " + std::to_string(p.exitCode()) + ")"});
    throw core::InputError(file, problems);
}

}  // namespace umbra::ui
