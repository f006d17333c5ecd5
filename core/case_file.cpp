// SPDX-License-Identifier: MIT
#include "core/case_file.h"

namespace umbra::core {

std::string caseToJson(const CaseDocument&, const std::string&) { return "{}"; }
CaseDocument caseFromJson(const std::string&, const std::string&, const std::string&) { return {}; }
void saveCase(const std::string&, const CaseDocument&) {}
CaseDocument loadCase(const std::string&) { return {}; }
std::string autosavePath(const std::string& case_path) { return case_path + ".autosave"; }
CaptureStatus checkCapture(const CaseCapture&) { return CaptureStatus::Missing; }
bool relocateCapture(CaseCapture&, const std::string&, bool) { return false; }

}  // namespace umbra::core
