// SPDX-License-Identifier: MIT
// umbra-cli export-findings: a case's findings and their measurements as a CSV or JSON table.
#include <cctype>
#include <cstdio>
#include <filesystem>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/atomic_file.h"
#include "core/case_file.h"
#include "core/findings_table.h"

namespace umbra::cli {

int cmdExportFindings(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"-o", "FILE.csv|FILE.json", "table to write (required; the format follows the extension)"},
    };
    const char* usage = "umbra-cli export-findings CASE.umbracase -o FILE.csv|FILE.json";
    Args a(argv, specs, 0, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Writes the findings of a case as a table: one row per finding with its indication\n"
                            "(location, x, depth, length, height, peak and its amplitude reference), its\n"
                            "interpretation and its evaluation in separate columns, and the measurements\n"
                            "linked to it. Numbers as recorded in the case; frames counted from 1.\n"
                            "CSV per RFC 4180 (UTF-8, CRLF line ends). Exit 2 for bad input.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    if (a.positional().size() != 1) throw UsageError("missing argument CASE.umbracase (see --help)");
    const auto out = a.value("-o");
    if (!out) throw UsageError("option -o FILE.csv|FILE.json is required");
    std::string ext = std::filesystem::path(*out).extension().string();
    for (auto& ch : ext) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
    if (ext != ".csv" && ext != ".json") throw UsageError("-o " + *out + ": the file name must end in .csv or .json");
    const std::string case_path = a.positional()[0];
    const core::CaseDocument doc = core::loadCase(case_path);
    const std::string name = std::filesystem::path(case_path).filename().string();
    core::writeFileAtomic(*out, ext == ".csv" ? core::findingsCsv(doc, name) : core::findingsJson(doc, name));
    std::printf("%zu finding(s) written to %s\n", doc.findings.size(), out->c_str());
    return 0;
}

}  // namespace umbra::cli
