// SPDX-License-Identifier: MIT
// The edit journal: CRC-32 against the standard check value, records read back in order, a torn
// or corrupted tail ignored (the last intact record wins), compaction keeping the state and the
// list of edits, and stale "*.saving" temporaries removed.
#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "core/edit_journal.h"

namespace fs = std::filesystem;
using umbra::core::CaseDocument;
using umbra::core::EditJournal;

namespace {
struct TempDir {
    fs::path path;
    TempDir() {
        path = fs::temp_directory_path() /
               ("umbra_journal_" + std::to_string(::getpid()) + "_" + ::testing::UnitTest::GetInstance()->current_test_info()->name());
        fs::remove_all(path);
        fs::create_directories(path);
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
};

CaseDocument docWithTitle(const std::string& t) {
    CaseDocument d;
    d.title = t;
    d.pertinent_negatives = {"no root indication", t};
    return d;
}

// "edit 3" (appended, not concatenated: GCC 12 warns falsely on "text" + std::string).
std::string named(const char* prefix, int i) { return std::string(prefix).append(std::to_string(i)); }

std::string readAll(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}
}  // namespace

// The CRC-32 check value of "123456789" is 0xCBF43926 (CRC catalogue, "CRC-32/ISO-HDLC"; the
// same as Python's zlib.crc32(b"123456789")).
TEST(edit_journal_test, crc32_check_value) {
    EXPECT_EQ(umbra::core::crc32("123456789", 9), 0xCBF43926u);
    EXPECT_EQ(umbra::core::crc32("", 0), 0u);
}

TEST(edit_journal_test, records_read_back_in_order) {
    TempDir dir;
    const std::string path = (dir.path / "c.umbracase.journal").string();
    EXPECT_FALSE(EditJournal::recover(path).has_value());
    {
        EditJournal j(path);
        for (int i = 1; i <= 5; ++i) j.append(named("edit ", i), docWithTitle(named("t", i)));
    }
    const auto r = EditJournal::recover(path);
    ASSERT_TRUE(r.has_value());
    EXPECT_EQ(r->records, 5u);
    EXPECT_FALSE(r->torn_tail);
    EXPECT_EQ(r->doc, docWithTitle("t5"));
    ASSERT_EQ(r->edits.size(), 5u);
    EXPECT_EQ(r->edits.front(), "edit 1");
    EXPECT_EQ(r->edits.back(), "edit 5");
}

TEST(edit_journal_test, torn_or_corrupted_tail_is_ignored) {
    TempDir dir;
    const fs::path path = dir.path / "c.umbracase.journal";
    {
        EditJournal j(path.string());
        for (int i = 1; i <= 3; ++i) j.append(named("edit ", i), docWithTitle(named("t", i)));
    }
    const std::string full = readAll(path);
    // Every cut inside the last record leaves the state after edit 2.
    const size_t last = full.rfind("\nR ") + 1;
    for (size_t cut = last; cut < full.size(); cut += 7) {
        std::ofstream(path, std::ios::binary | std::ios::trunc) << full.substr(0, cut);
        const auto r = EditJournal::recover(path.string());
        ASSERT_TRUE(r.has_value()) << cut;
        EXPECT_EQ(r->doc, docWithTitle("t2")) << cut;
        EXPECT_EQ(r->edits.size(), 2u) << cut;
    }
    // One flipped byte inside the last record's payload: its CRC no longer matches.
    std::string bad = full;
    bad[full.size() - 10] ^= 0x20;
    std::ofstream(path, std::ios::binary | std::ios::trunc) << bad;
    const auto r = EditJournal::recover(path.string());
    ASSERT_TRUE(r.has_value());
    EXPECT_EQ(r->doc, docWithTitle("t2"));
    EXPECT_TRUE(r->torn_tail);
    // Not a journal at all.
    std::ofstream(path, std::ios::binary | std::ios::trunc) << "{\"format\": \"umbracase\"}";
    EXPECT_FALSE(EditJournal::recover(path.string()).has_value());
}

TEST(edit_journal_test, compaction_keeps_state_and_edit_list) {
    TempDir dir;
    const std::string path = (dir.path / "c.umbracase.journal").string();
    CaseDocument big;
    big.background = std::string(300000, 'b');  // 300 kB per record: compaction after about 28 edits
    int n = 0;
    {
        EditJournal j(path);
        for (n = 1; n <= 40; ++n) {
            big.title = named("t", n);
            j.append(named("edit ", n), big);
        }
    }
    --n;
    EXPECT_LT(fs::file_size(path), EditJournal::kCompactBytes + 2 * 400000);
    const auto r = EditJournal::recover(path);
    ASSERT_TRUE(r.has_value());
    EXPECT_EQ(r->doc, big);
    ASSERT_EQ(r->edits.size(), size_t(n));
    for (int i = 0; i < n; ++i) EXPECT_EQ(r->edits[size_t(i)], named("edit ", i + 1));
}

TEST(edit_journal_test, discard_removes_the_file_and_stale_temporaries_are_cleaned) {
    TempDir dir;
    const std::string case_path = (dir.path / "c.umbracase").string();
    EXPECT_EQ(umbra::core::journalPath(case_path), case_path + ".journal");
    {
        EditJournal j(umbra::core::journalPath(case_path));
        j.append("edit", docWithTitle("t"));
        EXPECT_TRUE(fs::exists(j.path()));
        j.discard();
        EXPECT_FALSE(fs::exists(j.path()));
    }
    for (const std::string& f : {case_path + ".saving", case_path + ".autosave.saving", case_path + ".journal.saving"})
        std::ofstream(f) << "half written";
    const auto removed = umbra::core::removeStaleTemporaries(case_path);
    EXPECT_EQ(removed.size(), 3u);
    for (const auto& e : fs::directory_iterator(dir.path)) ADD_FAILURE() << "left: " << e.path();
}
