// SPDX-License-Identifier: MIT
// The simulator loop: per frame, expand the scene into point sources, then for every receive
// element (one worker per element, threads take elements from a shared counter) and every
// transmit event add each source's pulse over its short support only, followed by side-drilled
// holes (near-surface specular point), the back wall and its repeat (image sources) and noise.
#include "reconstruction/simulate/simulator.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <ctime>
#include <thread>

#include "core/capture_file.h"
#include "core/error.h"
#include "reconstruction/simulate/elastic.h"
#include "reconstruction/simulate/geometry.h"
#include "reconstruction/simulate/noise.h"
#include "reconstruction/simulate/pulse.h"
#include "reconstruction/simulate/scatterers.h"

namespace umbra::recon::sim {

const char* simulatorVersion() { return "umbra simulate 1.0"; }

namespace {

std::string nowUtc() {
    std::time_t t = std::time(nullptr);
    std::tm tm{};
    gmtime_r(&t, &tm);
    char buf[32];
    std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
    return buf;
}

size_t frameCount(const Scene& s, const SimOptions& o) {
    return o.max_frames ? std::min(s.frames.count, std::max<size_t>(1, *o.max_frames)) : s.frames.count;
}

/// Computes whole frames into [N_tx][N_rx][N_samples] buffers.
class Engine {
public:
    Engine(const Scene& s, const SimOptions& o)
        : s_(s),
          seed_(o.seed.value_or(s.seed)),
          model_(s),
          elastic_(s),
          pulse_(s.array.centre_frequency_hz, s.array.fractional_bandwidth),
          table_(pulse_, s.sampling.frequency_hz),
          noise_(pulse_, s.sampling.frequency_hz),
          speckle_(makeSpeckle(s.speckle, seed_)),
          ntx_(s.transmit.count(s.array.elements)),
          nrx_(size_t(s.array.elements)),
          ns_(s.sampling.samples) {
        threads_ = o.threads ? o.threads : std::max(1u, std::thread::hardware_concurrency());
    }

    size_t blockSize() const { return nrx_ * ns_; }
    size_t frameSize() const { return ntx_ * nrx_ * ns_; }

    /// Noise-free frame f into out (frameSize() floats, overwritten).
    void frame(size_t f, float* out, SimStats& st) {
        std::fill(out, out + frameSize(), 0.0f);
        const FrameContent fc = frameContent(s_, f, speckle_);
        if (s_.elastic.enabled) {
            elasticFrame(fc, out, st);
            return;
        }
        const size_t K = fc.points.size();
        st.scatterers = K + fc.holes.size() + (s_.back_wall ? size_t(1 + s_.back_wall->repeats) : 0);
        const double fs = s_.sampling.frequency_hz, t0 = s_.sampling.start_time_s;
        // Transmit legs of every source for every event: delay in samples, amplitude.
        std::vector<double> txd(ntx_ * K);
        std::vector<float> txa(ntx_ * K);
        parallelFor(ntx_, [&](size_t t) {
            for (size_t k = 0; k < K; ++k) {
                const Leg l = model_.transmit(t, fc.points[k].x_m, fc.points[k].z_m);
                txd[t * K + k] = (l.delay_s - t0) * fs;
                txa[t * K + k] = float(l.amplitude * fc.points[k].amplitude);
            }
        });
        std::atomic<double> written{0};
        parallelFor(nrx_, [&](size_t r) {
            std::vector<double> rxd(K);
            std::vector<float> rxa(K);
            for (size_t k = 0; k < K; ++k) {
                const Leg l = model_.receive(int(r), fc.points[k].x_m, fc.points[k].z_m);
                rxd[k] = l.delay_s * fs;
                rxa[k] = float(l.amplitude);
            }
            double w = 0;
            const int n = int(ns_);
            for (size_t t = 0; t < ntx_; ++t) {
                float* trace = out + (t * nrx_ + r) * ns_;
                const double* d = txd.data() + t * K;
                const float* a = txa.data() + t * K;
                for (size_t k = 0; k < K; ++k) w += table_.add(trace, n, d[k] + rxd[k], a[k] * rxa[k]);
                for (auto& h : fc.holes) {
                    double px, pz;
                    model_.specularPointOnCircle(t, int(r), h.x_m, h.z_m, h.radius_m, px, pz);
                    const Leg lt = model_.transmit(t, px, pz), lr = model_.receive(int(r), px, pz);
                    w += table_.add(trace, n, (lt.delay_s + lr.delay_s - t0) * fs, float(h.amplitude * lt.amplitude * lr.amplitude));
                }
                if (s_.back_wall) {
                    double coef = s_.back_wall->amplitude;
                    for (int rep = 0; rep <= s_.back_wall->repeats; ++rep, coef *= s_.back_wall->amplitude) {
                        const Leg l = model_.backWall(t, int(r), s_.back_wall->depth_m, rep);
                        if (l.amplitude != 0) w += table_.add(trace, n, (l.delay_s - t0) * fs, float(coef * l.amplitude));
                    }
                }
            }
            written.fetch_add(w);
        });
        const double traces = double(ntx_) * double(nrx_);
        st.scatterer_traces += traces * double(st.scatterers);
        st.samples_written += written.load();
        st.nominal_samples += traces * double(st.scatterers) * double(ns_);
    }

