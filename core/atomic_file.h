// SPDX-License-Identifier: MIT
#pragma once
// Atomic replacement of a small file the user owns (case files, batch summaries).
#include <string>

namespace umbra::core {

/// Writes `bytes` to "PATH<suffix>" beside `path`, flushes and fsyncs it, renames it over
/// `path` and fsyncs the folder (best effort). On failure the old file is untouched, the
/// temporary file is removed and InputError naming `path` ("cannot be saved: ...") is thrown.
void writeFileAtomic(const std::string& path, const std::string& bytes, const std::string& suffix = ".saving");

}  // namespace umbra::core
