// SPDX-License-Identifier: MIT
#pragma once
// A check of JSON text before it is parsed into a tree (RFC 8259 grammar): syntax errors are
// reported in plain words with line and column, numbers that do not fit a double (1e999) name
// their key, and nesting depth and value count are bounded before any recursive parser or
// allocation sees the text. Used for every JSON file Umbra reads (scenes, recipes, case files).
#include <cstddef>
#include <string>

namespace umbra::core {

struct JsonLimits {
    size_t max_depth = 256;        ///< deepest nesting of arrays and objects
    size_t max_values = 4'000'000;  ///< values of any kind (strings, numbers, ...) in the whole text
    /// Memory the parsed tree would take, estimated before parsing (bytes): 32 per value (a node
    /// and the slack of a growing array), 64 per
    /// string value plus its length, 96 per object member plus its key's length, 64 per array
    /// or object (the JSON library's node, heap string, map node and allocator overhead).
    size_t max_memory_bytes = size_t(1) << 30;
};

/// Estimated bytes of memory for the parsed tree of a value count / string bytes (JsonLimits).
inline constexpr size_t kJsonValueBytes = 32, kJsonStringBytes = 64, kJsonMemberBytes = 96, kJsonContainerBytes = 64;

/// Throws InputError(file, key path, problem) unless `text` is one JSON value within the limits,
/// e.g. "reflectors.points[3].amplitude: number 1e999 is out of range". The key path uses
/// "a.b[2].c" (empty at the root). Grammar errors read "not valid JSON: <what> (line L, column C)".
/// A text whose parsed tree would exceed limits.max_memory_bytes is refused with the estimate.
void checkJsonText(const std::string& text, const std::string& file, const JsonLimits& limits = {});

}  // namespace umbra::core
