// SPDX-License-Identifier: MIT
#include "core/finding.h"

namespace umbra::core {

bool Indication::isDescribed() const { return !description.empty() && !location.empty(); }
bool Finding::evaluationUnlocked() const { return false; }
bool Finding::evaluationApplicable() const { return true; }
std::string Finding::interpretationLockReason() const { return {}; }
std::string Finding::evaluationLockReason() const { return {}; }
std::vector<std::string> hedgingWords(const std::string&) { return {}; }
std::string hedgingNote(const std::vector<std::string>&) { return {}; }
std::string interpretationName(Interpretation) { return {}; }
std::optional<Interpretation> interpretationFromName(const std::string&) { return std::nullopt; }
std::string interpretationLabel(Interpretation) { return {}; }
std::string evaluationName(Evaluation) { return {}; }
std::optional<Evaluation> evaluationFromName(const std::string&) { return std::nullopt; }
std::string evaluationLabel(Evaluation) { return {}; }
std::string nextFindingId(const std::vector<Finding>&) { return "F1"; }

}  // namespace umbra::core
