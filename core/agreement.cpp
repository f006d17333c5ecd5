// SPDX-License-Identifier: MIT
#include "core/agreement.h"

#include <algorithm>
#include <cstdio>
#include <cmath>
#include <limits>
#include <map>
#include <numeric>
#include <set>

#include <nlohmann/json.hpp>

#include "core/error.h"
#include "core/uncertainty.h"

namespace umbra::core {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

void checkSquare(const ConfusionMatrix& m) {
    const size_t k = m.labels.size();
    if (k == 0) throw SettingError("confusion matrix: no categories");
    if (m.counts.size() != k) throw SettingError("confusion matrix: rows do not match the labels");
    for (const auto& row : m.counts) {
        if (row.size() != k) throw SettingError("confusion matrix: not square");
        for (double c : row)
            if (!std::isfinite(c) || c < 0) throw SettingError("confusion matrix: counts must be finite and ≥ 0");
    }
}

double mean(const std::vector<double>& v) {
    return v.empty() ? 0.0 : std::accumulate(v.begin(), v.end(), 0.0) / static_cast<double>(v.size());
}

}  // namespace

double ConfusionMatrix::total() const {
    double t = 0;
    for (const auto& row : counts)
        for (double c : row) t += c;
    return t;
}

CohenKappaResult cohenKappa(const ConfusionMatrix& m, double z) {
    checkSquare(m);
    const size_t k = m.labels.size();
    CohenKappaResult r;
    r.n = m.total();
    if (r.n <= 0) {
        r.kappa = r.se = r.ci_low = r.ci_high = r.observed = r.expected = kNaN;
        return r;
    }
    std::vector<double> row(k, 0.0), col(k, 0.0);
    std::vector<std::vector<double>> p(k, std::vector<double>(k, 0.0));
    for (size_t i = 0; i < k; ++i)
        for (size_t j = 0; j < k; ++j) {
            p[i][j] = m.counts[i][j] / r.n;
            row[i] += p[i][j];
            col[j] += p[i][j];
        }
    for (size_t i = 0; i < k; ++i) {
        r.observed += p[i][i];
        r.expected += row[i] * col[i];
    }
    if (1.0 - r.expected <= 1e-15) {
        r.kappa = r.se = r.ci_low = r.ci_high = kNaN;
        return r;
    }
    const double kappa = (r.observed - r.expected) / (1.0 - r.expected);
    r.kappa = kappa;
    // Fleiss, Cohen & Everitt (1969), large-sample variance of kappa (not under H0):
    // [Σ p_ii (1 − (p_i. + p_.i)(1 − κ))² + (1 − κ)² Σ_{i≠j} p_ij (p_.i + p_j.)² − (κ − p_e(1 − κ))²]
    //   / (n (1 − p_e)²)
    double a = 0, b = 0;
    for (size_t i = 0; i < k; ++i) {
        const double t = 1.0 - (row[i] + col[i]) * (1.0 - kappa);
        a += p[i][i] * t * t;
        for (size_t j = 0; j < k; ++j)
            if (i != j) b += p[i][j] * (col[i] + row[j]) * (col[i] + row[j]);
    }
    b *= (1.0 - kappa) * (1.0 - kappa);
    const double c = kappa - r.expected * (1.0 - kappa);
    const double var = (a + b - c * c) / (r.n * (1.0 - r.expected) * (1.0 - r.expected));
    r.se = std::sqrt(std::max(0.0, var));
    r.ci_low = kappa - z * r.se;
    r.ci_high = kappa + z * r.se;
    return r;
}

ConfusionMatrix confusionMatrix(const std::vector<std::string>& a, const std::vector<std::string>& b,
                                const std::vector<std::string>& labels) {
    if (a.size() != b.size()) throw SettingError("confusion matrix: the two rating lists differ in length");
    ConfusionMatrix m;
    m.labels = labels;
    m.counts.assign(labels.size(), std::vector<double>(labels.size(), 0.0));
    auto index = [&](const std::string& s) {
        auto it = std::find(labels.begin(), labels.end(), s);
        if (it == labels.end()) throw SettingError("confusion matrix: unknown category \"" + s + "\"");
        return static_cast<size_t>(it - labels.begin());
    };
    for (size_t i = 0; i < a.size(); ++i) m.counts[index(a[i])][index(b[i])] += 1;
    return m;
}

