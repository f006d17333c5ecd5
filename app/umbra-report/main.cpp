// SPDX-License-Identifier: MIT
// umbra-report: the PDF report of a case, run by `umbra-cli report` (Qt Gui on the offscreen
// platform; umbra-cli itself has no Qt). Thin: options, then ui/report.
#include <QGuiApplication>

#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>
#include <unistd.h>

#include "args.h"
#include "core/case_file.h"
#include "core/error.h"
#include "ui/report/agreement_section.h"
#include "ui/report/report.h"

int main(int argc, char** argv) {
    using namespace umbra;
    const std::vector<cli::OptionSpec> specs = {
        {"-o", "REPORT.pdf", "PDF to write (required)"},
        {"--threads", "N", "worker threads for the reconstruction (default: all cores)"},
        {"--image-width", "PX", "width of each annotated image in pixels (default 1600, printed 170 mm wide)"},
        {"--second-reading", "CASE", "another reading of the same captures (e.g. a blind re-read): adds the agreement section",
         true},
    };
    const char* usage = "umbra-cli report CASE.umbracase -o REPORT.pdf [--threads N] [--image-width PX] [--second-reading CASE ...]";
    std::vector<std::string> args(argv + 1, argv + argc);
    try {
        cli::Args a(args, specs, 0, 1);
        if (a.help()) {
            std::fputs(cli::helpText(usage,
                                     "Writes the examination report of a case as a PDF: header fields from the case, background,\n"
                                     "technique, the findings (indication, interpretation and evaluation apart, with expanded\n"
                                     "uncertainties), an annotated image of each finding reconstructed with the case's recipe,\n"
                                     "the top view of encoded scans, pertinent negatives, prior comparison, cautions, provenance\n"
                                     "(SHA-256 of each capture, recipe, version) and a sign-off block. Exit 2 for bad input.",
                                     specs)
                           .c_str(),
                       stdout);
            return 0;
        }
        if (a.positional().size() != 1) throw cli::UsageError("missing argument CASE.umbracase (see --help)");
        const auto out = a.value("-o");
        if (!out) throw cli::UsageError("option -o REPORT.pdf is required");
        ui::report::ReportSettings settings;
        if (auto t = a.value("--threads")) settings.threads = int(cli::parseWholeNumber("--threads", *t, 1, 256));
        if (auto w = a.value("--image-width")) settings.image_width_px = int(cli::parseWholeNumber("--image-width", *w, 400, 6000));
        settings.software = QStringLiteral("Umbra %1 (umbra-cli report)").arg(QStringLiteral(UMBRA_VERSION));
        settings.isolated_check = true;  // no other thread uses HDF5 yet
        // Load and check everything that can fail on bad input before Qt starts.
        const core::CaseDocument doc = core::loadCase(a.positional()[0]);
        std::vector<core::CaseDocument> others;
        const std::vector<std::string> other_names = a.values("--second-reading");
        for (const auto& p : other_names) others.push_back(core::loadCase(p));
        if (!std::getenv("QT_QPA_PLATFORM")) setenv("QT_QPA_PLATFORM", "offscreen", 1);
        int qargc = 1;
        QGuiApplication app(qargc, argv);
        ui::report::Report r(doc, QString::fromStdString(a.positional()[0]), settings);
        if (!others.empty()) r.appendSection(ui::report::agreementSection(doc, a.positional()[0], others, other_names));
        r.writePdf(QString::fromStdString(*out));
        std::printf("report written to %s (%zu finding(s)%s)\n", out->c_str(), doc.findings.size(),
                    r.synthetic() ? ", synthetic data" : "");
        return 0;
    } catch (const cli::UsageError& e) {
        std::fprintf(stderr, "umbra-cli report: %s\n", e.what());
        return 2;
    } catch (const core::SettingError& e) {
        std::fprintf(stderr, "umbra-cli report: bad setting: %s\n", e.what());
        return 2;
    } catch (const core::InputError& e) {
        std::fprintf(stderr, "%s\n", e.what());
        return 2;
    } catch (const std::exception& e) {
        std::fprintf(stderr, "umbra-cli report: %s\n", e.what());
        return 1;
    }
}
