// SPDX-License-Identifier: MIT
#pragma once
// Findings of a case as a table: one row per finding with its three levels (indication,
// interpretation, evaluation) kept in separate columns and its linked measurements.
// Numbers are written as recorded in the case (already rounded to their uncertainty when the
// finding was made); an empty cell / JSON null is "not measured".
#include <string>
#include <vector>

#include "core/case_file.h"

namespace umbra::core {

/// Column names of the CSV, in order.
const std::vector<std::string>& findingsColumns();

/// CSV text (RFC 4180: comma separated, CRLF line ends, a field holding a comma, a double quote,
/// CR or LF is enclosed in double quotes with inner quotes doubled), header row first.
/// `case_name` fills the "case" column.
std::string findingsCsv(const CaseDocument& doc, const std::string& case_name);

/// JSON text: {"case": ..., "title": ..., "findings": [ {"id", "number", "indication": {...},
/// "interpretation": {...}, "evaluation": {...}, "measurements": [...]} ]}; measurements carry
/// kind, label, frame (from 1, as shown) and points in mm.
std::string findingsJson(const CaseDocument& doc, const std::string& case_name);

/// One field quoted per RFC 4180 when it needs it.
std::string csvField(const std::string& text);

}  // namespace umbra::core