FleissKappaResult fleissKappa(const std::vector<std::vector<double>>& table) {
    FleissKappaResult r;
    r.subjects = table.size();
    if (table.empty() || table.front().empty()) throw SettingError("Fleiss' kappa: empty table");
    const size_t k = table.front().size();
    double m = -1;
    for (const auto& row : table) {
        if (row.size() != k) throw SettingError("Fleiss' kappa: rows differ in the number of categories");
        double s = 0;
        for (double c : row) {
            if (!std::isfinite(c) || c < 0) throw SettingError("Fleiss' kappa: counts must be finite and ≥ 0");
            s += c;
        }
        if (m < 0) m = s;
        else if (std::abs(s - m) > 1e-9) throw SettingError("Fleiss' kappa: every subject needs the same number of ratings");
    }
    if (m < 2) throw SettingError("Fleiss' kappa: at least two ratings per subject are needed");
    r.raters = static_cast<size_t>(std::llround(m));
    const double N = static_cast<double>(table.size());
    r.category_share.assign(k, 0.0);
    double pbar = 0;
    for (const auto& row : table) {
        double sq = 0;
        for (size_t j = 0; j < k; ++j) {
            r.category_share[j] += row[j];
            sq += row[j] * row[j];
        }
        pbar += (sq - m) / (m * (m - 1));
    }
    for (double& p : r.category_share) p /= N * m;
    r.observed = pbar / N;
    double pq = 0, pqqp = 0;
    for (double p : r.category_share) {
        r.expected += p * p;
        pq += p * (1 - p);
        pqqp += p * (1 - p) * ((1 - p) - p);
    }
    if (1.0 - r.expected <= 1e-15) {
        r.kappa = r.se0 = kNaN;
        return r;
    }
    r.kappa = (r.observed - r.expected) / (1.0 - r.expected);
    // Fleiss, Nee & Landis (1979): var0 = 2 / (N m (m−1)) · [(Σpq)² − Σ pq(q − p)] / (Σpq)².
    const double var0 = 2.0 / (N * m * (m - 1)) * (pq * pq - pqqp) / (pq * pq);
    r.se0 = std::sqrt(std::max(0.0, var0));
    return r;
}

BlandAltmanResult blandAltman(const std::vector<double>& a, const std::vector<double>& b, double z) {
    if (a.size() != b.size()) throw SettingError("Bland–Altman: the two lists differ in length");
    BlandAltmanResult r;
    r.n = a.size();
    r.factor = z;
    for (size_t i = 0; i < a.size(); ++i) {
        if (!std::isfinite(a[i]) || !std::isfinite(b[i])) throw SettingError("Bland–Altman: values must be finite");
        r.means.push_back((a[i] + b[i]) / 2);
        r.differences.push_back(a[i] - b[i]);
    }
    if (r.n == 0) return r;
    r.bias = mean(r.differences);
    if (r.n >= 2) {
        double ss = 0;
        for (double d : r.differences) ss += (d - r.bias) * (d - r.bias);
        r.sd = std::sqrt(ss / static_cast<double>(r.n - 1));
    }
    r.loa_low = r.bias - z * r.sd;
    r.loa_high = r.bias + z * r.sd;
    if (r.n >= 2) {
        const double n = static_cast<double>(r.n);
        r.bias_ci_half = kZ95 * r.sd / std::sqrt(n);
        r.loa_ci_half = kZ95 * std::sqrt(3.0 * r.sd * r.sd / n);
    }
    return r;
}

std::vector<std::string> interpretationLabels() {
    std::vector<std::string> v;
    for (auto i : {Interpretation::Unset, Interpretation::False, Interpretation::NonRelevant, Interpretation::Relevant})
        v.push_back(interpretationName(i));
    return v;
}

