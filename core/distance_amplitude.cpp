// SPDX-License-Identifier: MIT
#include "core/distance_amplitude.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "core/error.h"
#include "core/sha256.h"

namespace umbra::core {
namespace {

/// Depths closer than this are one depth (1 nm: far below any pixel).
constexpr double kSameDepthM = 1e-9;

/// (depth m, level dB) per distinct depth, in depth order; equal depths averaged in dB.
std::vector<std::pair<double, double>> levels(const DistanceAmplitudeCurve& c) {
    std::vector<std::pair<double, double>> pts;
    for (const auto& p : c.points)
        if (p.amplitude > 0 && std::isfinite(p.depth_m)) pts.emplace_back(p.depth_m, 20.0 * std::log10(p.amplitude));
    std::stable_sort(pts.begin(), pts.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
    std::vector<std::pair<double, double>> out;
    for (size_t i = 0; i < pts.size();) {
        size_t j = i;
        double sum = 0;
        while (j < pts.size() && pts[j].first - pts[i].first <= kSameDepthM) sum += pts[j++].second;
        out.emplace_back(pts[i].first, sum / static_cast<double>(j - i));
        i = j;
    }
    return out;
}

}  // namespace

const char* basisName(AmplitudeBasis b) { return b == AmplitudeBasis::BeforeTcg ? "before TCG" : "after TCG"; }

std::optional<AmplitudeBasis> basisFromName(const std::string& name) {
    if (name == "before TCG") return AmplitudeBasis::BeforeTcg;
    if (name == "after TCG") return AmplitudeBasis::AfterTcg;
    return std::nullopt;
}

std::optional<DacLevel> dacLevel(const DistanceAmplitudeCurve& c, double depth_m) {
    const auto pts = levels(c);
    if (pts.empty() || !std::isfinite(depth_m)) return std::nullopt;
    DacLevel l;
    if (depth_m < pts.front().first - kSameDepthM) return DacLevel{pts.front().second, true};
    if (depth_m > pts.back().first + kSameDepthM) return DacLevel{pts.back().second, true};
    if (pts.size() == 1 || depth_m <= pts.front().first) return DacLevel{pts.front().second, false};
    if (depth_m >= pts.back().first) return DacLevel{pts.back().second, false};
    size_t k = 1;
    while (pts[k].first < depth_m) ++k;
    const auto& [z0, l0] = pts[k - 1];
    const auto& [z1, l1] = pts[k];
    l.level_db = l0 + (depth_m - z0) / (z1 - z0) * (l1 - l0);
    return l;
}

std::optional<DacReading> dbReCurve(const DistanceAmplitudeCurve& c, double amplitude, double depth_m) {
    if (!(amplitude > 0) || !std::isfinite(amplitude)) return std::nullopt;
    const auto l = dacLevel(c, depth_m);
    if (!l) return std::nullopt;
    return DacReading{20.0 * std::log10(amplitude) - l->level_db, l->outside};
}

std::optional<std::pair<double, double>> depthRange(const DistanceAmplitudeCurve& c) {
    const auto pts = levels(c);
    if (pts.empty()) return std::nullopt;
    return std::make_pair(pts.front().first, pts.back().first);
}

DistanceAmplitudeCurve withPoint(DistanceAmplitudeCurve c, const DacPoint& p) {
    if (!(p.amplitude > 0) || !std::isfinite(p.amplitude))
        throw SettingError("distance–amplitude curve: the amplitude of a point must be positive (got " +
                           std::to_string(p.amplitude) + ")");
    if (!std::isfinite(p.depth_m)) throw SettingError("distance–amplitude curve: the depth of a point must be a finite number");
    auto at = std::upper_bound(c.points.begin(), c.points.end(), p.depth_m,
                               [](double z, const DacPoint& q) { return z < q.depth_m; });
    c.points.insert(at, p);
    return c;
}

std::vector<std::pair<double, double>> tcgFromCurve(const DistanceAmplitudeCurve& c) {
    if (c.basis != AmplitudeBasis::BeforeTcg)
        throw SettingError("distance–amplitude curve: a TCG can only be made from a curve read before TCG "
                           "(this one holds amplitudes after TCG, converted from a single amplitude reference)");
    const auto pts = levels(c);
    if (pts.size() < 2)
        throw SettingError("distance–amplitude curve: a TCG needs points at two or more depths (the curve has " +
                           std::to_string(pts.size()) + ")");
    std::vector<std::pair<double, double>> g;
    for (const auto& [z, l] : pts) g.emplace_back(z, pts.front().second - l);
    return g;
}

std::string tcgCurveText(const std::vector<std::pair<double, double>>& points_m_db) {
    std::string out;
    char buf[64];
    for (const auto& [z, g] : points_m_db) {
        std::snprintf(buf, sizeof buf, "%s%.4f:%.4f", out.empty() ? "" : ",", z * 1e3, g);
        out += buf;
    }
    return out;
}

std::vector<std::string> amplitudeKeys(const Recipe& r, AmplitudeBasis basis) {
    std::vector<std::string> keys;
    for (const auto& st : r.stages())
        for (const auto& p : st.params) {
            const bool tcg = st.name == "tgc";
            if (p.display_only && !(tcg && basis == AmplitudeBasis::AfterTcg)) continue;
            // The grid's edges only crop the image; its step does change sampled peaks.
            if (st.name == "grid" && p.name != "step_mm") continue;
            keys.push_back(st.name + "." + p.name);
        }
    std::sort(keys.begin(), keys.end());
    return keys;
}

std::vector<std::string> amplitudeDifferences(const Recipe& a, const Recipe& b, AmplitudeBasis basis) {
    std::vector<std::string> out;
    for (const auto& k : amplitudeKeys(a, basis))
        if (b.has(k) && a.values().at(k) != b.values().at(k)) out.push_back(k);
    return out;
}

std::string amplitudeFingerprint(const Recipe& r, AmplitudeBasis basis) {
    Sha256 h;
    for (const auto& k : amplitudeKeys(r, basis)) {
        const std::string line = k + "=" + r.valueText(k) + "\n";
        h.update(line.data(), line.size());
    }
    return h.hexDigest().substr(0, 16);
}

}  // namespace umbra::core
