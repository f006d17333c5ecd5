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
        if (!(umbra::core::caseFromJson(again, "fuzz.umbracase", "/nonexistent-case-folder") == doc)) std::abort();
    } catch (const umbra::core::InputError& e) {
        std::fprintf(stderr, "fuzz_case: the saved case does not load back: %s\n", e.what());
        std::abort();  // what we wrote we must read back
    }
    return 0;
}
