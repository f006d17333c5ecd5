// SPDX-License-Identifier: MIT
#pragma once
// The edit sequence of the journal kill test: edit i (1-based) either retitles the case
// (every third edit, an edit outside the undo stack) or replaces the findings list with one more
// finding (an undoable edit). stateAfter(k) is the case after the first k edits.
#include <string>
#include <vector>

#include "core/case_file.h"

namespace umbra::ui::test {

inline bool isTitleEdit(int i) { return i % 3 == 0; }

inline std::string titleAfter(int k) {
    for (int i = k; i >= 1; --i)
        if (isTitleEdit(i)) return std::string("Journal test, title of edit ").append(std::to_string(i));
    return "";
}

inline std::vector<core::Finding> findingsAfter(int k) {
    std::vector<core::Finding> fs;
    for (int i = 1; i <= k; ++i) {
        if (isTitleEdit(i)) continue;
        core::Finding f;
        const std::string n = std::to_string(i);
        f.id = std::string("F").append(n);
        f.number = int(fs.size()) + 1;
        f.indication.location = std::string("frame 0, x = ").append(n).append(" mm");
        f.indication.x_mm = i / 3.0;  // not a short decimal: the journal must keep every bit
        f.indication.depth_mm = 10.0 + i * 0.1;
        f.indication.description = std::string("Edit ").append(n).append(": reflector seen in the synthetic test case.");
        fs.push_back(f);
    }
    return fs;
}

}  // namespace umbra::ui::test