std::vector<std::string> evaluationLabels() {
    std::vector<std::string> v;
    for (auto e : {Evaluation::Unset, Evaluation::Acceptable, Evaluation::Rejectable, Evaluation::ReferForReview})
        v.push_back(evaluationName(e));
    return v;
}

namespace {

std::vector<ReaderIndication> indicationsOf(const CaseDocument& c, size_t reader) {
    std::vector<ReaderIndication> out;
    for (size_t f = 0; f < c.findings.size(); ++f) {
        const Finding& fi = c.findings[f];
        ReaderIndication ri;
        ri.reader = reader;
        ri.finding = f;
        ri.id = fi.id;
        if (fi.indication.capture_index < c.captures.size()) ri.capture_sha256 = c.captures[fi.indication.capture_index].sha256;
        ri.frame = fi.indication.frame_index;
        ri.x_mm = fi.indication.x_mm;
        ri.depth_mm = fi.indication.depth_mm;
        ri.length_mm = fi.indication.length_mm;
        ri.height_mm = fi.indication.height_mm;
        ri.interpretation = interpretationName(fi.interpretation);
        ri.evaluation = evaluationName(fi.evaluation);
        out.push_back(std::move(ri));
    }
    return out;
}

bool located(const ReaderIndication& r) {
    return r.x_mm && r.depth_mm && std::isfinite(*r.x_mm) && std::isfinite(*r.depth_mm) && !r.capture_sha256.empty();
}

KappaSummary kappaOver(const std::vector<IndicationGroup>& complete, size_t readers, const std::vector<std::string>& labels,
                       bool interpretation) {
    KappaSummary s;
    auto rating = [&](const ReaderIndication& r) { return interpretation ? r.interpretation : r.evaluation; };
    s.confusion.labels = labels;
    s.confusion.counts.assign(labels.size(), std::vector<double>(labels.size(), 0.0));
    for (size_t a = 0; a < readers; ++a)
        for (size_t b = a + 1; b < readers; ++b) {
            std::vector<std::string> ra, rb;
            for (const auto& g : complete) {
                ra.push_back(rating(g.members[a]));
                rb.push_back(rating(g.members[b]));
            }
            ConfusionMatrix m = confusionMatrix(ra, rb, labels);
            for (size_t i = 0; i < labels.size(); ++i)
                for (size_t j = 0; j < labels.size(); ++j) s.confusion.counts[i][j] += m.counts[i][j];
        }
    if (complete.empty()) return s;
    if (readers == 2) {
        s.cohen = cohenKappa(s.confusion);
    } else {
        std::vector<std::vector<double>> table;
        for (const auto& g : complete) {
            std::vector<double> row(labels.size(), 0.0);
            for (const auto& m : g.members) {
                auto it = std::find(labels.begin(), labels.end(), rating(m));
                row[static_cast<size_t>(it - labels.begin())] += 1;
            }
            table.push_back(row);
        }
        s.fleiss = fleissKappa(table);
    }
    return s;
}

}  // namespace

