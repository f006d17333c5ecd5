// SPDX-License-Identifier: MIT
// libFuzzer target: the case loader (JSON text -> checked case document), then a round trip:
// a case that loads must save to text that loads back to an equal document.
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "core/case_file.h"
#include "core/error.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    umbra::core::CaseDocument doc;
    try {
        doc = umbra::core::caseFromJson(text, "fuzz.umbracase", "/nonexistent-case-folder");
    } catch (const umbra::core::InputError&) {
        return 0;
    }
    const std::string again = umbra::core::caseToJson(doc, "/nonexistent-case-folder");
    try {
        const auto back = umbra::core::caseFromJson(again, "fuzz.umbracase", "/nonexistent-case-folder");
        if (!(back == doc)) {
            // Name the first line where the documents differ, as saved.
            const std::string a = umbra::core::caseToJson(doc, "/nonexistent-case-folder"),
                              b = umbra::core::caseToJson(back, "/nonexistent-case-folder");
            size_t i = 0;
            while (i < a.size() && i < b.size() && a[i] == b[i]) ++i;
            const size_t line = a.rfind('\n', i) == std::string::npos ? 0 : a.rfind('\n', i) + 1;
            std::fprintf(stderr, "fuzz_case: the saved case loads back different, first at:\n  %s\n  %s\n",
                         a.substr(line, a.find('\n', i) - line).c_str(), b.substr(line, b.find('\n', i) - line).c_str());
            std::abort();
        }
    } catch (const umbra::core::InputError& e) {
        std::fprintf(stderr, "fuzz_case: the saved case does not load back: %s\n", e.what());
        std::abort();  // what we wrote we must read back
    }
    return 0;
}