    /// Elastic paths (wedge, shear, skips): every listed view's echo of every point and hole.
    void elasticFrame(const FrameContent& fc, float* out, SimStats& st) {
        std::vector<ViewMode> modes;
        std::vector<std::vector<Wave>> seqs;
        std::vector<std::pair<size_t, size_t>> mi;  // (tx seq, rx seq) per mode
        auto seqIndex = [&](const std::vector<Wave>& q) {
            for (size_t i = 0; i < seqs.size(); ++i)
                if (seqs[i] == q) return i;
            seqs.push_back(q);
            return seqs.size() - 1;
        };
        for (const auto& m : s_.elastic.modes) {
            modes.push_back(parseViewMode(m));
            const size_t a = seqIndex(modes.back().tx);
            mi.emplace_back(a, seqIndex(modes.back().rx));
        }
        const size_t K = fc.points.size(), H = fc.holes.size(), P = K + H, nq = seqs.size(), nel = nrx_;
        st.scatterers = P;
        // Legs [seq][element][point] (holes after points, to their centres), transmit and receive.
        std::vector<ElasticLeg> lt(nq * nel * P), lr(nq * nel * P);
        const auto el = s_.array.elementX();
        parallelFor(nel, [&](size_t e) {
            const core::Vec3 pos{el[e], 0, 0};
            for (size_t q = 0; q < nq; ++q)
                for (size_t k = 0; k < P; ++k) {
                    const double x = k < K ? fc.points[k].x_m : fc.holes[k - K].x_m, z = k < K ? fc.points[k].z_m : fc.holes[k - K].z_m;
                    lt[(q * nel + e) * P + k] = elastic_.leg(pos, seqs[q], x, z, false);
                    lr[(q * nel + e) * P + k] = elastic_.leg(pos, seqs[q], x, z, true);
                }
        });
        const double fs = s_.sampling.frequency_hz, t0 = s_.sampling.start_time_s, f0 = s_.array.centre_frequency_hz;
        std::atomic<double> written{0};
        parallelFor(nrx_, [&](size_t r) {
            double w = 0;
            const int n = int(ns_);
            for (size_t t = 0; t < ntx_; ++t) {
                float* trace = out + (t * nrx_ + r) * ns_;
                const size_t te = s_.transmit.source_elements.empty() ? t : size_t(s_.transmit.source_elements[t]);
                for (const auto& [qa, qb] : mi) {
                    const ElasticLeg* A = lt.data() + (qa * nel + te) * P;
                    const ElasticLeg* B = lr.data() + (qb * nel + r) * P;
                    for (size_t k = 0; k < K; ++k) {
                        if (!A[k].valid || !B[k].valid) continue;
                        w += table_.add(trace, n, (A[k].delay_s + B[k].delay_s - t0) * fs, float(A[k].amplitude * B[k].amplitude * fc.points[k].amplitude));
                    }
                    // Side-drilled holes: the echo comes from the surface point facing the bisector of
                    // the two arriving rays (first order: each path shortens by a (n . u) / c); 2-D
                    // Kirchhoff amplitude of a cylinder, proportional to sqrt(radius / wavelength).
                    for (size_t h = 0; h < H; ++h) {
                        const ElasticLeg& a = A[K + h];
                        const ElasticLeg& b = B[K + h];
                        if (!a.valid || !b.valid) continue;
                        double nx = a.ux + b.ux, nz = a.uz + b.uz;
                        const double nn = std::hypot(nx, nz);
                        if (nn < 1e-6) continue;  // forward scattering: no specular point
                        nx /= nn;
                        nz /= nn;
                        const double rad = fc.holes[h].radius_m;
                        const double d = a.delay_s + b.delay_s - rad * (nx * a.ux + nz * a.uz) / a.last_speed_m_s -
                                         rad * (nx * b.ux + nz * b.uz) / b.last_speed_m_s;
                        const double amp = fc.holes[h].amplitude * std::sqrt(rad / (b.last_speed_m_s / f0));
                        w += table_.add(trace, n, (d - t0) * fs, float(a.amplitude * b.amplitude * amp));
                    }
                }
                if (s_.back_wall && !s_.wedge) {  // contact: the specular L back-wall echo as without elastic paths
                    double coef = s_.back_wall->amplitude;
                    for (int rep = 0; rep <= s_.back_wall->repeats; ++rep, coef *= s_.back_wall->amplitude) {
                        const Leg l = model_.backWall(t, int(r), s_.back_wall->depth_m, rep);
                        if (l.amplitude != 0) w += table_.add(trace, n, (l.delay_s - t0) * fs, float(coef * l.amplitude));
                    }
                }
            }
            written.fetch_add(w);
        });
        const double traces = double(ntx_) * double(nrx_);
        st.scatterer_traces += traces * double(P) * double(modes.size());
        st.samples_written += written.load();
        st.nominal_samples += traces * double(P) * double(modes.size()) * double(ns_);
    }