AgreementResult compareCases(const std::vector<CaseDocument>& cases, const std::vector<std::string>& names,
                             double distance_mm) {
    if (cases.size() < 2) throw SettingError("agreement needs at least two cases");
    if (names.size() != cases.size()) throw SettingError("agreement: one name per case is needed");
    if (!(distance_mm > 0) || !std::isfinite(distance_mm)) throw SettingError("agreement: the match distance must be > 0 mm");
    auto shaSet = [](const CaseDocument& c) {
        std::set<std::string> s;
        for (const auto& cap : c.captures) s.insert(cap.sha256);
        return s;
    };
    const auto first = shaSet(cases.front());
    for (size_t i = 1; i < cases.size(); ++i)
        if (shaSet(cases[i]) != first)
            throw InputError(names[i], "captures",
                             "not on the same captures as " + names.front() +
                                 " (the SHA-256 of the captures differ); agreement compares readings of the same data");

    AgreementResult r;
    r.readers = names;
    r.match_distance_mm = distance_mm;
    const size_t R = cases.size();
    std::vector<ReaderIndication> all;
    for (size_t i = 0; i < R; ++i) {
        auto v = indicationsOf(cases[i], i);
        all.insert(all.end(), v.begin(), v.end());
    }
    // Candidate pairs, closest first; union into groups with at most one indication per reader.
    struct Pair {
        double d;
        size_t a, b;
    };
    std::vector<Pair> pairs;
    for (size_t a = 0; a < all.size(); ++a)
        for (size_t b = a + 1; b < all.size(); ++b) {
            const auto &A = all[a], &B = all[b];
            if (A.reader == B.reader || !located(A) || !located(B)) continue;
            if (A.capture_sha256 != B.capture_sha256 || A.frame != B.frame) continue;
            const double d = std::hypot(*A.x_mm - *B.x_mm, *A.depth_mm - *B.depth_mm);
            if (d <= distance_mm) pairs.push_back({d, a, b});
        }
    std::stable_sort(pairs.begin(), pairs.end(), [](const Pair& x, const Pair& y) { return x.d < y.d; });
    std::vector<size_t> group(all.size());
    std::iota(group.begin(), group.end(), 0);
    std::vector<std::set<size_t>> readers_in(all.size());
    for (size_t i = 0; i < all.size(); ++i) readers_in[i].insert(all[i].reader);
    auto find = [&](size_t i) {
        while (group[i] != i) i = group[i] = group[group[i]];
        return i;
    };
    for (const auto& p : pairs) {
        size_t ga = find(p.a), gb = find(p.b);
        if (ga == gb) continue;
        bool clash = false;
        for (size_t rd : readers_in[gb])
            if (readers_in[ga].count(rd)) clash = true;
        if (clash) continue;
        group[gb] = ga;
        readers_in[ga].insert(readers_in[gb].begin(), readers_in[gb].end());
    }
    std::map<size_t, IndicationGroup> by_root;
    std::vector<size_t> order;
    for (size_t i = 0; i < all.size(); ++i) {
        size_t g = find(i);
        if (!by_root.count(g)) order.push_back(g);
        by_root[g].members.push_back(all[i]);
    }
    std::vector<IndicationGroup> complete;
    for (size_t g : order) {
        IndicationGroup& G = by_root[g];
        std::stable_sort(G.members.begin(), G.members.end(),
                         [](const ReaderIndication& x, const ReaderIndication& y) { return x.reader < y.reader; });
        G.complete = G.members.size() == R;
        if (G.complete) {
            ++r.matched;
            complete.push_back(G);
        } else {
            ++r.unmatched;
        }
        r.groups.push_back(G);
    }
    r.interpretation = kappaOver(complete, R, interpretationLabels(), true);
    r.evaluation = kappaOver(complete, R, evaluationLabels(), false);
    for (int q = 0; q < 2; ++q) {
        std::vector<double> later, first_reader;
        for (const auto& g : complete) {
            const auto& ref = q == 0 ? g.members[0].length_mm : g.members[0].height_mm;
            if (!ref || !std::isfinite(*ref)) continue;
            for (size_t i = 1; i < R; ++i) {
                const auto& v = q == 0 ? g.members[i].length_mm : g.members[i].height_mm;
                if (!v || !std::isfinite(*v)) continue;
                later.push_back(*v);
                first_reader.push_back(*ref);
            }
        }
        if (!later.empty()) r.sizes.push_back({q == 0 ? "length" : "height", blandAltman(later, first_reader)});
    }
    return r;
}

