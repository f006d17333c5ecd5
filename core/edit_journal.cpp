// SPDX-License-Identifier: MIT
#include "core/edit_journal.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <array>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "core/atomic_file.h"
#include "core/error.h"
#include "core/json_guard.h"

namespace umbra::core {
namespace {
using json = nlohmann::json;
const std::string kHeader = "umbra-journal 1\n";
constexpr std::uintmax_t kMaxJournalBytes = std::uintmax_t(256) << 20;

std::string record(uint64_t seq, const std::string& payload) {
    return "R " + std::to_string(payload.size()) + " " + std::to_string(crc32(payload.data(), payload.size())) + " " +
           std::to_string(seq) + "\n" + payload + "\n";
}

std::string payloadOf(const std::string& what, const CaseDocument& doc, const std::vector<std::string>& earlier) {
    json j;
    j["what"] = what;
    if (!earlier.empty()) j["earlier"] = earlier;
    j["case"] = json::parse(caseToJson(doc, ""));
    return j.dump(-1, ' ', false, json::error_handler_t::replace);
}
}  // namespace

std::string journalPath(const std::string& case_path) { return autosavePath(case_path).substr(0, autosavePath(case_path).size() - 9) + ".journal"; }

uint32_t crc32(const void* data, size_t size, uint32_t crc) {
    static const auto table = [] {
        std::array<uint32_t, 256> t{};
        for (uint32_t i = 0; i < 256; ++i) {
            uint32_t c = i;
            for (int k = 0; k < 8; ++k) c = (c & 1) ? 0xEDB88320u ^ (c >> 1) : c >> 1;
            t[i] = c;
        }
        return t;
    }();
    const auto* p = static_cast<const unsigned char*>(data);
    crc = ~crc;
    for (size_t i = 0; i < size; ++i) crc = table[(crc ^ p[i]) & 0xFF] ^ (crc >> 8);
    return ~crc;
}

EditJournal::EditJournal(std::string path) : path_(std::move(path)) {}

EditJournal::~EditJournal() {
    if (fd_ >= 0) ::close(fd_);
}

void EditJournal::writeAll(const std::string& bytes) {
    size_t done = 0;
    while (done < bytes.size()) {
        const ssize_t n = ::write(fd_, bytes.data() + done, bytes.size() - done);
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) throw InputError(path_, "", std::string("cannot be written: ") + std::strerror(errno));
        done += size_t(n);
    }
    if (::fsync(fd_) != 0) throw InputError(path_, "", std::string("cannot be flushed to disk: ") + std::strerror(errno));
    bytes_ += bytes.size();
}

void EditJournal::append(const std::string& what, const CaseDocument& doc) {
    if (fd_ < 0 || bytes_ > kCompactBytes) {
        // A new journal, or compaction: the file is replaced atomically (a crash leaves the old
        // journal or the new one, never an empty one) by a header and one record holding the
        // state after this edit and, when compacting, the list of the earlier edits.
        if (fd_ < 0) whats_.clear();
        const std::string bytes = kHeader + record(++seq_, payloadOf(what, doc, whats_));
        if (fd_ >= 0) ::close(fd_);
        fd_ = -1;
        writeFileAtomic(path_, bytes, ".saving");  // fsyncs the file and its folder
        fd_ = ::open(path_.c_str(), O_WRONLY | O_APPEND | O_CLOEXEC);
        if (fd_ < 0) throw InputError(path_, "", std::string("cannot be reopened: ") + std::strerror(errno));
        bytes_ = bytes.size();
        whats_.push_back(what);
        return;
    }
    try {
        writeAll(record(++seq_, payloadOf(what, doc, {})));
    } catch (...) {
        ::close(fd_);  // a partly written record ends the journal: start a new file next time
        fd_ = -1;
        throw;
    }
    whats_.push_back(what);
}

void EditJournal::discard() {
    if (fd_ >= 0) ::close(fd_);
    fd_ = -1;
    bytes_ = 0;
    whats_.clear();
    std::error_code ec;
    std::filesystem::remove(path_, ec);
}

std::optional<JournalRecovery> EditJournal::recover(const std::string& path) {
    std::error_code ec;
    if (!std::filesystem::is_regular_file(path, ec)) return std::nullopt;
    const auto size = std::filesystem::file_size(path, ec);
    if (ec) throw InputError(path, "", "cannot be read: " + ec.message());
    if (size > kMaxJournalBytes) throw InputError(path, "", "is " + std::to_string(size) + " bytes; a journal is at most " + std::to_string(kMaxJournalBytes));
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path, "", "cannot be read");
    std::ostringstream ss;
    ss << in.rdbuf();
    const std::string t = ss.str();
    if (t.compare(0, kHeader.size(), kHeader) != 0) return std::nullopt;
    struct Rec {
        size_t at, len;
    };
    std::vector<Rec> recs;
    std::vector<std::vector<std::string>> whats;
    size_t i = kHeader.size();
    bool torn = false;
    while (i < t.size()) {
        const size_t nl = t.find('\n', i);
        if (nl == std::string::npos || nl - i > 80 || t.compare(i, 2, "R ") != 0) { torn = true; break; }
        unsigned long long len = 0, crc = 0, seq = 0;
        if (std::sscanf(t.substr(i, nl - i).c_str(), "R %llu %llu %llu", &len, &crc, &seq) != 3) { torn = true; break; }
        const size_t at = nl + 1;
        if (len > t.size() || at + len + 1 > t.size() || t[at + len] != '\n' || crc32(t.data() + at, len) != crc) { torn = true; break; }
        try {
            const std::string payload = t.substr(at, len);
            checkJsonText(payload, path);
            const json j = json::parse(payload);
            std::vector<std::string> w;
            if (j.contains("earlier")) w = j.at("earlier").get<std::vector<std::string>>();
            w.push_back(j.at("what").get<std::string>());
            whats.push_back(std::move(w));
        } catch (const std::exception&) {
            torn = true;
            break;
        }
        recs.push_back({at, size_t(len)});
        i = at + len + 1;
    }
    // The last record whose case loads; the edits up to it.
    for (size_t k = recs.size(); k-- > 0;) {
        try {
            const json j = json::parse(t.substr(recs[k].at, recs[k].len));
            JournalRecovery r;
            r.doc = caseFromJson(j.at("case").dump(), path, "");
            r.records = k + 1;
            r.torn_tail = torn || k + 1 < recs.size();
            for (size_t m = 0; m <= k; ++m) {
                // A compacted record lists every edit before it (the whole history so far).
                if (whats[m].size() > 1) r.edits.clear();
                r.edits.insert(r.edits.end(), whats[m].begin(), whats[m].end());
            }
            return r;
        } catch (const std::exception&) {
        }
    }
    return std::nullopt;
}

std::vector<std::string> removeStaleTemporaries(const std::string& case_path) {
    std::vector<std::string> removed;
    for (const std::string& f : {case_path, autosavePath(case_path), journalPath(case_path)}) {
        const std::string tmp = f + ".saving";
        std::error_code ec;
        if (std::filesystem::is_regular_file(tmp, ec) && std::filesystem::remove(tmp, ec)) removed.push_back(tmp);
    }
    return removed;
}

}  // namespace umbra::core
