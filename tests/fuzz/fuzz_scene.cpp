// SPDX-License-Identifier: MIT
// libFuzzer target: the scene parser (JSON text -> checked scene). A refused scene is an
// InputError; nothing else may escape.
#include <cstdint>
#include <string>

#include "core/error.h"
#include "reconstruction/simulate/scene.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    try {
        (void)umbra::recon::sim::parseScene(text, "fuzz.json");
    } catch (const umbra::core::InputError&) {
    }
    return 0;
}
