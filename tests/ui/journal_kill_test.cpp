// SPDX-License-Identifier: MIT
// No lost edits: a child process makes edits through the CaseController (journal_kill_child)
// and is killed with SIGKILL at a random moment, 200 times (UMBRA_JOURNAL_TRIALS to change).
// After each kill the journal is recovered and must equal the case after the last edit the
// child acknowledged (or the one after it: an edit can be on disk before its "ack" is printed).
// Stale "*.saving" temporaries are removed by removeStaleTemporaries. Prints the figures.
#include <gtest/gtest.h>

#include <QDir>
#include <QElapsedTimer>
#include <QFile>
#include <QProcess>

#include <cstdio>
#include <random>

#include "core/edit_journal.h"
#include "journal_kill_edits.h"
#include "ui_test_support.h"

using namespace umbra;

TEST(journal_kill_test, kill_9_at_random_moments_loses_no_acknowledged_edit) {
    const int trials = qEnvironmentVariableIsEmpty("UMBRA_JOURNAL_TRIALS") ? 200 : qEnvironmentVariableIntValue("UMBRA_JOURNAL_TRIALS");
    const int edits = 100000;  // more than any trial reaches: the child is killed while editing
    std::mt19937 rng(20261202);
    std::uniform_int_distribution<int> delay_us(0, 400000);
    const QString dir = ui::test::tempDir();
    int lost = 0, killed_mid_run = 0, recovered_ahead = 0, no_journal = 0;
    long acked_total = 0;
    for (int t = 0; t < trials; ++t) {
        const QString case_path = dir + QString("/trial%1.umbracase").arg(t);
        QProcess child;
        child.start(UMBRA_JOURNAL_CHILD, {case_path, QString::number(edits)});
        ASSERT_TRUE(child.waitForStarted(10000));
        // Wait until the case exists, then let the child edit for a random time and kill it.
        QByteArray out;
        QElapsedTimer clock;
        clock.start();
        while (!out.contains("ready\n") && clock.elapsed() < 30000) {
            child.waitForReadyRead(100);
            out += child.readAllStandardOutput();
        }
        ASSERT_TRUE(out.contains("ready\n")) << "child did not start: " << child.readAllStandardError().toStdString();
        const int wait_us = delay_us(rng);
        QElapsedTimer since;
        since.start();
        while (since.nsecsElapsed() / 1000 < wait_us && child.state() == QProcess::Running) {
            child.waitForReadyRead(1);
            out += child.readAllStandardOutput();
        }
        child.kill();  // SIGKILL
        child.waitForFinished(10000);
        out += child.readAllStandardOutput();
        if (child.exitStatus() == QProcess::CrashExit) ++killed_mid_run;
        int acked = 0;
        for (const QByteArray& line : out.split('\n'))
            if (line.startsWith("ack ")) acked = line.mid(4).toInt();
        acked_total += acked;

        core::removeStaleTemporaries(case_path.toStdString());
        EXPECT_FALSE(QFile::exists(case_path + ".journal.saving"));
        const auto r = core::EditJournal::recover(core::journalPath(case_path.toStdString()));
        if (!r) {
            ++no_journal;
            EXPECT_EQ(acked, 0) << "trial " << t << ": no journal after " << acked << " acknowledged edits";
            if (acked > 0) ++lost;
            continue;
        }
        // Which edit does the recovered case hold? Its journal lists them all.
        const int k = int(r->edits.size());
        if (k < acked) lost += acked - k;
        if (k == acked + 1) ++recovered_ahead;
        EXPECT_TRUE(k == acked || k == acked + 1) << "trial " << t << ": acknowledged " << acked << ", recovered " << k;
        core::CaseDocument expected;  // the whole case: nothing but these edits differs from a new one
        expected.title = ui::test::titleAfter(k);
        expected.findings = ui::test::findingsAfter(k);
        EXPECT_EQ(r->doc.title, expected.title) << "trial " << t;
        EXPECT_EQ(r->doc.findings, expected.findings) << "trial " << t;
        EXPECT_TRUE(r->doc == expected) << "trial " << t;
        QFile::remove(case_path);
        QFile::remove(case_path + ".journal");
    }
    std::printf("journal kill test: %d trials, %d killed while editing, %.1f acknowledged edits per trial on average, "
                "%d recovered one edit past the last acknowledgement, %d without a journal, edits lost: %d\n",
                trials, killed_mid_run, double(acked_total) / trials, recovered_ahead, no_journal, lost);
    EXPECT_EQ(lost, 0);
    EXPECT_GT(killed_mid_run, trials / 2) << "the kills should mostly land while the child is editing";
}