namespace {

std::string num(double v, double u) {
    if (!std::isfinite(v)) return "n/a";
    auto rr = roundToUncertainty(v, u);
    return rr.value_text;
}

/// A stated setting or a position copied from a finding (already rounded there): shortest form.
std::string plain(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4g", v);
    return buf;
}

std::string countText(double c) { return std::to_string(static_cast<long long>(std::llround(c))); }

ReportTable confusionTable(const std::string& caption, const ConfusionMatrix& m, const std::string& row_reader,
                           const std::string& col_reader) {
    ReportTable t;
    t.caption = caption;
    t.header.push_back(row_reader + " \\ " + col_reader);
    for (const auto& l : m.labels) t.header.push_back(l);
    t.header.push_back("total");
    std::vector<double> colsum(m.labels.size(), 0.0);
    for (size_t i = 0; i < m.labels.size(); ++i) {
        std::vector<std::string> row{m.labels[i]};
        double s = 0;
        for (size_t j = 0; j < m.labels.size(); ++j) {
            row.push_back(countText(m.counts[i][j]));
            s += m.counts[i][j];
            colsum[j] += m.counts[i][j];
        }
        row.push_back(countText(s));
        t.rows.push_back(row);
    }
    std::vector<std::string> last{"total"};
    for (double c : colsum) last.push_back(countText(c));
    last.push_back(countText(m.total()));
    t.rows.push_back(last);
    return t;
}

}  // namespace

std::string formatBlandAltman(const BlandAltmanResult& r, const std::string& unit) {
    if (r.n == 0) return "no pairs";
    auto pm = [&](double v, double h) {
        if (!(h > 0)) return num(v, std::max(1e-3, std::abs(v) * 1e-3)) + " " + unit;
        const auto rr = roundToUncertainty(v, h);
        return rr.value_text + " ± " + rr.uncertainty_text + " " + unit;
    };
    return "bias " + pm(r.bias, r.bias_ci_half) + ", 95 % limits of agreement " + pm(r.loa_low, r.loa_ci_half) + " to " +
           pm(r.loa_high, r.loa_ci_half) + " (n = " + std::to_string(r.n) + ")";
}

std::string formatKappa(const CohenKappaResult& k) {
    if (!std::isfinite(k.kappa)) return "not defined (all ratings in one category, or none)";
    const double half = (k.ci_high - k.ci_low) / 2;
    return "Cohen's κ " + num(k.kappa, half / 2) + " (95 % CI " + num(k.ci_low, half / 2) + " to " +
           num(k.ci_high, half / 2) + ", n = " + countText(k.n) + ")";
}

std::string formatKappa(const FleissKappaResult& k) {
    if (!std::isfinite(k.kappa)) return "not defined (all ratings in one category)";
    return "Fleiss' κ " + num(k.kappa, k.se0) + " (SE under κ = 0: " + num(k.se0, k.se0) + ", " +
           std::to_string(k.subjects) + " indications, " + std::to_string(k.raters) + " readers)";
}

ReportSection agreementReportSection(const AgreementResult& r) {
    ReportSection s;
    s.title = "Inter-reader agreement";
    std::string readers;
    for (size_t i = 0; i < r.readers.size(); ++i) readers += (i ? ", " : "") + ("reader " + std::to_string(i + 1) + " = " + r.readers[i]);
    s.paragraphs.push_back(readers + ".");
    s.paragraphs.push_back("Indications match when they lie on the same capture (SHA-256) and frame with centres within " +
                           plain(r.match_distance_mm) + " mm. Found by every reader: " + std::to_string(r.matched) +
                           "; found by some readers only: " + std::to_string(r.unmatched) + ".");
    const std::string a = r.readers.size() == 2 ? "reader 1" : "reader i";
    const std::string b = r.readers.size() == 2 ? "reader 2" : "reader j > i";
    for (int which = 0; which < 2; ++which) {
        const KappaSummary& k = which == 0 ? r.interpretation : r.evaluation;
        const std::string what = which == 0 ? "Interpretation" : "Evaluation";
        const std::string table_what = which == 0 ? "Interpretation class" : "Evaluation outcome";
        std::string line = what + ": ";
        if (k.cohen) line += formatKappa(*k.cohen);
        else if (k.fleiss) line += formatKappa(*k.fleiss);
        else line += "no indication found by every reader";
        s.paragraphs.push_back(line + ".");
        s.tables.push_back(confusionTable(table_what + ", matched indications" +
                                              (r.readers.size() > 2 ? " (summed over reader pairs)" : ""),
                                          k.confusion, a, b));
    }
    for (const auto& sz : r.sizes)
        s.paragraphs.push_back("Size (" + sz.quantity + ", later reader − reader 1; Bland & Altman 1986): " +
                               formatBlandAltman(sz.ba, "mm") + ".");
    ReportTable un;
    un.caption = "Indications found by some readers only";
    un.header = {"readers", "findings", "capture frame", "x (mm)", "depth (mm)"};
    for (const auto& g : r.groups) {
        if (g.complete) continue;
        std::string rd, ids;
        for (const auto& m : g.members) {
            rd += (rd.empty() ? "" : ", ") + std::to_string(m.reader + 1);
            ids += (ids.empty() ? "" : ", ") + m.id;
        }
        const auto& m0 = g.members.front();
        un.rows.push_back({rd, ids, std::to_string(m0.frame), m0.x_mm ? plain(*m0.x_mm) : "—",
                           m0.depth_mm ? plain(*m0.depth_mm) : "—"});
    }
    s.tables.push_back(un);
    return s;
}

