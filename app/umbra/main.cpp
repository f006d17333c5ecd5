// SPDX-License-Identifier: MIT
// umbra — the workstation. Thin: parses the command line, shows the main window.
//
//   umbra [CAPTURE.h5 | CASE.umbracase]
//   umbra --demo DIR [--demo-case NAME]    a demo case from DIR: weld (default: weld coupon with its
//                                         reference block) or phantom (Phantom P-2); File → Demo cases
//                                         offers the other
//   umbra ... --timings [--set stage.param=value ...]   print display re-render and beamforming times
//   umbra ... --screenshot FILE [--demo-annotate] [--demo-reference [--demo-tcg]] [--capture N] [--export FILE [--theme light|dark]]
//             [--report FILE.pdf]
#include <QApplication>
#include <QCommandLineParser>
#include <QFile>
#include <QFileInfo>
#include <QInputDialog>
#include <QMessageBox>
#include <QTimer>

#include <algorithm>
#include <cstdio>
#include <vector>

#include "ui/controller/case_controller.h"
#include "core/measurement.h"
#include "ui/main/main_window.h"
#include "ui/practice/practice_panel.h"
#include "ui/stored/stored_image_window.h"

int main(int argc, char** argv) {
    QApplication app(argc, argv);
    QApplication::setStyle("Fusion");  // the same calm look on every desktop
    QApplication::setApplicationName("Umbra");
    QApplication::setOrganizationName("Umbra");
    QApplication::setApplicationVersion("0.1.0");

    QCommandLineParser cl;
    cl.setApplicationDescription("Umbra workstation: ultrasonic array imaging, measurement and findings.");
    cl.addHelpOption();
    cl.addVersionOption();
    cl.addPositionalArgument("file", "A capture (.h5) or a case (.umbracase) to open.", "[CAPTURE.h5 | CASE.umbracase]");
    QCommandLineOption demo("demo",
                            "Open a demo case from DIR: by default the weld (weld_coupon.h5 with reference_block.h5); "
                            "File > Demo cases offers the others.",
                            "DIR");
    QCommandLineOption demoCase("demo-case", "With --demo: which demo case: weld, wedge (the weld from a shear-wave wedge, with the views strip) or phantom.", "NAME", "weld");
    QCommandLineOption timings("timings", "Print display re-render and beamforming times to stderr.");
    QCommandLineOption shot("screenshot", "Wait for the image, grab the window to FILE (PNG) and quit.", "FILE");
    QCommandLineOption annotate("demo-annotate", "Place a demonstration -6 dB sizing, caliper and finding.");
    QCommandLineOption ellipse("demo-ellipse",
                               "With --screenshot: place an ellipse (centre X,Z, semi-axes A along x and B along depth, mm) "
                               "and a finding from it.",
                               "X,Z,A,B");
    QCommandLineOption demoRef("demo-reference",
                               "With --screenshot: first make the distance-amplitude curve from the side-drilled holes at "
                               "5, 10, 15 and 20 mm of the case's reference_block.h5 capture (printed to stderr).");
    QCommandLineOption demoTcg("demo-tcg", "With --demo-reference: also make the TCG of the reference block from the curve.");
    QCommandLineOption capture("capture", "Show capture N (0-based) of the case.", "N", "0");
    QCommandLineOption exportOpt("export", "With --screenshot: also export the annotated view to FILE (PNG).", "FILE");
    QCommandLineOption themeOpt("theme", "With --export: light (print) or dark (screen) surround.", "light|dark", "dark");
    QCommandLineOption reportOpt("report", "With --screenshot: also write the PDF report of the case to FILE.", "FILE");
    QCommandLineOption frame("frame", "Show frame N (0-based).", "N");
    QCommandLineOption set("set", "Change one recipe setting after opening (repeatable), e.g. grid.step_mm=0.05.", "stage.param=value");
    QCommandLineOption timeout("timeout", "With --screenshot: give up waiting after S seconds.", "S", "300");
    QCommandLineOption practice("practice", "Start practice mode on CAPTURE (its answer file CAPTURE-stem.answers.json beside it).", "CAPTURE");
    QCommandLineOption trainee("trainee", "With --practice: the trainee's name (the practice log is kept under it).", "NAME");
    QCommandLineOption demoMeasure("demo-measurement",
                                   "With --screenshot: place a measurement, KIND;LABEL;X,Z;X,Z... in mm (KIND caliper, depth marker, "
                                   "extent box, ellipse; repeatable).",
                                   "SPEC");
    QCommandLineOption demoSubmit("demo-submit", "With --practice and --screenshot: submit the attempt before the screenshot.");
    QCommandLineOption progressShot("progress-screenshot", "With --practice and --screenshot: also grab the progress view to FILE.", "FILE");
    for (const auto& o : {demo, demoCase, timings, shot, annotate, ellipse, demoRef, demoTcg, capture, exportOpt, frame, set, timeout, themeOpt, reportOpt,
                          practice, trainee, demoMeasure, demoSubmit, progressShot})
        cl.addOption(o);
    QCommandLineOption storedCaliper("stored-caliper", "With --screenshot of a DICOM image: caliper from column C0, row R0 to C1, R1 (pixels).",
                                     "C0,R0,C1,R1");
    cl.addOption(storedCaliper);
    cl.process(app);

    umbra::ui::MainWindow::Options opt;
    opt.timings = cl.isSet(timings);
    const bool screenshot = cl.isSet(shot);
    if (screenshot) {
        opt.interactive = false;
        opt.recovery = umbra::ui::MainWindow::Recovery::Ignore;
    }
    umbra::ui::MainWindow w(opt);
    w.show();  // screenshots at the default window size

    bool ok = true;
    if (cl.isSet(practice)) {
        QString who = cl.value(trainee);
        if (who.trimmed().isEmpty() && !screenshot)
            who = QInputDialog::getText(&w, QObject::tr("Trainee"), QObject::tr("Your name (your practice log is kept under it):"));
        ok = w.startPractice(cl.value(practice), who);
    } else if (cl.isSet(demo)) ok = w.openDemoCase(cl.value(demo), cl.value(demoCase));
    else if (!cl.positionalArguments().isEmpty()) ok = w.openPath(cl.positionalArguments().front());
    else if (!screenshot && w.recoverUntitledJournal()) {
        // every edit of the untitled case, up to the last, is back (the status bar lists them)
    } else if (!screenshot && QFileInfo::exists(umbra::ui::CaseController::untitledAutosavePath()) &&
             QMessageBox::question(&w, QObject::tr("Recover unsaved work?"),
                                   QObject::tr("An untitled case from an earlier session was auto-saved but never saved:\n%1\n\n"
                                               "Open it?").arg(umbra::ui::CaseController::untitledAutosavePath())) ==
                 QMessageBox::Yes) {
        try {
            w.controller()->recoverUntitled();
        } catch (const std::exception& e) {
            QMessageBox::warning(&w, QObject::tr("Cannot recover"), QString::fromStdString(e.what()));
        }
    }
    auto* ctl = w.controller();
    const size_t cap = cl.value(capture).toULongLong();
    // Capture, frame and --set assignments: applied at start and again after visiting the
    // reference block for --demo-reference.
    const QStringList sets = cl.values(set);
    const bool has_frame = cl.isSet(frame);
    const size_t frame_index = cl.value(frame).toULongLong();
    auto applySets = [ctl, sets]() -> bool {
        if (sets.isEmpty()) return true;
        umbra::core::Recipe r = ctl->recipe();
        try {
            for (const QString& a : sets) r.applyAssignment(a.toStdString());
            ctl->checkRecipe(r);  // e.g. a grid over the pixel limit: refused before it applies
        } catch (const std::exception& e) {
            std::fprintf(stderr, "umbra: %s\n", e.what());
            return false;
        }
        ctl->applyRecipe(r);
        return true;
    };
    auto applyView = [ctl, cap, has_frame, frame_index, applySets]() -> bool {
        if (cap > 0 && cap < ctl->captureCount()) ctl->setActiveCapture(cap);
        if (has_frame) ctl->setCurrentFrame(frame_index);
        return applySets();
    };
    if (ok && !applyView()) return 2;
    long ref_capture = -1;
    if (ok && cl.isSet(demoRef)) {
        const auto doc = ctl->document();
        for (size_t i = 0; i < doc.captures.size(); ++i)
            if (QFileInfo(QString::fromStdString(doc.captures[i].path)).fileName() == "reference_block.h5") ref_capture = long(i);
        if (ref_capture < 0) std::fprintf(stderr, "umbra: --demo-reference: the case has no reference_block.h5 capture\n");
    }

    // Ten display-only re-renders (gain steps), reported on stderr; the recipe is put back.
    auto reportTimings = [ctl] {
        const umbra::core::Recipe keep = ctl->recipe();
        const std::string key = umbra::ui::findRecipeKey(keep, "gain_db");
        if (key.empty() || !ctl->hasImage()) return;
        std::vector<double> ms;
        for (int i = 1; i <= 10; ++i) {
            umbra::core::Recipe r = keep;
            r.setNumber(key, keep.number(key) + i);
            ctl->applyRecipe(r);
            ms.push_back(ctl->lastRenderMs());
        }
        ctl->applyRecipe(keep);
        std::sort(ms.begin(), ms.end());
        const auto* f = ctl->envelope();
        std::fprintf(stderr,
                     "umbra timings: display-only re-render of %zu x %zu (x by depth): min %.2f ms, median %.2f ms, "
                     "max %.2f ms over %zu gain changes; beamforming of frame %zu took %.3f s\n",
                     f->nx(), f->nz(), ms.front(), ms[ms.size() / 2], ms.back(), ms.size(), ctl->currentFrame(),
                     ctl->lastBeamformSeconds());
    };
    // Measure when the worker is idle (the top view's background frames share the cores).
    auto idle = [ctl] {
        const bool top_done = !ctl->topViewFits() || ctl->topViewFramesDone() >= ctl->frameCount();
        return ctl->hasImage() && !ctl->isBusy() && top_done && !ctl->isStripRunning();
    };
    if (opt.timings && ok && !screenshot) {
        auto* t = new QTimer(&w);
        QObject::connect(t, &QTimer::timeout, &w, [t, idle, reportTimings] {
            if (!idle()) return;
            t->stop();
            reportTimings();
        });
        t->start(100);
    }

    // A stored DICOM image opens in its own window: with --screenshot, place the caliper given by
    // --stored-caliper (pixel columns and rows) and grab that window.
    if (screenshot && ok) {
        if (auto* sw = w.findChild<umbra::ui::StoredImageWindow*>()) {
            const QStringList c = cl.value(storedCaliper).split(',', Qt::SkipEmptyParts);
            if (c.size() == 4) sw->setCaliper(c[0].toDouble(), c[1].toDouble(), c[2].toDouble(), c[3].toDouble());
            if (cl.isSet(frame)) sw->setCurrentFrame(size_t(cl.value(frame).toULongLong()));
            const QString out = cl.value(shot);
            QTimer::singleShot(600, sw, [sw, out] {
                const QString tmp = out + ".part";
                bool saved = sw->grab().save(tmp, "PNG");
                if (saved) {
                    QFile::remove(out);
                    saved = QFile::rename(tmp, out);
                }
                std::fprintf(stderr, "umbra: screenshot %s %s\n", out.toLocal8Bit().constData(), saved ? "written" : "FAILED");
                QApplication::exit(saved ? 0 : 3);
            });
            return QApplication::exec();
        }
    }
    if (screenshot) {
        if (!ok) return 1;
        const QString out = cl.value(shot);
        const QString exp = cl.value(exportOpt);
        const auto theme = umbra::ui::themeFromName(cl.value(themeOpt));
        if (!theme) {
            std::fprintf(stderr, "umbra: --theme must be light or dark\n");
            return 2;
        }
        const QString report_path = cl.value(reportOpt);
        const bool ann = cl.isSet(annotate);
        std::vector<double> ell;
        for (const QString& v : cl.value(ellipse).split(',', Qt::SkipEmptyParts)) ell.push_back(v.toDouble());
        if (cl.isSet(ellipse) && ell.size() != 4) {
            std::fprintf(stderr, "umbra: --demo-ellipse needs X,Z,A,B in mm\n");
            return 2;
        }
        const double limit_s = cl.value(timeout).toDouble();
        const bool make_tcg = cl.isSet(demoTcg);
        std::vector<umbra::core::Measurement> demo_ms;
        for (const QString& spec : cl.values(demoMeasure)) {
            const QStringList parts = spec.split(';');
            const auto kind = parts.size() >= 3 ? umbra::core::kindFromName(parts[0].toStdString()) : std::nullopt;
            umbra::core::Measurement m;
            if (kind) {
                m.kind = *kind;
                m.label = parts[1].toStdString();
                for (int i = 2; i < parts.size(); ++i) {
                    const QStringList xz = parts[i].split(',');
                    if (xz.size() == 2) m.points.push_back({xz[0].toDouble(), xz[1].toDouble()});
                }
            }
            if (!kind || m.points.size() != umbra::core::pointCount(m.kind)) {
                std::fprintf(stderr, "umbra: --demo-measurement '%s': expected KIND;LABEL;X,Z;... with the kind's number of points\n",
                             spec.toLocal8Bit().constData());
                return 2;
            }
            demo_ms.push_back(m);
        }
        const bool submit = cl.isSet(demoSubmit);
        const QString progress_out = cl.value(progressShot);
        auto* timer = new QTimer(&w);
        auto* elapsed = new double(0);
        auto* phase = new int(ref_capture >= 0 ? 0 : 2);  // 0 go to the block, 1 take the reference, 2 shoot
        const bool timed = opt.timings;
        QObject::connect(timer, &QTimer::timeout, &w, [&w, ctl, out, exp, ann, limit_s, timer, elapsed, idle, timed, reportTimings,
                                                       phase, ref_capture, applySets, cap, has_frame, frame_index, ell, make_tcg, theme, report_path,
                                                       demo_ms, submit, progress_out] {
            *elapsed += 0.25;
            if (*phase == 0) {
                ctl->setActiveCapture(static_cast<size_t>(ref_capture));
                applySets();
                *phase = 1;
                return;
            }
            if (*phase == 1) {
                if (!idle() && *elapsed < limit_s) return;
                w.demoCurve();
                if (make_tcg) {
                    QString why;
                    if (!ctl->makeTcgFromCurve(&why)) std::fprintf(stderr, "umbra: --demo-tcg: %s\n", why.toLocal8Bit().constData());
                    else std::fprintf(stderr, "umbra: TCG from the curve: %s\n", ctl->recipe().text("tgc.curve").c_str());
                }
                ctl->setActiveCapture(cap < ctl->captureCount() ? cap : 0);
                if (has_frame) ctl->setCurrentFrame(frame_index);
                applySets();
                *phase = 2;
                return;
            }
            const bool image = ctl->hasImage();
            if (!idle() && *elapsed < limit_s) return;
            timer->stop();
            if (timed && image) reportTimings();
            if (!image) {
                std::fprintf(stderr, "umbra: no image after %.0f s\n", *elapsed);
                QApplication::exit(2);
                return;
            }
            if (ann) w.demoAnnotate();
            if (ell.size() == 4) {
                umbra::core::Measurement m;
                m.kind = umbra::core::MeasurementKind::Ellipse;
                m.frame_index = ctl->currentFrame();
                m.points = {{ell[0], ell[1]}, {ell[0] + ell[2], ell[1]}, {ell[0], ell[1] + ell[3]}};
                m.label = "round region";
                const std::string id = ctl->addMeasurement(m);
                const std::string fid = ctl->addFindingFromMeasurement(id);
                auto fs = ctl->findings();
                for (auto& f : fs)
                    if (f.id == fid)
                        f.indication.description =
                            "Round echo-free region with a bright far wall; demonstration annotation placed at a stated position.";
                ctl->editFindings(fs, "Describe finding");
            }
            for (auto m : demo_ms) {
                m.frame_index = ctl->currentFrame();
                ctl->addMeasurement(m);
            }
            if (submit && w.practicePanel()) {
                QString why;
                if (!w.practicePanel()->submit(&why)) std::fprintf(stderr, "umbra: --demo-submit: %s\n", why.toLocal8Bit().constData());
            }
            if (!progress_out.isEmpty() && w.practicePanel()) {
                QWidget* dlg = w.practicePanel()->showProgress(false);
                QTimer::singleShot(300, dlg, [dlg, progress_out] {
                    const bool saved = dlg->grab().save(progress_out, "PNG");
                    std::fprintf(stderr, "umbra: progress screenshot %s %s\n", progress_out.toLocal8Bit().constData(),
                                 saved ? "written" : "FAILED");
                });
            }
            QTimer::singleShot(600, &w, [&w, out, exp, theme, report_path] {
                // Written to a temporary name and renamed, so that an interrupted run or two
                // runs at once never leave a half-written PNG under the final name.
                const QString tmp = out + ".part";
                bool saved = w.grab().save(tmp, "PNG");
                if (saved) {
                    QFile::remove(out);
                    saved = QFile::rename(tmp, out);
                }
                std::fprintf(stderr, "umbra: screenshot %s %s\n", out.toLocal8Bit().constData(), saved ? "written" : "FAILED");
                if (!exp.isEmpty()) w.exportImage(exp, 2400, *theme);
                if (!report_path.isEmpty() && !w.writeReport(report_path)) saved = false;
                QApplication::exit(saved ? 0 : 3);
            });
        });
        timer->start(250);
    }
    return QApplication::exec();
}
