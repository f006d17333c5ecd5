// SPDX-License-Identifier: MIT
#pragma once
// Blind copy of a case for a second reading: the same captures (path and SHA-256) and recipes,
// nothing of the first reading. No Qt. See docs/agreement.md.
#include <string>

#include "core/case_file.h"

namespace umbra::core {

/// Title every blind copy gets (the original title may name the first reader).
inline constexpr const char* kBlindCopyTitle = "Blind re-read";

/// The blind copy of `doc`: keeps each capture's path, SHA-256 and recipe and the case's sizing
/// settings (medium, speed-of-sound uncertainty: part of the technique, not of the reading);
/// clears every measurement, finding, free text (title → kBlindCopyTitle, background, technique,
/// pertinent negatives, prior comparison), the distance–amplitude curve (the amplitude
/// reference) and each capture's view (frame, zoom, centre, tool: they show where the first
/// reader looked). The active capture is the first.
CaseDocument blindCopy(const CaseDocument& doc);

/// Loads the case at `case_path`, writes its blind copy to `new_path` atomically (capture paths
/// relative to the new case's folder, without the absolute fallback that could name the first
/// reader's folders). With `copy_captures` the captures are first copied beside the new case
/// (same file name; an existing file there is used only when its SHA-256 matches) so that no
/// path refers to the first reader's folders. Refuses to overwrite the source case.
/// Throws InputError naming the file at fault.
CaseDocument writeBlindCopy(const std::string& case_path, const std::string& new_path, bool copy_captures = false);

}  // namespace umbra::core