std::string agreementToJson(const AgreementResult& r) {
    using nlohmann::json;
    auto finite = [](double v) { return std::isfinite(v) ? json(v) : json(nullptr); };
    json j = json::object();
    j["readers"] = r.readers.size();
    j["reader_names"] = r.readers;
    j["match_distance_mm"] = r.match_distance_mm;
    j["matched"] = r.matched;
    j["unmatched"] = r.unmatched;
    for (int which = 0; which < 2; ++which) {
        const KappaSummary& k = which == 0 ? r.interpretation : r.evaluation;
        json o = json::object();
        if (k.cohen) {
            o["cohen_kappa"] = finite(k.cohen->kappa);
            o["ci95"] = json::array({finite(k.cohen->ci_low), finite(k.cohen->ci_high)});
            o["se"] = finite(k.cohen->se);
            o["observed_agreement"] = finite(k.cohen->observed);
            o["chance_agreement"] = finite(k.cohen->expected);
        }
        if (k.fleiss) {
            o["fleiss_kappa"] = finite(k.fleiss->kappa);
            o["se0"] = finite(k.fleiss->se0);
            o["observed_agreement"] = finite(k.fleiss->observed);
            o["chance_agreement"] = finite(k.fleiss->expected);
        }
        json conf = json::object();
        conf["labels"] = k.confusion.labels;
        conf["matrix"] = k.confusion.counts;
        conf["rows"] = r.readers.size() == 2 ? "reader 1" : "reader i (summed over pairs i < j)";
        o["confusion"] = conf;
        j[which == 0 ? "interpretation" : "evaluation"] = o;
    }
    json sizes = json::object();
    for (const auto& s : r.sizes) {
        json q = {{"n", s.ba.n},
                  {"bias_mm", s.ba.bias},
                  {"sd_mm", s.ba.sd},
                  {"limits_of_agreement_mm", json::array({s.ba.loa_low, s.ba.loa_high})},
                  {"difference", "later reader - reader 1"}};
        if (s.quantity == "length" || sizes.empty()) {
            for (auto it = q.begin(); it != q.end(); ++it) sizes[it.key()] = it.value();
            sizes["quantity"] = s.quantity;
        }
        sizes[s.quantity] = q;
    }
    if (!r.sizes.empty()) j["sizes"] = sizes;
    json groups = json::array();
    for (const auto& g : r.groups) {
        json members = json::array();
        for (const auto& m : g.members)
            members.push_back({{"reader", m.reader + 1},
                               {"finding", m.id},
                               {"frame", m.frame},
                               {"x_mm", m.x_mm ? json(*m.x_mm) : json(nullptr)},
                               {"depth_mm", m.depth_mm ? json(*m.depth_mm) : json(nullptr)},
                               {"interpretation", m.interpretation},
                               {"evaluation", m.evaluation}});
        groups.push_back({{"complete", g.complete}, {"members", members}});
    }
    j["groups"] = groups;
    return j.dump(2) + "\n";
}

}  // namespace umbra::core
