// SPDX-License-Identifier: MIT
// umbra-cli agreement: inter-reader agreement of two or more cases on the same captures
// (core/agreement.h).
#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/agreement.h"
#include "core/case_file.h"

namespace umbra::cli {

int cmdAgreement(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"--json", "", "print one JSON object (readers, matched, unmatched, interpretation, evaluation, sizes, groups)"},
        {"--match-mm", "D", "largest distance between matched indication centres, mm (default 3)"},
    };
    const char* usage = "umbra-cli agreement CASE1 CASE2 [CASE3 ...] [--json] [--match-mm D]";
    Args a(argv, specs, 0, 64);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Compares the findings of cases read independently on the same captures. Indications match on\n"
                            "the same capture (SHA-256) and frame with centres within 3 mm; the others are reported as found\n"
                            "by some readers only. For matched indications: confusion matrices and Cohen's kappa with a 95 %\n"
                            "interval (two readers) or Fleiss' kappa (three or more) of interpretation class and evaluation\n"
                            "outcome, and Bland-Altman bias and 95 % limits of agreement of lengths and heights.\n"
                            "Exit 2 for bad case files or cases on different captures.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    if (a.positional().size() < 2) throw UsageError(std::string("needs at least two case files\nusage: ") + usage);
    double match = core::kMatchDistanceMm;
    if (auto v = a.value("--match-mm")) {
        match = parseFiniteNumber("--match-mm", *v);
        if (!(match > 0) || match > 1000) throw UsageError("--match-mm must be in (0, 1000] mm");
    }
    std::vector<core::CaseDocument> cases;
    std::vector<std::string> names;
    for (const auto& p : a.positional()) {
        cases.push_back(core::loadCase(p));
        names.push_back(p);
    }
    const core::AgreementResult r = core::compareCases(cases, names, match);
    if (a.has("--json")) {
        std::fputs(core::agreementToJson(r).c_str(), stdout);
        return 0;
    }
    const core::ReportSection s = core::agreementReportSection(r);
    std::printf("%s\n\n", s.title.c_str());
    for (const auto& p : s.paragraphs) std::printf("%s\n", p.c_str());
    for (const auto& t : s.tables) {
        std::printf("\n%s\n", t.caption.c_str());
        if (t.rows.empty()) {
            std::printf("  (none)\n");
            continue;
        }
        std::vector<size_t> w(t.header.size(), 0);
        auto widen = [&](const std::vector<std::string>& row) {
            for (size_t i = 0; i < row.size() && i < w.size(); ++i) w[i] = std::max(w[i], row[i].size());
        };
        widen(t.header);
        for (const auto& row : t.rows) widen(row);
        auto print = [&](const std::vector<std::string>& row) {
            std::string line = " ";
            for (size_t i = 0; i < row.size() && i < w.size(); ++i) {
                std::string cell = row[i];
                cell.resize(w[i], ' ');
                line += " " + cell;
            }
            std::printf("%s\n", line.c_str());
        };
        print(t.header);
        for (const auto& row : t.rows) print(row);
    }
    return 0;
}

}  // namespace umbra::cli
