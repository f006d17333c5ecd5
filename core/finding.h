// SPDX-License-Identifier: MIT
#pragma once
// A finding keeps three levels apart (terms as in ASTM E1316):
//   indication     — what the examination shows, described exactly (where, how deep, how big,
//                    how strong relative to a named reference, in plain descriptive words);
//   interpretation — what the indication is: false (artifact), non-relevant or relevant, with
//                    the reason;
//   evaluation     — for a relevant indication only: acceptable, rejectable or refer for
//                    review, with the criterion used.
// Editing is gated: interpretation is locked until the indication is described (description
// and location non-empty); evaluation is locked until the indication is interpreted as
// relevant (for false and non-relevant indications evaluation is not applicable). Locks gate
// editing only; values already entered are kept when a level becomes locked again.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace umbra::core {

enum class Interpretation { Unset, False, NonRelevant, Relevant };
enum class Evaluation { Unset, Acceptable, Rejectable, ReferForReview };

struct Indication {
    std::string location;           ///< where, in words, e.g. "frame 11 (y = 10.0 mm), x = 2.4 mm"
    size_t capture_index = 0;       ///< which capture of the case
    size_t frame_index = 0;         ///< which frame of that capture
    std::optional<double> x_mm;     ///< lateral position, mm (unset = not measured)
    std::optional<double> depth_mm; ///< depth below the surface, mm
    std::optional<double> length_mm;///< extent along x, mm
    std::optional<double> height_mm;///< extent along z (through-wall), mm
    std::optional<double> peak_db;  ///< peak amplitude, dB relative to `reference`
    std::string reference;          ///< what 0 dB is, e.g. "Ø2.5 mm SDH at 10 mm (reference block)"
    std::vector<std::string> measurement_ids;  ///< linked measurements (ids unique in the case)
    std::string description;        ///< plain description of what is seen

    /// True when description and location are both non-blank (whitespace does not count).
    bool isDescribed() const;
    bool operator==(const Indication&) const = default;
};

struct Finding {
    std::string id;      ///< stable, e.g. "F2" (see nextFindingId)
    int number = 0;      ///< shown to the user, 1-based
    Indication indication;
    Interpretation interpretation = Interpretation::Unset;
    std::string interpretation_reason;
    Evaluation evaluation = Evaluation::Unset;
    std::string criterion;  ///< the acceptance criterion used (code, clause, limit)

    bool interpretationUnlocked() const { return indication.isDescribed(); }
    /// Indication described AND interpreted as relevant AND a reason given for that interpretation.
    bool evaluationUnlocked() const;
    /// False for false / non-relevant indications (evaluation not applicable to them).
    bool evaluationApplicable() const;
    /// Empty when unlocked, otherwise one sentence saying what to do first.
    std::string interpretationLockReason() const;
    std::string evaluationLockReason() const;
    bool operator==(const Finding&) const = default;
};

/// Hedging words and phrases found in indication text, lowercase, in order of first appearance,
/// each once: "apparent", "apparently", "possible", "possibly", "probable", "probably", "likely",
/// "cannot be excluded", "cannot be ruled out", "suspicious for", "may represent",
/// "suggestive of", "consistent with", "appears to be", "presumably", "significant", ...
/// Whole words only ("impossible" is not "possible").
std::vector<std::string> hedgingWords(const std::string& text);
/// Hedges in an interpretation's reason: as hedgingWords, except the phrases that state an
/// interpretation and so belong in a reason ("consistent with", "compatible with", "suggestive
/// of", "suggests", "suggesting").
std::vector<std::string> hedgingWordsInReason(const std::string& text);
/// A quiet note for the user, e.g. "Describe what is seen: 'possible' is a hedge." (empty if none).
std::string hedgingNote(const std::vector<std::string>& words);

/// Stable names used in the case file: "unset", "false", "non-relevant", "relevant".
std::string interpretationName(Interpretation i);
std::optional<Interpretation> interpretationFromName(const std::string& name);
/// Display labels: "not interpreted", "false (artifact)", "non-relevant", "relevant".
std::string interpretationLabel(Interpretation i);

/// Stable names: "unset", "acceptable", "rejectable", "refer-for-review".
std::string evaluationName(Evaluation e);
std::optional<Evaluation> evaluationFromName(const std::string& name);
/// Display labels: "not evaluated", "acceptable", "rejectable", "refer for review".
std::string evaluationLabel(Evaluation e);

/// "F<n>" with n one more than the largest number used by any id of the form F<n>.
std::string nextFindingId(const std::vector<Finding>& existing);

}  // namespace umbra::core
