// SPDX-License-Identifier: MIT
// The second-reading section of a report: the inter-reader agreement of the report's case with
// one or more other readings of the same captures (core/agreement.h), as a report section.
#pragma once

#include <string>
#include <vector>

#include "core/case_file.h"
#include "ui/report/report.h"

namespace umbra::ui::report {

/// Compares `first` (the report's case, named `first_name`) with the other readings and returns
/// the "Second reading and agreement" section (kappa tables, matched and unmatched indications,
/// Bland–Altman of sizes). Throws core::InputError when a reading is not on the same captures.
ReportSection agreementSection(const core::CaseDocument& first, const std::string& first_name,
                               const std::vector<core::CaseDocument>& others, const std::vector<std::string>& other_names);

}  // namespace umbra::ui::report
