// SPDX-License-Identifier: MIT
#include "core/sizing.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <nlohmann/json.hpp>

#include "core/error.h"

namespace umbra::core {

namespace {

constexpr double kSqrt12 = 3.4641016151377544;
constexpr double kSqrt3 = 1.7320508075688772;

std::string num(double v, int decimals = 3) {
    char b[64];
    std::snprintf(b, sizeof b, "%.*f", decimals, v);
    return b;
}

/// Index range [lo, hi] of the centres in `c` (increasing) inside [a, b]; lo > hi if none.
std::pair<long, long> indexRange(const std::vector<double>& c, double a, double b) {
    if (a > b) std::swap(a, b);
    const long lo = static_cast<long>(std::lower_bound(c.begin(), c.end(), a) - c.begin());
    const long hi = static_cast<long>(std::upper_bound(c.begin(), c.end(), b) - c.begin()) - 1;
    return {lo, hi};
}

/// Mean spacing of the centres around index i (mm).
double stepAt(const std::vector<double>& c, size_t i) {
    if (c.size() < 2) return 0;
    if (i == 0) return c[1] - c[0];
    if (i + 1 >= c.size()) return c[i] - c[i - 1];
    return 0.5 * (c[i + 1] - c[i - 1]);
}

/// erfc⁻¹(y) for y in (0, 2), by bisection.
double erfcInv(double y) {
    double lo = -6, hi = 6;
    for (int i = 0; i < 200; ++i) {
        const double m = 0.5 * (lo + hi);
        if (std::erfc(m) > y) lo = m;
        else hi = m;
    }
    return 0.5 * (lo + hi);
}

/// Width of a Gaussian point-spread at amplitude ratio r, given its −6 dB width w.
double widthAtLevel(double w, double r) { return w * std::sqrt(std::log(1 / r) / std::log(2.0)); }

/// Edge offset beyond the true edge of an extended reflector at ratio r (Gaussian edge model).
double edgeOffset(double w, double r) { return erfcInv(2 * r) * w / (2 * std::sqrt(std::log(2.0))); }

std::string dbText(double r) { return r == 0.5 ? "−6 dB" : r == 0.1 ? "−20 dB" : num(20 * std::log10(r), 1) + " dB"; }

void checkImage(const std::vector<float>& amp, const std::vector<double>& x, const std::vector<double>& z) {
    if (amp.size() != x.size() * z.size())
        throw SettingError("sizing: image has " + std::to_string(amp.size()) + " values, grid is " + std::to_string(x.size()) + " x " +
                           std::to_string(z.size()));
}

/// Position budget of a peak along one axis: grid and noise (and speed for depth).
UncertaintyBudget peakBudget(double step, double width, double noise_over_peak, double depth_from_surface, const SizingContext& ctx,
                             bool is_depth) {
    UncertaintyBudget b;
    b.add("grid step", "peak at a pixel centre: rectangular over one pixel of " + num(step) + " mm, /sqrt(12)", step / kSqrt12);
    if (width > 0 && noise_over_peak > 0)
        b.add("noise", "peak location in noise: sigma_psf x noise/peak (sigma_psf = W/2.355, W = " + num(width) + " mm)",
              width / 2.3548 * noise_over_peak);
    if (is_depth)
        b.add("speed of sound", "depth x " + num(100 * ctx.speed_rel, 2) + " % (" + (ctx.speed_basis.empty() ? "assumed" : ctx.speed_basis) + ")",
              std::abs(depth_from_surface) * ctx.speed_rel);
    return b;
}

/// Budget of a drop extent (two edges) along one axis.
UncertaintyBudget extentBudget(double extent, double step, double width, double noise_over_peak, double ratio, const SizingContext& ctx,
                               bool is_depth, double correction) {
    UncertaintyBudget b;
    if (width > 0) {
        b.add("resolution (edge placement)",
              "rectangular +-W/4 per edge, W = " + num(width) + " mm (-6 dB point-spread width here), two edges: sqrt(2) W/(4 sqrt(3))",
              std::sqrt(2.0) * width / (4 * kSqrt3));
        if (noise_over_peak > 0)
            b.add("noise", "edge shift noise/slope, Gaussian edge slope 2 ln2 peak/W, two edges",
                  std::sqrt(2.0) * noise_over_peak * width / (2 * std::log(2.0)));
    }
    b.add("grid step", "edge interpolated between pixels: rectangular over one pixel of " + num(step) + " mm, /sqrt(12) per edge, two edges",
          std::sqrt(2.0) * step / kSqrt12);
    if (correction > 0)
        b.add("beam-spread correction", dbText(ratio) + " edges lie beyond the true edge: " + num(correction) +
                                            " mm removed (Gaussian edge model), rectangular +-half of it, /sqrt(3)",
              0.5 * correction / kSqrt3);
    if (is_depth)
        b.add("speed of sound", "height x " + num(100 * ctx.speed_rel, 2) + " % (" + (ctx.speed_basis.empty() ? "assumed" : ctx.speed_basis) + ")",
              std::abs(extent) * ctx.speed_rel);
    return b;
}

}  // namespace

std::string toolName(SizingTool t) {
    switch (t) {
    case SizingTool::Drop6: return "drop6";
    case SizingTool::Drop20: return "drop20";
    case SizingTool::Tips: return "tips";
    case SizingTool::Peak: return "peak";
    }
    return "?";
}

std::optional<SizingTool> toolFromName(const std::string& name) {
    for (auto t : {SizingTool::Drop6, SizingTool::Drop20, SizingTool::Tips, SizingTool::Peak})
        if (toolName(t) == name) return t;
    return std::nullopt;
}

std::vector<MeasuredValue> SizingResult::values() const {
    std::vector<MeasuredValue> v;
    for (const auto* m : {&x, &depth, &length, &height})
        if (*m) v.push_back(**m);
    return v;
}

double medianLevel(const std::vector<float>& amplitude) {
    if (amplitude.empty()) return 0;
    std::vector<float> v(amplitude);
    auto mid = v.begin() + std::ptrdiff_t(v.size() / 2);
    std::nth_element(v.begin(), mid, v.end());
    return *mid;
}

std::vector<ImagePeak> separatedPeaks(const std::vector<float>& amp, const std::vector<double>& x, const std::vector<double>& z, PointMm a,
                                      PointMm b, double level_ratio) {
    checkImage(amp, x, z);
    const size_t nx = x.size();
    const auto [x0, x1] = indexRange(x, a.x_mm, b.x_mm);
    const auto [z0, z1] = indexRange(z, a.z_mm, b.z_mm);
    if (x0 > x1 || z0 > z1) return {};
    auto at = [&](long iz, long ix) { return double(amp[size_t(iz) * nx + size_t(ix)]); };
    double best = 0;
    for (long iz = z0; iz <= z1; ++iz)
        for (long ix = x0; ix <= x1; ++ix) best = std::max(best, at(iz, ix));
    if (!(best > 0)) return {};
    const double level = level_ratio * best;
    std::vector<ImagePeak> cand;
    for (long iz = z0; iz <= z1; ++iz)
        for (long ix = x0; ix <= x1; ++ix) {
            const double v = at(iz, ix);
            if (v < level || !(v > 0)) continue;
            bool is_max = true;
            for (long dz = -1; dz <= 1 && is_max; ++dz)
                for (long dx = -1; dx <= 1; ++dx) {
                    if (!dz && !dx) continue;
                    const long jz = iz + dz, jx = ix + dx;
                    if (jz < z0 || jz > z1 || jx < x0 || jx > x1) continue;
                    const double w = at(jz, jx);
                    // Plateaus: the first pixel in scan order wins.
                    if (w > v || (w == v && (jz < iz || (jz == iz && jx < ix)))) {
                        is_max = false;
                        break;
                    }
                }
            if (is_max) cand.push_back({size_t(ix), size_t(iz), x[size_t(ix)], z[size_t(iz)], v});
        }
    std::sort(cand.begin(), cand.end(), [](const ImagePeak& p, const ImagePeak& q) { return p.value > q.value; });
    std::vector<ImagePeak> kept;
    for (const auto& c : cand) {
        bool separate = true;
        for (const auto& k : kept) {
            // Lowest amplitude on the straight line between the two pixels (nearest pixel).
            const long n = std::max(std::labs(long(c.ix) - long(k.ix)), std::labs(long(c.iz) - long(k.iz)));
            double low = std::numeric_limits<double>::infinity();
            for (long s = 0; s <= n; ++s) {
                const double t = n ? double(s) / double(n) : 0;
                const long ix = std::lround(double(k.ix) + t * (double(c.ix) - double(k.ix)));
                const long iz = std::lround(double(k.iz) + t * (double(c.iz) - double(k.iz)));
                low = std::min(low, at(iz, ix));
            }
            if (!(low < 0.5 * c.value)) {
                separate = false;
                break;
            }
        }
        if (separate) kept.push_back(c);
        if (kept.size() >= 16) break;
    }
    return kept;
}

SizingResult measureInBox(SizingTool tool, const std::vector<float>& amp, const std::vector<double>& x, const std::vector<double>& z, PointMm a,
                          PointMm b, const SizingContext& ctx) {
    checkImage(amp, x, z);
    for (double v : {a.x_mm, a.z_mm, b.x_mm, b.z_mm})
        if (!std::isfinite(v)) throw SettingError("sizing: the box has a corner that is not a finite number");
    SizingResult r;
    r.tool = tool;
    r.warnings = ctx.notes;
    const double ratio = tool == SizingTool::Drop20 ? kTwentyDbDropRatio : kSixDbDropRatio;
    const DropSizing d = dropSize(amp, x, z, a, b, ratio);
    if (!d.found) {
        r.warnings.push_back("the box holds no pixel with a non-zero amplitude");
        return r;
    }
    r.found = true;
    r.drop = d;
    r.peak = {d.peak_ix, d.peak_iz, d.peak_x_mm, d.peak_z_mm, d.peak_value};
    const double ref = ctx.frame_peak > 0 ? ctx.frame_peak : d.peak_value;
    r.peak_db = 20 * std::log10(d.peak_value / ref);
    if (ctx.resolution) r.resolution = ctx.resolution(d.peak_x_mm, d.peak_z_mm);
    else r.warnings.push_back("point-spread widths unknown: no resolution component and no resolution-limited check");
    const double wl = r.resolution.lateral_mm, wa = r.resolution.axial_mm;
    const double sx = stepAt(x, d.peak_ix), sz = stepAt(z, d.peak_iz);
    const double nop = ctx.noise_level > 0 ? ctx.noise_level / d.peak_value : 0;

    auto positionValues = [&](const ImagePeak& p, double noise_over_peak, const std::string& xname, const std::string& zname) {
        const double depth = p.z_mm - ctx.surface_z_mm;
        const LocalResolution w = ctx.resolution ? ctx.resolution(p.x_mm, p.z_mm) : LocalResolution{};
        r.x = MeasuredValue{xname, p.x_mm, "mm", peakBudget(stepAt(x, p.ix), w.lateral_mm, noise_over_peak, depth, ctx, false)};
        r.depth = MeasuredValue{zname, depth, "mm", peakBudget(stepAt(z, p.iz), w.axial_mm, noise_over_peak, depth, ctx, true)};
    };

    if (tool == SizingTool::Peak) {
        positionValues(r.peak, nop, "x", "depth");
        r.peaks = separatedPeaks(amp, x, z, a, b, kSixDbDropRatio);
        return r;
    }

    if (tool == SizingTool::Tips) {
        r.peaks = separatedPeaks(amp, x, z, a, b, kTwentyDbDropRatio);
        if (r.peaks.size() < 2) {
            r.found = false;
            r.warnings.push_back("fewer than two separated peaks above -20 dB in the box: no tip pair to size");
            return r;
        }
        if (r.peaks.size() > 2)
            r.warnings.push_back(std::to_string(r.peaks.size()) + " separated peaks above -20 dB in the box: the two strongest are taken as the tips");
        ImagePeak p = r.peaks[0], q = r.peaks[1];
        if (q.z_mm < p.z_mm) std::swap(p, q);
        r.tips = {{p.x_mm, p.z_mm}, {q.x_mm, q.z_mm}};
        const double np = ctx.noise_level > 0 ? ctx.noise_level / p.value : 0, nq = ctx.noise_level > 0 ? ctx.noise_level / q.value : 0;
        positionValues(p, np, "upper tip x", "upper tip depth");
        {
            const LocalResolution w = ctx.resolution ? ctx.resolution(p.x_mm, p.z_mm) : LocalResolution{};
            if (w.axial_mm > 0) {
                r.x->budget.add("tip echo position", "interference with the flaw face: rectangular +-W/4 (W = -6 dB lateral width), /sqrt(3)",
                                w.lateral_mm / (4 * kSqrt3));
                r.depth->budget.add("tip echo position", "interference with the flaw face: rectangular +-W/4 (W = -6 dB axial width), /sqrt(3)",
                                    w.axial_mm / (4 * kSqrt3));
            }
        }
        const double h = q.z_mm - p.z_mm;
        UncertaintyBudget hb;
        const double sp = stepAt(z, p.iz), sq = stepAt(z, q.iz);
        hb.add("grid step", "each tip at a pixel centre: rectangular over one pixel, /sqrt(12), two tips",
               std::hypot(sp, sq) / kSqrt12);
        const LocalResolution wp = ctx.resolution ? ctx.resolution(p.x_mm, p.z_mm) : LocalResolution{};
        const LocalResolution wq = ctx.resolution ? ctx.resolution(q.x_mm, q.z_mm) : LocalResolution{};
        if (wp.axial_mm > 0)
            hb.add("tip echo position", "each tip echo displaced by interference with the flaw face and the other tip: rectangular "
                   "+-W/4 per tip (W = -6 dB axial point-spread width), two tips", std::hypot(wp.axial_mm, wq.axial_mm) / (4 * kSqrt3));
        if (ctx.noise_level > 0 && wp.axial_mm > 0)
            hb.add("noise", "each tip located to sigma_psf x noise/tip amplitude, two tips",
                   std::hypot(wp.axial_mm / 2.3548 * np, wq.axial_mm / 2.3548 * nq));
        hb.add("speed of sound", "height x " + num(100 * ctx.speed_rel, 2) + " % (" + (ctx.speed_basis.empty() ? "assumed" : ctx.speed_basis) + ")",
               std::abs(h) * ctx.speed_rel);
        r.height = MeasuredValue{"height (tip to tip)", h, "mm", hb};
        // Tips closer than the resolution limit interfere: their peaks are displaced.
        const double wax = std::max(wp.axial_mm, wq.axial_mm), wlat = std::max(wp.lateral_mm, wq.lateral_mm);
        if (wax > 0 && wlat > 0) {
            const double sep = std::hypot((q.x_mm - p.x_mm) / wlat, (q.z_mm - p.z_mm) / wax);
            if (sep <= kResolutionLimitFactor) {
                r.resolution_limited = true;
                r.height->upper_bound = true;
                r.warnings.push_back("the tips are within 1.2 point-spread widths of each other: resolution-limited, the tip positions are "
                                     "displaced by interference");
            }
        }
        return r;
    }

    // Drop tools.
    positionValues(r.peak, nop, "x", "depth");
    r.peaks = separatedPeaks(amp, x, z, a, b, ratio);
    if (r.peaks.size() >= 2) {
        r.offer_tips = true;
        r.warnings.push_back(std::to_string(r.peaks.size()) + " separated peaks above the " + dbText(ratio) +
                             " level in the box: the drop sizes the brightest only; tip-to-tip sizing (tool tips) may apply");
    }
    const char* sides[4] = {"left", "right", "top", "bottom"};
    const bool open[4] = {d.left_open, d.right_open, d.top_open, d.bottom_open};
    for (int i = 0; i < 4; ++i)
        if (open[i]) r.warnings.push_back(std::string("the indication reaches the box's ") + sides[i] + " side above the " + dbText(ratio) +
                                          " level: enlarge the box");
    const double cl = wl > 0 ? 2 * edgeOffset(wl, ratio) : 0, ca = wa > 0 ? 2 * edgeOffset(wa, ratio) : 0;
    const double L = d.lengthMm(), H = d.heightMm();
    MeasuredValue len{"length " + dbText(ratio), L, "mm", extentBudget(L, sx, wl, nop, ratio, ctx, false, 0)};
    MeasuredValue hei{"height " + dbText(ratio), H, "mm", extentBudget(H, sz, wa, nop, ratio, ctx, true, 0)};
    auto resolve = [&](MeasuredValue& m, double extent, double w, double corr, double step, bool is_depth, const char* axis) {
        if (w <= 0) return;
        const double limit = kResolutionLimitFactor * widthAtLevel(w, ratio);
        if (extent <= limit) {
            m.upper_bound = true;
            r.resolution_limited = true;
            r.warnings.push_back(std::string(axis) + " " + num(extent, 2) + " mm is within 1.2x the point-spread width at this level (" +
                                 num(widthAtLevel(w, ratio), 2) + " mm): resolution-limited, the true size may be smaller (upper bound)");
        } else if (corr > 0) {
            m.value = extent - corr;
            m.budget = extentBudget(m.value, step, w, nop, ratio, ctx, is_depth, corr);
        }
    };
    resolve(len, L, wl, cl, sx, false, "length");
    resolve(hei, H, wa, ca, sz, true, "height");
    r.length = len;
    r.height = hei;
    return r;
}

std::vector<double> scanProjection(const ImageStack& img, PointMm a, PointMm b) {
    std::vector<double> x_mm(img.x_m.size()), z_mm(img.z_m.size());
    for (size_t i = 0; i < x_mm.size(); ++i) x_mm[i] = img.x_m[i] * 1e3;
    for (size_t i = 0; i < z_mm.size(); ++i) z_mm[i] = img.z_m[i] * 1e3;
    const auto [x0, x1] = indexRange(x_mm, a.x_mm, b.x_mm);
    const auto [z0, z1] = indexRange(z_mm, a.z_mm, b.z_mm);
    std::vector<double> out(img.frames, 0.0);
    if (x0 > x1 || z0 > z1) return out;
    const size_t nx = x_mm.size(), n = nx * z_mm.size();
    for (size_t f = 0; f < img.frames; ++f) {
        float m = 0;
        for (long iz = z0; iz <= z1; ++iz)
            for (long ix = x0; ix <= x1; ++ix) m = std::max(m, img.envelope[f * n + size_t(iz) * nx + size_t(ix)]);
        out[f] = m;
    }
    return out;
}

SizingResult scanLength(const std::vector<double>& y_in, const std::vector<double>& p_in, double ratio, double elevation_width_mm,
                        double position_rel) {
    if (y_in.size() != p_in.size()) throw SettingError("scan length: " + std::to_string(y_in.size()) + " positions for " + std::to_string(p_in.size()) + " frames");
    if (!(ratio > 0 && ratio < 1)) throw SettingError("scan length: ratio is not in (0, 1)");
    SizingResult r;
    r.tool = ratio == kTwentyDbDropRatio ? SizingTool::Drop20 : SizingTool::Drop6;
    if (y_in.size() < 2) {
        r.warnings.push_back("scan length needs at least two frames with scan positions");
        return r;
    }
    std::vector<size_t> order(y_in.size());
    for (size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::sort(order.begin(), order.end(), [&](size_t i, size_t j) { return y_in[i] < y_in[j]; });
    std::vector<double> y, p;
    for (size_t i : order) {
        if (!std::isfinite(y_in[i])) throw SettingError("scan length: a scan position is not finite");
        if (!y.empty() && !(y_in[i] > y.back())) throw SettingError("scan length: two frames share the scan position " + num(y_in[i]) + " mm");
        y.push_back(y_in[i]);
        p.push_back(p_in[i]);
    }
    size_t ip = 0;
    for (size_t i = 1; i < p.size(); ++i)
        if (p[i] > p[ip]) ip = i;
    if (!(p[ip] > 0)) {
        r.warnings.push_back("the projection is zero in every frame");
        return r;
    }
    r.found = true;
    const double level = ratio * p[ip];
    auto edge = [&](int dir, bool& open) {
        long i = long(ip);
        while (true) {
            const long n = i + dir;
            if (n < 0 || n >= long(p.size())) {
                open = true;
                return y[size_t(i)];
            }
            if (p[size_t(n)] < level) {
                const double t = (p[size_t(i)] - level) / (p[size_t(i)] - p[size_t(n)]);
                return y[size_t(i)] + t * (y[size_t(n)] - y[size_t(i)]);
            }
            i = n;
        }
    };
    bool lo_open = false, hi_open = false;
    const double y0 = edge(-1, lo_open), y1 = edge(+1, hi_open);
    if (lo_open || hi_open)
        r.warnings.push_back("the indication is above the " + dbText(ratio) + " level in the first or last frame: the scan does not cover its end");
    const double L = y1 - y0;
    const double spacing = (y.back() - y.front()) / double(y.size() - 1);
    UncertaintyBudget b;
    const double W = elevation_width_mm;
    if (W > 0)
        b.add("resolution (edge placement)", "rectangular +-W/4 per edge, W = " + num(W) + " mm (elevation beam width), two edges",
              std::sqrt(2.0) * W / (4 * kSqrt3));
    else
        r.warnings.push_back("elevation beam width unknown: no resolution component and no resolution-limited check");
    b.add("frame spacing", "edge interpolated between frames " + num(spacing) + " mm apart: rectangular, /sqrt(12) per edge, two edges",
          std::sqrt(2.0) * spacing / kSqrt12);
    double corr = 0;
    if (W > 0 && ratio != kSixDbDropRatio && L > kResolutionLimitFactor * widthAtLevel(W, ratio)) corr = 2 * edgeOffset(W, ratio);
    if (corr > 0) b.add("beam-spread correction", num(corr) + " mm removed (Gaussian edge model), rectangular +-half, /sqrt(3)", 0.5 * corr / kSqrt3);
    if (position_rel > 0) b.add("scan-position calibration", "length x " + num(100 * position_rel, 2) + " %", L * position_rel);
    r.length = MeasuredValue{"length along the scan " + dbText(ratio), L - corr, "mm", b};
    UncertaintyBudget pb;
    pb.add("frame spacing", "peak at a frame: rectangular over one spacing, /sqrt(12)", spacing / kSqrt12);
    r.x = MeasuredValue{"y of the peak", y[ip], "mm", pb};
    r.peak.value = p[ip];
    r.peak.x_mm = y[ip];
    if (W > 0 && L <= kResolutionLimitFactor * widthAtLevel(W, ratio)) {
        r.resolution_limited = true;
        r.length->upper_bound = true;
        r.warnings.push_back("length along the scan is within 1.2x the elevation beam width at this level: resolution-limited, the true "
                             "length may be smaller (upper bound)");
    }
    return r;
}

MeasuredValue endToEnd(PointMm a, PointMm b, double wl, double wy, double sx, double sy) {
    const double dx = b.x_mm - a.x_mm, dy = b.z_mm - a.z_mm, L = std::hypot(dx, dy);
    // Sensitivities of L to each point's x and y: ±dx/L, ±dy/L (two points each).
    const double cx = L > 0 ? std::abs(dx) / L : 1, cy = L > 0 ? std::abs(dy) / L : 1;
    UncertaintyBudget u;
    if (wl > 0 || wy > 0)
        u.add("resolution (end placement)", "each end placed within +-W/2 of the echo's end: rectangular, W/(2 sqrt(3)), two ends",
              std::sqrt(2.0) * std::hypot(cx * wl, cy * wy) / (2 * kSqrt3));
    u.add("grid step", "pixel and frame spacing, rectangular /sqrt(12), two ends", std::sqrt(2.0) * std::hypot(cx * sx, cy * sy) / kSqrt12);
    return MeasuredValue{"length end to end", L, "mm", u};
}

namespace {
nlohmann::json roundedOrNull(const std::optional<MeasuredValue>& m) {
    if (!m) return nullptr;
    return std::stod(roundedValueText(*m));
}
nlohmann::json uOrNull(const std::optional<MeasuredValue>& m) {
    if (!m) return nullptr;
    return std::stod(roundToUncertainty(m->value, m->budget.expanded()).uncertainty_text);
}
}  // namespace

std::string sizingJson(const SizingResult& r, size_t frame) {
    nlohmann::json j;
    j["tool"] = toolName(r.tool);
    j["frame"] = frame;
    j["found"] = r.found;
    j["x_mm"] = roundedOrNull(r.x);
    j["depth_mm"] = roundedOrNull(r.depth);
    j["length_mm"] = roundedOrNull(r.length);
    j["height_mm"] = roundedOrNull(r.height);
    j["peak_db"] = r.found && r.tool != SizingTool::Tips && r.depth ? nlohmann::json(std::round(r.peak_db * 10) / 10) : nlohmann::json(nullptr);
    j["uncertainty_mm"] = {{"x", uOrNull(r.x)}, {"depth", uOrNull(r.depth)}, {"length", uOrNull(r.length)}, {"height", uOrNull(r.height)}};
    j["coverage_factor"] = kCoverageFactor;
    j["resolution_limited"] = r.resolution_limited;
    j["upper_bound"] = {{"length", r.length && r.length->upper_bound}, {"height", r.height && r.height->upper_bound}};
    j["warnings"] = r.warnings;
    if (r.tool == SizingTool::Tips) {
        nlohmann::json t = nlohmann::json::array();
        for (const auto& p : r.tips) {
            const double ux = r.x ? r.x->budget.expanded() : 0, uz = r.depth ? r.depth->budget.expanded() : 0;
            t.push_back({std::stod(roundToUncertainty(p.x_mm, ux).value_text), std::stod(roundToUncertainty(p.z_mm, uz).value_text)});
        }
        j["tips_mm"] = t;
    }
    if (r.found && r.resolution.lateral_mm > 0)
        j["point_spread_mm"] = {{"lateral", std::round(r.resolution.lateral_mm * 1000) / 1000}, {"axial", std::round(r.resolution.axial_mm * 1000) / 1000}};
    nlohmann::json budgets = nlohmann::json::object();
    const char* keys[4] = {"x", "depth", "length", "height"};
    const std::optional<MeasuredValue>* vals[4] = {&r.x, &r.depth, &r.length, &r.height};
    for (int i = 0; i < 4; ++i) {
        if (!*vals[i]) continue;
        nlohmann::json list = nlohmann::json::array();
        for (const auto& c : (*vals[i])->budget.components)
            list.push_back({{"component", c.name}, {"standard_mm", std::round(c.standard * 1e4) / 1e4}, {"basis", c.basis}});
        budgets[keys[i]] = {{"name", (*vals[i])->name},
                            {"components", list},
                            {"combined_standard_mm", std::round((*vals[i])->budget.combined() * 1e4) / 1e4}};
    }
    j["budgets"] = budgets;
    return j.dump(2);
}

std::string sizingLine(const SizingResult& r, size_t frame) {
    std::string s = toolName(r.tool) + " frame " + std::to_string(frame) + ": ";
    if (!r.found) s += "nothing sized";
    std::string parts;
    for (const auto& v : r.values()) parts += (parts.empty() ? "" : "; ") + formatMeasured(v);
    s += parts;
    if (r.found && r.depth && r.tool != SizingTool::Tips) {
        char b[48];
        std::snprintf(b, sizeof b, "; peak %.1f dB re frame peak", r.peak_db);
        s += b;
    }
    if (r.tips.size() == 2) {
        const double ux = r.x ? r.x->budget.expanded() : 0, uz = r.depth ? r.depth->budget.expanded() : 0;
        s += "; tips at";
        for (size_t i = 0; i < 2; ++i)
            s += std::string(i ? " and" : "") + " (" + roundToUncertainty(r.tips[i].x_mm, ux).value_text + ", " +
                 roundToUncertainty(r.tips[i].z_mm, uz).value_text + ") mm";
    }
    if (r.resolution_limited) s += "; RESOLUTION-LIMITED (upper bound)";
    for (const auto& w : r.warnings) s += "\n  warning: " + w;
    return s;
}

}  // namespace umbra::core
