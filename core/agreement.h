// SPDX-License-Identifier: MIT
#pragma once
// Inter-reader agreement. No Qt.
//  * Cohen's kappa for two readers (Cohen 1960, Educ. Psychol. Meas. 20:37-46) with the
//    large-sample standard error of Fleiss, Cohen & Everitt 1969 (Psychol. Bull. 72:323-327)
//    and a 95 % interval kappa ± 1.96·SE;
//  * Fleiss' kappa for three or more readers rating every subject (Fleiss 1971, Psychol. Bull.
//    76:378-382);
//  * Bland–Altman bias and 95 % limits of agreement (Bland & Altman 1986, Lancet i:307-310),
//    bias ± 1.96·SD of the differences (the paper rounds the factor to 2).
// Cases read by several readers on the same captures are compared indication by indication:
// indications match when they lie on the same capture (SHA-256) and frame and their centres
// (x, depth) are within kMatchDistanceMm of each other. See docs/agreement.md.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "core/case_file.h"

namespace umbra::core {

/// Two indication centres (x, depth) closer than this on the same capture and frame match, mm.
inline constexpr double kMatchDistanceMm = 3.0;
/// Two-sided 95 % standard normal quantile.
inline constexpr double kZ95 = 1.959963984540054;

/// Counts of subjects by reader A's category (rows) and reader B's (columns).
struct ConfusionMatrix {
    std::vector<std::string> labels;
    std::vector<std::vector<double>> counts;  ///< [row: reader A][column: reader B]
    double total() const;
};

struct CohenKappaResult {
    double kappa = 0;      ///< NaN when chance agreement is 1 (every rating in one category)
    double observed = 0;   ///< p_o, proportion of agreement
    double expected = 0;   ///< p_e, agreement expected by chance from the margins
    double se = 0;         ///< large-sample standard error (Fleiss, Cohen & Everitt 1969), not under H0
    double ci_low = 0, ci_high = 0;  ///< kappa ± z·se
    double n = 0;          ///< number of subjects
};
/// Cohen's kappa of a square confusion matrix. Throws SettingError for a non-square or empty
/// matrix or negative counts. `z` is the normal quantile of the interval (1.96 for 95 %).
CohenKappaResult cohenKappa(const ConfusionMatrix& m, double z = kZ95);
/// The confusion matrix of two paired rating lists over `labels` (ratings not in `labels` are
/// a SettingError).
ConfusionMatrix confusionMatrix(const std::vector<std::string>& a, const std::vector<std::string>& b,
                                const std::vector<std::string>& labels);

struct FleissKappaResult {
    double kappa = 0;       ///< NaN when P̄e = 1
    double observed = 0;    ///< P̄, mean agreement per subject
    double expected = 0;    ///< P̄e = Σ p_j²
    std::vector<double> category_share;  ///< p_j, share of all ratings in category j
    double se0 = 0;         ///< standard error under the hypothesis kappa = 0 (Fleiss 1971 eq. 13 as corrected by Fleiss, Nee & Landis 1979)
    size_t subjects = 0, raters = 0;
};
/// Fleiss' kappa of a subjects × categories table of counts (n_ij = readers who put subject i
/// in category j; every row sums to the same number of readers, at least 2). SettingError
/// otherwise.
FleissKappaResult fleissKappa(const std::vector<std::vector<double>>& table);

struct BlandAltmanResult {
    size_t n = 0;
    double bias = 0;        ///< mean difference (a − b)
    double sd = 0;          ///< standard deviation of the differences (n − 1)
    double loa_low = 0, loa_high = 0;  ///< bias ∓ z·sd
    double factor = kZ95;   ///< z used for the limits
    std::vector<double> means, differences;  ///< per pair: (a + b)/2 and a − b
    /// Half-widths of the 95 % intervals (normal approximation, Bland & Altman 1986): of the
    /// bias 1.96·s/√n, of each limit 1.96·√(3s²/n). 0 for fewer than two pairs.
    double bias_ci_half = 0, loa_ci_half = 0;
};
/// Bland–Altman analysis of paired values (same unit). SettingError when sizes differ or a value
/// is not finite; fewer than two pairs give sd = 0 and limits equal to the bias.
BlandAltmanResult blandAltman(const std::vector<double>& a, const std::vector<double>& b, double z = kZ95);

/// One reader's indication as the matcher sees it.
struct ReaderIndication {
    size_t reader = 0;          ///< index of the case
    size_t finding = 0;         ///< index into that case's findings
    std::string id;             ///< finding id, e.g. "F2"
    std::string capture_sha256;
    size_t frame = 0;
    std::optional<double> x_mm, depth_mm, length_mm, height_mm;
    std::string interpretation; ///< stable name (interpretationName)
    std::string evaluation;     ///< stable name (evaluationName)
};

/// A group of indications taken to be the same thing: at most one per reader.
struct IndicationGroup {
    std::vector<ReaderIndication> members;  ///< ordered by reader
    bool complete = false;                  ///< every reader has one
};

struct KappaSummary {
    ConfusionMatrix confusion;     ///< two readers: A × B; more: summed over every reader pair (i < j)
    std::optional<CohenKappaResult> cohen;   ///< exactly two readers
    std::optional<FleissKappaResult> fleiss; ///< three or more
};

struct SizeAgreement {
    std::string quantity;          ///< "length" or "height"
    BlandAltmanResult ba;          ///< later reader − reader 1, pooled over readers 2..n
};

struct AgreementResult {
    std::vector<std::string> readers;   ///< one name per case (its file name; never a person's name)
    double match_distance_mm = kMatchDistanceMm;
    std::vector<IndicationGroup> groups;
    size_t matched = 0;                 ///< groups found by every reader
    size_t unmatched = 0;               ///< groups found by some readers only (unlocated indications included)
    KappaSummary interpretation, evaluation;
    std::vector<SizeAgreement> sizes;   ///< length and height when at least one complete group has them
};

/// Compares the findings of two or more cases on the same captures. `names` label the readers
/// (e.g. the case file names). Throws InputError naming the case when its set of capture SHA-256
/// differs from the first case's, SettingError for fewer than two cases.
/// Matching: every pair of indications of different readers on the same capture and frame whose
/// centres lie within `distance_mm` is a candidate; candidates are joined closest first into
/// groups that hold at most one indication per reader. Indications without x or depth are never
/// matched.
AgreementResult compareCases(const std::vector<CaseDocument>& cases, const std::vector<std::string>& names,
                             double distance_mm = kMatchDistanceMm);

/// Labels of the kappa tables, in order: interpretations, evaluations (stable names).
std::vector<std::string> interpretationLabels();
std::vector<std::string> evaluationLabels();

/// Plain table for reports.
struct ReportTable {
    std::string caption;
    std::vector<std::string> header;
    std::vector<std::vector<std::string>> rows;
};
/// The agreement section of a report as plain data (title, paragraphs, tables); numbers rounded
/// to their uncertainty.
struct ReportSection {
    std::string title;
    std::vector<std::string> paragraphs;
    std::vector<ReportTable> tables;
};
ReportSection agreementReportSection(const AgreementResult& r);

/// JSON text of the result (see docs/agreement.md): readers, matched, unmatched, interpretation,
/// evaluation, sizes, groups.
std::string agreementToJson(const AgreementResult& r);

/// "bias −0.12 ± 0.10 mm, 95 % limits of agreement −0.9 ± 0.2 to 0.7 ± 0.2 mm (n = 12)": each
/// number with its 95 % interval half-width, rounded to it (GUM 7.2.6).
std::string formatBlandAltman(const BlandAltmanResult& r, const std::string& unit);

/// Kappa with its interval as text: "0.68 (95 % CI 0.52 to 0.83)"; "not defined (…)" for NaN.
std::string formatKappa(const CohenKappaResult& k);
std::string formatKappa(const FleissKappaResult& k);

}  // namespace umbra::core
