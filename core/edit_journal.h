// SPDX-License-Identifier: MIT
#pragma once
// The edit journal: every user edit of a case is appended to a journal file and flushed to disk
// (fsync) before the edit is acknowledged, so that a crash or kill -9 loses no edit. No Qt.
//
// File: "<case>.journal" beside the case (journalPath). A header line, then one record per edit:
//     umbra-journal 1\n
//     R <bytes> <crc32> <seq>\n<payload of <bytes> bytes>\n
// The payload is JSON {"what": "<edit>", "case": <the whole case document after the edit>} (the
// case as caseToJson writes it, capture paths absolute). CRC-32 is the IEEE 802.3 polynomial
// (as zlib's crc32). A record cut short by a crash, or with a wrong CRC, ends the journal: it and
// anything after it are ignored. Recovery takes the case of the last intact record and lists the
// edits of all intact records. Saving the case removes the journal. When the file passes
// kCompactBytes it is rewritten (atomically) holding only the last state and the list of edits.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "core/case_file.h"

namespace umbra::core {

/// "<case>.umbracase.journal" (".umbracase" added if missing), beside the autosave.
std::string journalPath(const std::string& case_path);

/// CRC-32 (IEEE 802.3, reflected, polynomial 0xEDB88320, initial and final XOR 0xFFFFFFFF).
uint32_t crc32(const void* data, size_t size, uint32_t crc = 0);

struct JournalRecovery {
    CaseDocument doc;                ///< the case after the last intact edit
    std::vector<std::string> edits;  ///< what each journalled edit was, oldest first
    size_t records = 0;              ///< intact records read
    bool torn_tail = false;          ///< bytes after the last intact record were ignored
};

class EditJournal {
public:
    /// Journal rewritten (compacted) beyond this size, bytes.
    static constexpr size_t kCompactBytes = size_t(8) << 20;

    /// A journal at `path` (not yet created; the first append replaces any old one atomically).
    explicit EditJournal(std::string path);
    ~EditJournal();
    EditJournal(const EditJournal&) = delete;
    EditJournal& operator=(const EditJournal&) = delete;

    const std::string& path() const { return path_; }
    /// Appends one edit and fsyncs the file; when it returns, the edit survives a crash.
    /// Throws InputError naming the journal when it cannot be written.
    void append(const std::string& what, const CaseDocument& doc);
    /// Removes the journal file (after the case was saved) and starts afresh.
    void discard();
    /// Edits appended since the journal was started (or compacted, counting the kept ones).
    size_t edits() const { return whats_.size(); }

    /// Reads the journal at `path`; nullopt when it does not exist or holds no intact record.
    /// Throws InputError only when the file exists but cannot be read.
    static std::optional<JournalRecovery> recover(const std::string& path);

private:
    void writeAll(const std::string& bytes);
    std::string path_;
    int fd_ = -1;
    size_t bytes_ = 0;
    uint64_t seq_ = 0;
    std::vector<std::string> whats_;
};

/// Removes stale temporaries ("<path>.saving") that an interrupted save of `case_path`, its
/// autosave or its journal left behind (the files themselves are intact: saves are atomic).
/// Returns the paths removed.
std::vector<std::string> removeStaleTemporaries(const std::string& case_path);

}  // namespace umbra::core