    /// Adds noise of the given rms to frame f (buffer as from frame()).
    void addNoise(size_t f, float* out, double rms) {
        if (!(rms > 0)) return;
        parallelFor(ntx_ * nrx_, [&](size_t i) {
            noise_.add(out + i * ns_, int(ns_), rms, seed_, f, i / nrx_, i % nrx_);
        });
    }

    /// The amplitude the noise is referred to (noise.reference), from the noiseless frame 0.
    double noiseReference(const float* frame0) const {
        switch (s_.noise.reference) {
            case NoiseReference::None: return 0;
            case NoiseReference::Amplitude: return s_.noise.reference_amplitude;
            case NoiseReference::Peak: {
                float m = 0;
                for (size_t i = 0; i < frameSize(); ++i) m = std::max(m, std::abs(frame0[i]));
                return m;
            }
            case NoiseReference::BackWall: {
                // First back-wall echo of transmit event 0 on the element nearest the array centre.
                const int mid = s_.array.elements / 2;
                const size_t t = s_.transmit.kind == core::TransmitKind::SingleElement ? findSource(mid) : 0;
                return std::abs(s_.back_wall->amplitude * model_.backWall(t, mid, s_.back_wall->depth_m, 0).amplitude);
            }
        }
        return 0;
    }

    double noiseRms(const float* frame0) const {
        if (s_.noise.reference == NoiseReference::None) return 0;
        return noiseReference(frame0) / std::pow(10.0, s_.noise.snr_db / 20.0);
    }

