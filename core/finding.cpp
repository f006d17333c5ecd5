// SPDX-License-Identifier: MIT
#include "core/finding.h"

#include <algorithm>
#include <cctype>
#include <utility>

namespace umbra::core {
namespace {

bool blank(const std::string& s) {
    return std::all_of(s.begin(), s.end(), [](unsigned char c) { return std::isspace(c); });
}

bool wordChar(char c) {
    const auto u = static_cast<unsigned char>(c);
    return std::isalnum(u) || c == '_' || u >= 0x80;  // letters of other scripts count as word
}

// Lowercase ASCII, typographic apostrophe to ', runs of whitespace to one space.
std::string normalise(const std::string& text) {
    std::string s;
    s.reserve(text.size());
    for (size_t i = 0; i < text.size(); ++i) {
        const auto c = static_cast<unsigned char>(text[i]);
        if (c == 0xE2 && i + 2 < text.size() && static_cast<unsigned char>(text[i + 1]) == 0x80 &&
            static_cast<unsigned char>(text[i + 2]) == 0x99) {  // U+2019
            s += '\'';
            i += 2;
        } else if (std::isspace(c)) {
            if (s.empty() || s.back() != ' ') s += ' ';
        } else {
            s += static_cast<char>(std::tolower(c));
        }
    }
    return s;
}

// Hedges (words that weaken or guess instead of describing) and judgement words that do not
// belong in an indication. Common practice of descriptive reporting, no single source.
const std::vector<std::string>& hedgeList() {
    static const std::vector<std::string> list = {
        "apparent", "apparently", "appears to be", "appear to be", "seems", "seem to",
        "possible", "possibly", "probable", "probably", "likely", "unlikely", "perhaps", "maybe",
        "presumably", "presumed", "suspected", "suspect", "suspicious for", "suspicious of",
        "may be", "might be", "could be", "may represent", "might represent", "could represent",
        "suggestive of", "suggests", "suggesting", "consistent with", "compatible with",
        "cannot be excluded", "can not be excluded", "can't be excluded", "cannot be ruled out",
        "can not be ruled out", "can't be ruled out", "questionable", "significant",
        "significantly", "insignificant"};
    return list;
}

bool isJudgement(const std::string& w) {
    return w == "significant" || w == "significantly" || w == "insignificant";
}

}  // namespace

bool Indication::isDescribed() const { return !blank(description) && !blank(location); }

bool Finding::evaluationUnlocked() const {
    return interpretationUnlocked() && interpretation == Interpretation::Relevant && !blank(interpretation_reason);
}

bool Finding::evaluationApplicable() const {
    return interpretation != Interpretation::False && interpretation != Interpretation::NonRelevant;
}

std::string Finding::interpretationLockReason() const {
    if (interpretationUnlocked()) return {};
    const bool loc = !blank(indication.location), desc = !blank(indication.description);
    if (!loc && !desc) return "Locked: describe the indication first (location and description).";
    if (!loc) return "Locked: give the indication's location first.";
    return "Locked: describe what is seen first.";
}

std::string Finding::evaluationLockReason() const {
    if (evaluationUnlocked()) return {};
    if (!interpretationUnlocked())
        return "Locked: describe the indication, then interpret it, before evaluating.";
    if (interpretation == Interpretation::Unset) return "Locked: interpret the indication first.";
    if (interpretation == Interpretation::Relevant)
        return "Locked: give the reason for the interpretation first (what shows that it is relevant).";
    return "Not applicable: only relevant indications are evaluated (this one is " +
           interpretationLabel(interpretation) + ").";
}

std::vector<std::string> hedgingWordsInReason(const std::string& text) {
    static const std::vector<std::string> interpretive = {"consistent with", "compatible with", "suggestive of", "suggests",
                                                          "suggesting"};
    std::vector<std::string> out;
    for (auto& w : hedgingWords(text))
        if (std::find(interpretive.begin(), interpretive.end(), w) == interpretive.end()) out.push_back(w);
    return out;
}

std::vector<std::string> hedgingWords(const std::string& text) {
    const std::string s = normalise(text);
    std::vector<std::pair<size_t, std::string>> hits;
    for (const auto& w : hedgeList()) {
        size_t pos = 0;
        while ((pos = s.find(w, pos)) != std::string::npos) {
            const bool left_ok = pos == 0 || !wordChar(s[pos - 1]);
            const size_t end = pos + w.size();
            const bool right_ok = end >= s.size() || !wordChar(s[end]);
            if (left_ok && right_ok) {
                hits.emplace_back(pos, w);
                break;  // first appearance is enough
            }
            ++pos;
        }
    }
    // Order by position; a longer phrase starting at the same place wins ("may be" vs "may represent"
    // cannot both match at one place, but keep the rule simple and stable).
    std::sort(hits.begin(), hits.end(), [](const auto& a, const auto& b) {
        return a.first != b.first ? a.first < b.first : a.second.size() > b.second.size();
    });
    std::vector<std::string> out;
    size_t covered_until = 0;
    for (const auto& [pos, w] : hits) {
        if (!out.empty() && pos < covered_until) continue;  // inside a phrase already reported
        out.push_back(w);
        covered_until = pos + w.size();
    }
    return out;
}

std::string hedgingNote(const std::vector<std::string>& words) {
    std::vector<std::string> hedges, judgements;
    for (const auto& w : words) (isJudgement(w) ? judgements : hedges).push_back(w);
    auto quoted = [](const std::vector<std::string>& v) {
        std::string s;
        for (size_t i = 0; i < v.size(); ++i) {
            if (i) s += (i + 1 == v.size()) ? " and " : ", ";
            s += "'" + v[i] + "'";
        }
        return s;
    };
    std::string note;
    if (!hedges.empty())
        note = "Describe what is seen: " + quoted(hedges) + (hedges.size() == 1 ? " is a hedge" : " are hedges");
    if (!judgements.empty()) {
        note += note.empty() ? "Describe what is seen: " : "; ";
        note += quoted(judgements) + (judgements.size() == 1 ? " is" : " are") + " for a statistical test; give the measured value instead";
    }
    if (!note.empty()) note += ".";
    return note;
}

std::string interpretationName(Interpretation i) {
    switch (i) {
    case Interpretation::Unset: return "unset";
    case Interpretation::False: return "false";
    case Interpretation::NonRelevant: return "non-relevant";
    case Interpretation::Relevant: return "relevant";
    }
    return "unset";
}

std::optional<Interpretation> interpretationFromName(const std::string& name) {
    for (auto i : {Interpretation::Unset, Interpretation::False, Interpretation::NonRelevant,
                   Interpretation::Relevant})
        if (interpretationName(i) == name) return i;
    return std::nullopt;
}

std::string interpretationLabel(Interpretation i) {
    switch (i) {
    case Interpretation::Unset: return "not interpreted";
    case Interpretation::False: return "false (artifact)";
    case Interpretation::NonRelevant: return "non-relevant";
    case Interpretation::Relevant: return "relevant";
    }
    return "not interpreted";
}

std::string evaluationName(Evaluation e) {
    switch (e) {
    case Evaluation::Unset: return "unset";
    case Evaluation::Acceptable: return "acceptable";
    case Evaluation::Rejectable: return "rejectable";
    case Evaluation::ReferForReview: return "refer-for-review";
    }
    return "unset";
}

std::optional<Evaluation> evaluationFromName(const std::string& name) {
    for (auto e : {Evaluation::Unset, Evaluation::Acceptable, Evaluation::Rejectable,
                   Evaluation::ReferForReview})
        if (evaluationName(e) == name) return e;
    return std::nullopt;
}

std::string evaluationLabel(Evaluation e) {
    switch (e) {
    case Evaluation::Unset: return "not evaluated";
    case Evaluation::Acceptable: return "acceptable";
    case Evaluation::Rejectable: return "rejectable";
    case Evaluation::ReferForReview: return "refer for review";
    }
    return "not evaluated";
}

std::string nextFindingId(const std::vector<Finding>& existing) {
    long best = 0;
    for (const auto& f : existing) {
        const std::string& id = f.id;
        if (id.size() < 2 || id.size() > 10 || id[0] != 'F') continue;
        if (id.find_first_not_of("0123456789", 1) != std::string::npos) continue;
        best = std::max(best, std::stol(id.substr(1)));
    }
    std::string id = "F";
    id += std::to_string(best + 1);
    return id;
}

}  // namespace umbra::core
