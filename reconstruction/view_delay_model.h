// SPDX-License-Identifier: MIT
#pragma once
// Delay model of one view (delay_model.mode) through an optional wedge, from travel-time
// tables: for every element and every pixel of the image grid, the least-time path of the
// transmit legs and of the receive legs (reconstruction/ray_path.h). The tables are built once
// per (geometry, grid, leg speeds, legs) in parallel over elements and kept in a small
// least-recently-used cache (kTravelTimeCacheBytes), so re-running a frame or another frame of
// the same capture costs only the look-ups. Memory: 4 bytes x elements x pixels per leg
// sequence (one table for a symmetric view such as T-T, two for TT-T).
#include <cstddef>
#include <memory>
#include <vector>

#include "reconstruction/delay_model.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/ray_path.h"
#include "reconstruction/view_mode.h"

namespace umbra::recon {

/// Upper bound of the travel-time cache (all tables kept), bytes.
inline constexpr size_t kTravelTimeCacheBytes = size_t(1) << 30;
/// Largest single table set; beyond it times are computed per tile without tables.
inline constexpr size_t kMaxTravelTimeTableBytes = size_t(1) << 29;

/// Times (s, float) of one leg sequence for every element over a grid: t[(e * nz + iz) * nx + ix].
struct TravelTimeTable {
    size_t elements = 0, nx = 0, nz = 0;
    std::vector<float> t_s;
    double build_seconds = 0;
    size_t bytes() const { return t_s.size() * sizeof(float); }
};

/// Builds (or takes from the cache) the table of `legs` for every element of `elements` over
/// `grid`. threads <= 0: all hardware threads.
std::shared_ptr<const TravelTimeTable> travelTimeTable(const ViewGeometry& g, const std::vector<core::Vec3>& elements,
                                                       const std::vector<Wave>& legs, const Grid& grid, int threads = 0,
                                                       bool* from_cache = nullptr);
/// Empties the cache (tests, benchmarks).
void clearTravelTimeCache();
/// Bytes held by the cache now.
size_t travelTimeCacheBytes();

class ViewDelayModel : public DelayModel {
public:
    /// Tables over `grid` for the capture's elements (built now, or taken from the cache).
    ViewDelayModel(const core::CaptureHeader& h, ViewGeometry g, ViewMode mode, const Grid& grid, int threads = 0);

    /// Transmit legs from `from` (any point in the array frame) to specimen pixels, solved directly.
    void pointTime(const core::Vec3& from, const float* x, const float* z, size_t n, float* t_s) const override;
    void elementTime(const core::Vec3& pos, size_t element, DelayLeg leg, const float* x, const float* z, size_t n,
                     float* t_s) const override;
    /// Refused (SettingError): views and wedges need full-matrix captures.
    void planeWaveTime(double, const float*, const float*, size_t, float*) const override;
    void virtualSourceTime(const core::Vec3&, const float*, const float*, size_t, float*) const override;
    bool reciprocal() const override { return mode_.symmetric(); }
    bool symmetricLegs() const override { return mode_.symmetric(); }
    bool specimenFrame() const override { return geo_.wedge.has_value(); }
    double nominalSpeed() const override;

    const ViewMode& mode() const { return mode_; }
    const ViewGeometry& geometry() const { return geo_; }
    /// Bytes of the tables this model uses (0 when computed per tile).
    size_t tableBytes() const;
    /// Seconds spent building the tables (0 when taken from the cache).
    double buildSeconds() const { return build_s_; }

private:
    void lookup(const TravelTimeTable* tab, const std::vector<Wave>& legs, const core::Vec3& pos, size_t element, const float* x,
                const float* z, size_t n, float* t) const;
    ViewGeometry geo_;
    ViewMode mode_;
    Grid grid_;
    std::shared_ptr<const TravelTimeTable> tx_, rx_;
    double build_s_ = 0;
};

}  // namespace umbra::recon