    uint64_t seed() const { return seed_; }

private:
    size_t findSource(int e) const {
        const auto& v = s_.transmit.source_elements;
        if (v.empty()) return size_t(e);
        for (size_t i = 0; i < v.size(); ++i)
            if (v[i] == e) return i;
        return 0;
    }

    template <class F>
    void parallelFor(size_t n, F&& fn) {
        const unsigned nt = unsigned(std::min<size_t>(threads_, n));
        if (nt <= 1) {
            for (size_t i = 0; i < n; ++i) fn(i);
            return;
        }
        std::atomic<size_t> next{0};
        std::vector<std::thread> pool;
        for (unsigned k = 0; k < nt; ++k)
            pool.emplace_back([&] {
                for (size_t i; (i = next.fetch_add(1)) < n;) fn(i);
            });
        for (auto& th : pool) th.join();
    }

    const Scene& s_;
    uint64_t seed_;
    PathModel model_;
    ElasticModel elastic_;
    GaussianPulse pulse_;
    PulseTable table_;
    NoiseGenerator noise_;
    std::vector<PointSource> speckle_;
    size_t ntx_, nrx_, ns_;
    unsigned threads_ = 1;
};

double autoScale(const float* data, size_t n) {
    float m = 0;
    for (size_t i = 0; i < n; ++i) m = std::max(m, std::abs(data[i]));
    // Twice the frame-0 peak maps to full scale: room for echoes that appear in later frames.
    return m > 0 ? 2.0 * double(m) / 32767.0 : 1.0;
}

/// Rounds to int16 counts and back, exactly as a writer then a reader would.
void quantise(float* data, size_t n, double scale) {
    const double inv = 1.0 / scale;
    const float s = float(scale);
    for (size_t i = 0; i < n; ++i) {
        const double v = std::clamp(std::round(double(data[i]) * inv), -32768.0, 32767.0);
        data[i] = float(int16_t(v)) * s;
    }
}

}  // namespace

core::CaptureHeader makeHeader(const Scene& s, const SimOptions& o) {
    core::CaptureHeader h;
    h.title = s.title;
    h.created_utc = o.created_utc.empty() ? nowUtc() : o.created_utc;
    for (double x : s.array.elementX()) h.array.element_position_m.push_back({x, 0.0, 0.0});
    h.array.centre_frequency_hz = s.array.centre_frequency_hz;
    h.array.fractional_bandwidth = s.array.fractional_bandwidth;
    h.array.element_width_m = s.array.element_width_m;
    h.array.element_height_m = s.array.element_height_m;
    if (s.frames.kind == FrameKind::Encoded) h.array.elevation_beam_width_m = s.array.elevation_beam_width_m;
    h.transmit.kind = s.transmit.kind;
    const size_t ntx = s.transmit.count(s.array.elements);
    switch (s.transmit.kind) {
        case core::TransmitKind::SingleElement:
            for (size_t t = 0; t < ntx; ++t)
                h.transmit.source_element.push_back(s.transmit.source_elements.empty() ? int32_t(t) : s.transmit.source_elements[t]);
            break;
        case core::TransmitKind::PlaneWave: h.transmit.angle_rad = s.transmit.angles_rad; break;
        case core::TransmitKind::VirtualSource: h.transmit.virtual_source_m = s.transmit.virtual_sources_m; break;
    }
    for (int e = 0; e < s.array.elements; ++e) h.receive.element_index.push_back(e);
    h.receive.sampling_frequency_hz = s.sampling.frequency_hz;
    h.receive.start_time_s.assign(ntx, s.sampling.start_time_s);
    h.medium.speed_of_sound_m_s = s.medium.speed_m_s;
    h.medium.shear_speed_m_s = s.medium.shear_speed_m_s;
    h.medium.attenuation_db_per_cm_mhz = s.medium.attenuation_db_per_cm_mhz;
    h.medium.thickness_m = s.medium.thickness_m;
    if (s.wedge) h.medium.wedge = wedgeInfo(*s.wedge);
    const size_t nf = frameCount(s, o);
    if (s.frames.kind == FrameKind::Encoded) {
        core::ScanInfo sc;
        for (size_t f = 0; f < nf; ++f) sc.position_m.push_back(s.frames.scanPosition(f));
        h.scan = sc;
    } else if (s.frames.kind == FrameKind::Cine) {
        core::ScanInfo sc;
        for (size_t f = 0; f < nf; ++f) sc.time_s.push_back(s.frames.time(f));
        h.scan = sc;
    }
    auto truth = makeTruth(s);
    if (!truth.scatterer_position_m.empty() || !truth.regions_json.empty()) h.truth = truth;
    h.provenance["scenario"] = s.scenario;
    h.provenance["data"] = "synthetic demonstration data";
    h.provenance["simulator"] = simulatorVersion();
    h.provenance["seed"] = std::to_string(o.seed.value_or(s.seed));
    for (auto& [k, v] : s.provenance) h.provenance[k] = v;
    h.frames = nf;
    h.samples = s.sampling.samples;
    h.sample_type = s.output.sample_type;
    h.rf_scale = s.output.scale.value_or(1.0);
    h.rf_units = s.output.units;
    return h;
}

SimulatedCapture simulate(const Scene& s, const SimOptions& o) {
    const auto start = std::chrono::steady_clock::now();
    SimulatedCapture cap;
    cap.header = makeHeader(s, o);
    Engine eng(s, o);
    const size_t nf = cap.header.frames, fsz = eng.frameSize();
    if (double(nf) * double(fsz) * 4.0 > 8e9) throw core::InputError(s.source, "frames", "capture too large to simulate in memory");
    cap.rf.resize(nf * fsz);
    double rms = 0;
    for (size_t f = 0; f < nf; ++f) {
        float* buf = cap.rf.data() + f * fsz;
        eng.frame(f, buf, cap.stats);
        if (f == 0) rms = eng.noiseRms(buf);
        eng.addNoise(f, buf, rms);
        if (f == 0 && s.output.sample_type == core::SampleType::Int16 && !s.output.scale) cap.header.rf_scale = autoScale(buf, fsz);
        if (s.output.sample_type == core::SampleType::Int16) quantise(buf, fsz, cap.header.rf_scale);
        if (o.progress) o.progress(double(f + 1) / double(nf));
    }
    cap.stats.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    return cap;
}

SimStats simulateToFile(const Scene& s, const std::string& path, const SimOptions& o) {
    const auto start = std::chrono::steady_clock::now();
    SimStats st;
    core::CaptureHeader h = makeHeader(s, o);
    Engine eng(s, o);
    const size_t nf = h.frames, fsz = eng.frameSize(), bsz = eng.blockSize();
    std::vector<float> buf(fsz);
    std::unique_ptr<core::CaptureWriter> w;
    double rms = 0;
    for (size_t f = 0; f < nf; ++f) {
        eng.frame(f, buf.data(), st);
        if (f == 0) {
            rms = eng.noiseRms(buf.data());
        }
        eng.addNoise(f, buf.data(), rms);
        // Refuse before writing: amplitudes so large that samples overflow would make a capture
        // that the reader refuses.
        for (size_t i = 0; i < fsz; ++i)
            if (!std::isfinite(buf[i]))
                throw core::InputError(s.source, "reflectors", "the amplitudes give non-finite samples in frame " + std::to_string(f) +
                                                                   " (overflow); use amplitudes of a sensible size");
        if (f == 0) {
            if (s.output.sample_type == core::SampleType::Int16 && !s.output.scale) h.rf_scale = autoScale(buf.data(), fsz);
            w = std::make_unique<core::CaptureWriter>(path, h);
        }
        for (size_t t = 0; t < h.transmits(); ++t) w->writeBlock(f, t, buf.data() + t * bsz);
        if (o.progress) o.progress(double(f + 1) / double(nf));
    }
    w->finish();
    st.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    return st;
}

}  // namespace umbra::recon::sim
