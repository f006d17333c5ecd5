// SPDX-License-Identifier: MIT
#include "ui/report/report.h"

#include <QAbstractTextDocumentLayout>
#include <QDateTime>
#include <QFile>
#include <QFileInfo>
#include <QPainter>
#include <QPdfWriter>
#include <QTextDocument>
#include <QUrl>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <optional>
#include <set>

#include "core/capture_file.h"
#include "core/distance_amplitude.h"
#include "core/error.h"
#include "core/sha256.h"
#include "core/uncertainty.h"
#include "reconstruction/delay_model.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/tgc_stage.h"
#include "ui/report/case_images.h"

namespace umbra::ui::report {

namespace {

QString esc(const std::string& s) { return QString::fromStdString(s).toHtmlEscaped(); }
QString esc(const QString& s) { return s.toHtmlEscaped(); }

/// Blank line to write on by hand (the case does not hold the value).
const QString kBlank = QStringLiteral("<span style=\"color:#777\">______________________________</span>");

QString orBlank(const std::string& s) { return s.empty() ? kBlank : esc(s); }

QString paragraphs(const std::string& text, const QString& when_empty) {
    if (text.empty()) return QStringLiteral("<p><i>%1</i></p>").arg(when_empty.toHtmlEscaped());
    QString out;
    for (const QString& p : QString::fromStdString(text).split(QLatin1Char('\n'), Qt::SkipEmptyParts))
        out += QStringLiteral("<p>%1</p>").arg(p.toHtmlEscaped());
    return out;
}

QString fileSha256(const QString& path) {
    std::ifstream in(path.toStdString(), std::ios::binary);
    if (!in) return {};
    core::Sha256 h;
    std::vector<char> buf(1 << 16);
    while (in) {
        in.read(buf.data(), static_cast<std::streamsize>(buf.size()));
        if (in.gcount() > 0) h.update(buf.data(), static_cast<size_t>(in.gcount()));
    }
    return QString::fromStdString(h.hexDigest());
}

/// Decimal places of the shortest text that reads back as `v` (how the case wrote it).
int decimalsOf(double v) {
    const std::string t = nlohmann::json(v).dump();
    const auto e = t.find_first_of("eE");
    const auto dot = t.find('.');
    if (dot == std::string::npos) return 0;
    return static_cast<int>((e == std::string::npos ? t.size() : e) - dot - 1);
}

/// "4.1 ± 0.4 mm": the value as recorded in the case with the expanded uncertainty U of the
/// linked measurement, rounded together (GUM 7.2.6); never more decimals than the case gave.
QString withUncertainty(double v, std::optional<double> U, const char* unit) {
    if (!U || !(*U > 0)) {
        return QStringLiteral("%1 %2 <span style=\"color:#666\">(uncertainty not available)</span>")
            .arg(QString::fromStdString(nlohmann::json(v).dump()), QString::fromUtf8(unit));
    }
    const core::Rounded r = core::roundToUncertainty(v, *U);
    const int dc = decimalsOf(v);
    if (dc < r.decimals) {
        const double step = std::pow(10.0, -dc);
        const double u = std::max(step, std::round(*U / step) * step);
        return QStringLiteral("%1 ± %2 %3")
            .arg(QString::fromStdString(nlohmann::json(v).dump()))
            .arg(u, 0, 'f', dc)
            .arg(QString::fromUtf8(unit));
    }
    return QStringLiteral("%1 ± %2 %3").arg(QString::fromStdString(r.value_text), QString::fromStdString(r.uncertainty_text),
                                            QString::fromUtf8(unit));
}

/// Which indication field a measured quantity gives ("length −6 dB" -> "length", "upper tip x" -> "x").
QString fieldOf(const std::string& name) {
    const QString n = QString::fromStdString(name);
    if (n.startsWith(QLatin1String("length")) && !n.contains(QLatin1String("scan"))) return QStringLiteral("length");
    if (n.startsWith(QLatin1String("height"))) return QStringLiteral("height");
    if (n == QLatin1String("x") || n == QLatin1String("upper tip x")) return QStringLiteral("x");
    if (n == QLatin1String("depth") || n == QLatin1String("upper tip depth")) return QStringLiteral("depth");
    return {};
}

QString frameText(const core::CaptureHeader* h, size_t f) {
    QString s = QStringLiteral("frame %1").arg(f + 1);
    if (h && h->scan && f < h->scan->position_m.size())
        s += QStringLiteral(" (y = %1 mm)").arg(h->scan->position_m[f] * 1e3, 0, 'f', 1);
    return s;
}

QString tgcText(const core::CaptureHeader& h, const core::Recipe& r) {
    const std::string mode = r.text("tgc.mode");
    if (mode == "off") return QStringLiteral("off");
    if (mode == "curve") {
        QStringList pts;
        try {
            for (const auto& [z_m, db] : recon::parseTgcCurve(r.text("tgc.curve")))
                pts << QStringLiteral("%1 dB at %2 mm").arg(db, 0, 'g', 4).arg(z_m * 1e3, 0, 'g', 5);
        } catch (const std::exception&) {
            return QStringLiteral("gain curve (cannot be read)");
        }
        return QStringLiteral("gain curve, %1; linear between, held beyond").arg(pts.join(QStringLiteral(", ")));
    }
    if (mode != "attenuation") return QString::fromStdString(mode);
    const recon::TgcInputs in = recon::resolvedTgcInputs(h, r);
    return QStringLiteral("attenuation, round-trip gain 2·α·f·z with α = %1 dB/cm/MHz one way (%2), f = %3 MHz (%4)")
        .arg(in.attenuation_db_per_cm_mhz, 0, 'f', 2)
        .arg(!in.attenuation_from_capture ? QStringLiteral("recipe")
             : in.attenuation_recorded    ? QStringLiteral("from the capture")
                                          : QStringLiteral("none recorded in the capture: no gain"))
        .arg(in.frequency_mhz, 0, 'f', 2)
        .arg(in.frequency_from_capture ? QStringLiteral("array centre frequency") : QStringLiteral("recipe"));
}

QString referenceText(const core::CaseDocument& doc) {
    if (!doc.curve || doc.curve->points.empty())
        return QStringLiteral("No amplitude calibration recorded in the case: amplitudes are given in dB re the frame's "
                              "strongest echo (frame peak), which is not a sensitivity reference.");
    const auto& c = *doc.curve;
    QString s = QStringLiteral("Distance–amplitude curve (DAC): %1; %2 point(s)")
                    .arg(c.label.empty() ? QStringLiteral("reflectors not named") : esc(c.label))
                    .arg(c.points.size());
    if (const auto r = core::depthRange(c))
        s += QStringLiteral(", depth %1 to %2 mm (end level held beyond)").arg(r->first * 1e3, 0, 'f', 1).arg(r->second * 1e3, 0, 'f', 1);
    s += QStringLiteral("; amplitudes read %1. Amplitudes of findings are given in dB re the curve at their depth.")
             .arg(QString::fromUtf8(core::basisName(c.basis)));
    if (c.recipe_json.empty()) s += QStringLiteral(" The recipe the curve was read with is not recorded.");
    return s;
}

/// A SHA-256 on a line of its own in a small fixed-width font, so that it is never broken.
QString hashLine(const QString& what, const QString& hex) {
    return QStringLiteral("<p><b>%1:</b><br/><span style=\"font-family:'DejaVu Sans Mono',monospace; font-size:7.5pt\">%2</span></p>")
        .arg(what.toHtmlEscaped(), hex.toHtmlEscaped());
}

QString table(const QList<QPair<QString, QString>>& rows) {
    QString t = QStringLiteral("<table cellspacing=\"0\" cellpadding=\"3\" width=\"100%\">");
    for (const auto& [k, v] : rows)
        t += QStringLiteral("<tr><td width=\"28%\"><b>%1</b></td><td>%2</td></tr>").arg(k, v);
    return t + QStringLiteral("</table>");
}

}  // namespace

QString cautionsText() {
    return QStringLiteral(
        "Umbra is an aid to the examiner. The written procedure, the applicable code or standard and qualified, "
        "licensed professionals decide on acceptance, on clinical use and on any action; this report does not. "
        "Sizes and amplitudes come from reconstructed images and carry the expanded uncertainties shown (k = 2, "
        "about 95 %); an extent marked \"≤\" is resolution-limited and may be smaller. Amplitudes re the frame peak "
        "are not a sensitivity calibration. Check every value against the images and the procedure before relying on it.");
}

Report::Report(const core::CaseDocument& doc, const QString& case_path, const ReportSettings& settings) {
    auto say = [&](const QString& s) {
        if (settings.progress) settings.progress(s);
    };
    CaseImages images(doc, settings.isolated_check, settings.threads);
    for (size_t i = 0; i < images.captureCount(); ++i)
        if (images.capture(i).header && images.capture(i).header->isSynthetic()) synthetic_ = true;

    const QString title = doc.title.empty() ? (case_path.isEmpty() ? QStringLiteral("Untitled case") : QFileInfo(case_path).completeBaseName())
                                            : QString::fromStdString(doc.title);
    const QString synthetic_note = QStringLiteral(
        "<p style=\"color:#a00000\"><b>SYNTHETIC DATA</b> — made by a simulator, not an examination of a real part or person.</p>");

    // ------------------------------------------------------------ title block
    {
        ReportSection s;
        s.id = QStringLiteral("title");
        s.html = QStringLiteral("<h1>%1</h1><p style=\"color:#444\">Examination report</p>").arg(esc(title));
        if (synthetic_) s.html += synthetic_note;
        const auto& h = doc.header;
        s.html += table({{QStringLiteral("Part"), orBlank(h.part)},
                         {QStringLiteral("Site"), orBlank(h.site)},
                         {QStringLiteral("Date of examination"), orBlank(h.date)},
                         {QStringLiteral("Examiner"), orBlank(h.examiner)},
                         {QStringLiteral("Reviewer"), orBlank(h.reviewer)},
                         {QStringLiteral("Procedure"), orBlank(h.procedure)},
                         {QStringLiteral("Acceptance criteria"), orBlank(h.criteria)}});
        sections_.push_back(s);
    }
    sections_.push_back({QStringLiteral("background"), QStringLiteral("Background"),
                         paragraphs(doc.background, QStringLiteral("None recorded in the case.")), {}});

    // ------------------------------------------------------------ technique
    {
        ReportSection s;
        s.id = QStringLiteral("technique");
        s.heading = QStringLiteral("Technique");
        for (size_t i = 0; i < images.captureCount(); ++i) {
            const CaptureInfo& ci = images.capture(i);
            s.html += QStringLiteral("<p><b>Capture %1: %2</b></p>").arg(i + 1).arg(esc(QFileInfo(ci.path).fileName()));
            if (!ci.header) {
                s.html += QStringLiteral("<p>Not available: %1.</p>").arg(esc(ci.problem));
                if (!doc.technique.empty())
                    s.html += QStringLiteral("<p>As recorded in the case:</p>") + paragraphs(doc.technique, {});
                continue;
            }
            const auto& h = *ci.header;
            const core::Recipe& r = ci.recipe;
            QList<QPair<QString, QString>> rows;
            rows << qMakePair(QStringLiteral("Array"), QStringLiteral("%1 elements, pitch %2 mm, centre frequency %3 MHz, %4 % bandwidth (−6 dB)")
                                                           .arg(h.array.elementCount())
                                                           .arg(h.array.pitch_m() * 1e3, 0, 'f', 2)
                                                           .arg(h.array.centre_frequency_hz / 1e6, 0, 'f', 2)
                                                           .arg(h.array.fractional_bandwidth * 100, 0, 'f', 0));
            rows << qMakePair(QStringLiteral("Transmit"), QStringLiteral("%1, %2 transmits%3; %4 frame(s)%5")
                                                              .arg(QString::fromUtf8(core::transmitLabel(h.transmit.kind)))
                                                              .arg(h.transmits())
                                                              .arg(h.transmit.kind == core::TransmitKind::SingleElement
                                                                       ? QStringLiteral(", imaged by the total focusing method")
                                                                       : QStringLiteral(", coherently compounded"))
                                                              .arg(h.frames)
                                                              .arg(h.scan && h.scan->position_m.size() > 1 ? QStringLiteral(", encoded scan")
                                                                                                           : QString()));
            rows << qMakePair(QStringLiteral("Sampling"), QStringLiteral("%1 MHz, %2 samples per trace")
                                                              .arg(h.receive.sampling_frequency_hz / 1e6, 0, 'f', 1)
                                                              .arg(h.samples));
            double c = h.medium.speed_of_sound_m_s;
            try {
                c = recon::resolvedSpeed(h, r);
            } catch (const std::exception&) {
            }
            QString speed = QStringLiteral("%1 m/s (%2)").arg(c, 0, 'f', 0).arg(
                r.number("delay_model.speed_of_sound_m_s") > 0 ? QStringLiteral("recipe; the capture records %1 m/s").arg(h.medium.speed_of_sound_m_s, 0, 'f', 0)
                                                               : QStringLiteral("from the capture"));
            rows << qMakePair(QStringLiteral("Speed of sound"), speed);
            QString grid = QStringLiteral("not reconstructed");
            try {
                const recon::Grid g = recon::resolveGrid(h, r);
                grid = QStringLiteral("pixel %1 mm, x %2 to %3 mm, depth %4 to %5 mm; amplitude fidelity %6 dB "
                                      "(worst-case loss of a point echo's peak between pixels)")
                           .arg(g.step_m * 1e3, 0, 'f', 3)
                           .arg(g.x_min_m * 1e3, 0, 'f', 1)
                           .arg(g.x_max_m * 1e3, 0, 'f', 1)
                           .arg(g.z_min_m * 1e3, 0, 'f', 1)
                           .arg(g.z_max_m * 1e3, 0, 'f', 1)
                           .arg(recon::amplitudeFidelityDb(h, r, g), 0, 'f', 2);
            } catch (const std::exception& e) {
                grid = QStringLiteral("cannot be made: %1").arg(esc(std::string(e.what())));
            }
            rows << qMakePair(QStringLiteral("Image grid"), grid);
            rows << qMakePair(QStringLiteral("TCG"), esc(tgcText(h, r)));
            rows << qMakePair(QStringLiteral("Display"), QStringLiteral("dynamic range %1 dB, colour map %2")
                                                             .arg(r.number("log_compression.dynamic_range_db"), 0, 'f', 0)
                                                             .arg(esc(r.text("colour_map.map"))));
            rows << qMakePair(QStringLiteral("Recipe"), ci.recipe_default ? QStringLiteral("the default settings (the case holds no recipe)")
                                                                          : QStringLiteral("as saved in the case (full text under Provenance)"));
            rows << qMakePair(QStringLiteral("Calibration and amplitude reference"), referenceText(doc));
            const double rel = doc.speed_uncertainty_rel.value_or(
                core::speedUncertaintyDefault(doc.sizing_medium.empty() ? core::mediumForSpeed(c) : doc.sizing_medium).relative);
            rows << qMakePair(QStringLiteral("Sizing"), QStringLiteral("uncertainty budgets per GUM, expanded with k = 2; speed of sound "
                                                                       "standard uncertainty %1 %")
                                                            .arg(rel * 100, 0, 'g', 2));
            if (h.isSynthetic()) rows << qMakePair(QStringLiteral("Data"), QStringLiteral("<b>synthetic data</b> (simulated capture)"));
            s.html += table(rows);
        }
        if (images.captureCount() == 0) s.html += QStringLiteral("<p><i>The case holds no capture.</i></p>");
        sections_.push_back(s);
    }

    // ------------------------------------------------------------ findings table
    std::map<std::string, const core::Measurement*> by_id;
    for (const auto& c : doc.captures)
        for (const auto& m : c.measurements) by_id[m.id] = &m;
    std::map<std::string, int> numbers;
    for (const auto& f : doc.findings)
        for (const auto& id : f.indication.measurement_ids) numbers[id] = f.number;
    {
        ReportSection s;
        s.id = QStringLiteral("findings");
        s.heading = QStringLiteral("Findings");
        if (doc.findings.empty()) {
            s.html = QStringLiteral("<p><i>No findings recorded in the case.</i></p>");
        } else {
            s.html = QStringLiteral(
                "<p>Each finding keeps its indication (what the images show), its interpretation (what the indication is) and its "
                "evaluation (against the criteria) apart. Values as recorded in the case with the expanded uncertainty (k = 2) of the "
                "linked measurement, recomputed on the reconstructed image.</p>"
                "<table border=\"1\" cellspacing=\"0\" cellpadding=\"4\" width=\"100%\" style=\"border-color:#999\">"
                "<tr style=\"background-color:#e8e8e8\"><th width=\"6%\">No.</th><th width=\"50%\">Indication</th>"
                "<th width=\"22%\">Interpretation</th><th width=\"22%\">Evaluation</th></tr>");
            for (const auto& f : doc.findings) {
                say(QStringLiteral("Finding F%1").arg(f.number));
                const auto& in = f.indication;
                std::map<QString, double> U;  // field -> expanded uncertainty
                std::map<QString, double> now;
                std::set<QString> upper;  // resolution-limited extents: the true value may be smaller
                QStringList ms;
                for (const auto& id : in.measurement_ids) {
                    auto it = by_id.find(id);
                    if (it == by_id.end()) {
                        ms << QStringLiteral("%1 (not in the case)").arg(esc(id));
                        continue;
                    }
                    ms << QStringLiteral("%1 (%2)").arg(esc(id), esc(core::kindName(it->second->kind)));
                    for (const auto& q : images.quantities(in.capture_index, *it->second)) {
                        const QString field = fieldOf(q.name);
                        if (field.isEmpty() || U.count(field)) continue;
                        U[field] = core::kCoverageFactor * q.uncertainty;
                        now[field] = q.value;
                        if (q.upper_bound) upper.insert(field);
                    }
                }
                // A position read off the image without a sizing: the budget of a depth marker there
                // (half a pixel, point spread, speed of sound), as the depth-marker tool gives it.
                if (!U.count(QStringLiteral("depth")) && in.depth_mm && in.capture_index < images.captureCount())
                    if (const FrameImage* fi = images.frame(in.capture_index, in.frame_index)) {
                        core::Measurement marker;
                        marker.kind = core::MeasurementKind::DepthMarker;
                        marker.frame_index = in.frame_index;
                        marker.points = {{in.x_mm.value_or(0), *in.depth_mm}};
                        try {
                            for (const auto& q : core::evaluate(marker, fi->model))
                                if (q.name == "depth") U[QStringLiteral("depth")] = core::kCoverageFactor * q.uncertainty;
                        } catch (const std::exception&) {
                        }
                    }
                QStringList vals;
                auto add = [&](const char* label, const char* field, const std::optional<double>& v) {
                    if (!v) return;
                    const QString k = QString::fromLatin1(field);
                    const auto u = U.count(k) ? std::optional(U[k]) : std::nullopt;
                    QString t = QStringLiteral("%1 %2").arg(QString::fromLatin1(label), withUncertainty(*v, u, "mm"));
                    if (upper.count(k))
                        t = QStringLiteral("%1 ≤ %2 mm (resolution-limited: the true extent may be smaller; U = %3 mm, k = 2)")
                                .arg(QString::fromLatin1(label), QString::fromStdString(nlohmann::json(*v).dump()))
                                .arg(QString::fromStdString(core::roundToUncertainty(*u, *u).uncertainty_text));
                    if (u && now.count(k) && std::abs(now[k] - *v) > *u)
                        t += QStringLiteral(" <span style=\"color:#a00000\">(the image now gives %1: check)</span>")
                                 .arg(QString::fromStdString(core::formatWithUncertainty(now[k], *u, "mm")));
                    vals << t;
                };
                add("x", "x", in.x_mm);
                add("depth", "depth", in.depth_mm);
                add("length", "length", in.length_mm);
                add("height", "height", in.height_mm);
                QString ind = QStringLiteral("<b>%1</b>").arg(orBlank(in.location));
                if (in.capture_index < images.captureCount())
                    ind += QStringLiteral("<br/>capture %1 (%2), %3")
                               .arg(in.capture_index + 1)
                               .arg(esc(QFileInfo(images.capture(in.capture_index).path).fileName()))
                               .arg(frameText(images.capture(in.capture_index).header ? &*images.capture(in.capture_index).header : nullptr,
                                              in.frame_index));
                if (!vals.isEmpty()) ind += QStringLiteral("<br/>") + vals.join(QStringLiteral("; "));
                if (in.peak_db) {
                    ind += QStringLiteral("<br/>peak %1 dB re %2")
                               .arg(*in.peak_db, 0, 'f', 1)
                               .arg(in.reference.empty() ? (doc.curve ? QStringLiteral("DAC") : QStringLiteral("frame peak"))
                                                         : esc(in.reference));
                    if (const FrameImage* fi = images.frame(in.capture_index, in.frame_index))
                        ind += QStringLiteral(" (the image grid may read a peak up to %1 dB low)").arg(fi->fidelity_db, 0, 'f', 1);
                }
                if (!in.description.empty()) ind += QStringLiteral("<br/>") + esc(in.description);
                if (!ms.isEmpty()) ind += QStringLiteral("<br/><span style=\"color:#555\">measurements: %1</span>").arg(ms.join(QStringLiteral(", ")));
                QString interp = QStringLiteral("<b>%1</b>").arg(esc(core::interpretationLabel(f.interpretation)));
                if (!f.interpretation_reason.empty()) interp += QStringLiteral("<br/>") + esc(f.interpretation_reason);
                QString eval;
                if (!f.evaluationApplicable()) {
                    eval = QStringLiteral("<i>not applicable (the indication is not relevant)</i>");
                } else {
                    eval = QStringLiteral("<b>%1</b>").arg(esc(core::evaluationLabel(f.evaluation)));
                    if (!f.criterion.empty()) eval += QStringLiteral("<br/>criterion: ") + esc(f.criterion);
                }
                s.html += QStringLiteral("<tr><td>F%1</td><td>%2</td><td>%3</td><td>%4</td></tr>").arg(f.number).arg(ind, interp, eval);
            }
            s.html += QStringLiteral("</table>");
        }
        sections_.push_back(s);
    }

    // ------------------------------------------------------------ images
    {
        ReportSection s;
        s.id = QStringLiteral("images");
        s.heading = QStringLiteral("Images");
        const int w = settings.image_width_px;
        std::set<size_t> top_views;
        for (const auto& f : doc.findings) {
            const auto& in = f.indication;
            const size_t ci = in.capture_index;
            const QString name = QStringLiteral("finding-%1.png").arg(QString::fromStdString(f.id));
            s.html += QStringLiteral("<p><b>F%1</b> — %2</p>").arg(f.number).arg(esc(in.location));
            if (ci >= images.captureCount()) {
                s.html += QStringLiteral("<p><i>No image: the finding names capture %1, which the case does not hold.</i></p>").arg(ci + 1);
                continue;
            }
            const CaptureInfo& info = images.capture(ci);
            if (!info.header) {
                s.html += QStringLiteral("<p><i>No image: %1.</i></p>").arg(esc(info.problem));
                continue;
            }
            say(QStringLiteral("Image of F%1").arg(f.number));
            std::vector<core::Measurement> shown;
            QRectF region;
            for (const auto& id : in.measurement_ids)
                if (auto it = by_id.find(id); it != by_id.end() && it->second->frame_index == in.frame_index) {
                    shown.push_back(*it->second);
                    for (const auto& p : it->second->points) region |= QRectF(p.x_mm - 0.01, p.z_mm - 0.01, 0.02, 0.02);
                }
            // The region around the finding's measurements with room for context (at least 20 × 14 mm).
            if (!region.isEmpty()) {
                const QPointF c = region.center();
                const double rw = std::max(20.0, region.width() * 2.5), rh = std::max(14.0, region.height() * 2.5);
                region = QRectF(c.x() - rw / 2, c.y() - rh / 2, rw, rh);
            }
            QStringList caption;
            caption << QStringLiteral("F%1, %2, %3").arg(f.number).arg(QFileInfo(info.path).fileName(), frameText(&*info.header, in.frame_index));
            caption << QStringLiteral("%1 elements, %2 MHz, %3, speed of sound %4 m/s")
                           .arg(info.header->array.elementCount())
                           .arg(info.header->array.centre_frequency_hz / 1e6, 0, 'f', 1)
                           .arg(QString::fromUtf8(core::transmitLabel(info.header->transmit.kind)))
                           .arg(recon::resolvedSpeed(*info.header, info.recipe), 0, 'f', 0);
            caption << (doc.curve ? QStringLiteral("Image in dB re the frame peak; finding amplitudes in dB re DAC")
                                  : QStringLiteral("Amplitudes in dB re the frame peak (0 dB = the frame's strongest echo)"));
            if (in.peak_db)
                caption << QStringLiteral("Peak %1 dB re %2").arg(*in.peak_db, 0, 'f', 1).arg(doc.curve ? QStringLiteral("DAC") : QStringLiteral("frame peak"));
            caption << QStringLiteral("Labels: length along x, height in depth, each ± its expanded uncertainty (k = 2)");
            if (info.header->isSynthetic()) caption << QStringLiteral("Synthetic data");
            const QImage img = images.annotated(ci, in.frame_index, shown, numbers, caption, w, Theme::Light, region);
            if (img.isNull()) {
                s.html += QStringLiteral("<p><i>No image: frame %1 is not in the capture.</i></p>").arg(in.frame_index + 1);
                continue;
            }
            s.images[name] = img;
            s.html += QStringLiteral("<p><img src=\"%1\" width=\"640\"/></p>").arg(name);
            if (info.header->scan && info.header->scan->position_m.size() > 1 && info.header->frames > 1) top_views.insert(ci);
        }
        for (size_t ci : top_views) {
            // Depth gate: the findings' measurements on this capture with 2 mm either side.
            double z0 = 1e30, z1 = -1e30;
            for (const auto& f : doc.findings)
                if (f.indication.capture_index == ci)
                    for (const auto& id : f.indication.measurement_ids)
                        if (auto it = by_id.find(id); it != by_id.end())
                            for (const auto& p : it->second->points) {
                                z0 = std::min(z0, p.z_mm - 2);
                                z1 = std::max(z1, p.z_mm + 2);
                            }
            if (z0 > z1) {
                z0 = -1e30;
                z1 = 1e30;
            }
            say(QStringLiteral("Top view of capture %1").arg(ci + 1));
            QString why;
            const QImage tv = images.topView(ci, z0, z1, w, Theme::Light, settings.top_view_max_pixels, &why);
            s.html += QStringLiteral("<p><b>Top view</b> — capture %1 (%2)</p>").arg(ci + 1).arg(esc(QFileInfo(images.capture(ci).path).fileName()));
            if (tv.isNull()) {
                s.html += QStringLiteral("<p><i>No top view: %1.</i></p>").arg(esc(why));
                continue;
            }
            const QString name = QStringLiteral("top-view-%1.png").arg(ci);
            s.images[name] = tv;
            s.html += QStringLiteral("<p><img src=\"%1\" width=\"640\"/></p>").arg(name);
        }
        if (doc.findings.empty()) s.html += QStringLiteral("<p><i>No findings, so no images.</i></p>");
        sections_.push_back(s);
    }

    // ------------------------------------------------------------ negatives, prior
    {
        QString neg;
        if (doc.pertinent_negatives.empty()) {
            neg = QStringLiteral("<p><i>None recorded in the case.</i></p>");
        } else {
            neg = QStringLiteral("<ul>");
            for (const auto& n : doc.pertinent_negatives) neg += QStringLiteral("<li>%1</li>").arg(esc(n));
            neg += QStringLiteral("</ul>");
        }
        sections_.push_back({QStringLiteral("negatives"), QStringLiteral("Pertinent negatives"), neg, {}});
        sections_.push_back({QStringLiteral("prior"), QStringLiteral("Comparison with prior examinations"),
                             paragraphs(doc.prior_comparison, QStringLiteral("None recorded in the case.")), {}});
    }
    closing_ = sections_.size();

    // ------------------------------------------------------------ closing sections
    sections_.push_back({QStringLiteral("cautions"), QStringLiteral("Cautions"), QStringLiteral("<p>%1</p>").arg(esc(cautionsText())), {}});
    {
        ReportSection s;
        s.id = QStringLiteral("provenance");
        s.heading = QStringLiteral("Provenance");
        QList<QPair<QString, QString>> rows;
        rows << qMakePair(QStringLiteral("Software"), esc(settings.software));
        rows << qMakePair(QStringLiteral("Report made"), QDateTime::currentDateTimeUtc().toString(QStringLiteral("yyyy-MM-dd HH:mm 'UTC'")));
        if (!case_path.isEmpty()) {
            rows << qMakePair(QStringLiteral("Case file"), esc(QFileInfo(case_path).absoluteFilePath()));
        }
        s.html += table(rows);
        if (!case_path.isEmpty()) {
            const QString h = fileSha256(case_path);
            if (!h.isEmpty()) s.html += hashLine(QStringLiteral("Case file SHA-256"), h);
        }
        for (size_t i = 0; i < images.captureCount(); ++i) {
            const CaptureInfo& ci = images.capture(i);
            QList<QPair<QString, QString>> cr;
            cr << qMakePair(QStringLiteral("File"), esc(ci.path));
            cr << qMakePair(QStringLiteral("Check"), ci.status == core::CaptureStatus::Ok ? QStringLiteral("the file's bytes match the recorded SHA-256")
                                                     : ci.status == core::CaptureStatus::Changed
                                                         ? QStringLiteral("<b>the file's bytes differ from the recorded SHA-256</b>")
                                                         : QStringLiteral("<b>file not found</b>"));
            if (ci.header) {
                if (!ci.header->title.empty()) cr << qMakePair(QStringLiteral("Title"), esc(ci.header->title));
                if (!ci.header->created_utc.empty()) cr << qMakePair(QStringLiteral("Recorded"), esc(ci.header->created_utc));
                cr << qMakePair(QStringLiteral("Origin"), ci.header->isSynthetic() ? QStringLiteral("<b>synthetic data</b> (simulated)")
                                                                                    : QStringLiteral("recorded data (per the capture's provenance)"));
            }
            const QString recipe_text = QStringLiteral("<span style=\"font-size:7pt\">%1</span>").arg(esc(QString::fromStdString(ci.recipe.toJson(-1))));
            cr << qMakePair(QStringLiteral("Recipe"), ci.recipe_default ? QStringLiteral("defaults (none in the case): ") + recipe_text : recipe_text);
            s.html += QStringLiteral("<p><b>Capture %1</b></p>").arg(i + 1) +
                      hashLine(QStringLiteral("SHA-256 (recorded in the case)"), QString::fromStdString(ci.sha256_recorded)) + table(cr);
        }
        sections_.push_back(s);
    }
    {
        ReportSection s;
        s.id = QStringLiteral("sign-off");
        s.heading = QStringLiteral("Sign-off");
        const auto& h = doc.header;
        s.html = QStringLiteral(
                     "<table border=\"1\" cellspacing=\"0\" cellpadding=\"8\" width=\"100%\" style=\"border-color:#999\">"
                     "<tr style=\"background-color:#e8e8e8\"><th width=\"16%\"></th><th width=\"34%\">Name</th><th width=\"30%\">Signature</th>"
                     "<th width=\"20%\">Date</th></tr>"
                     "<tr><td><b>Examiner</b></td><td>%1</td><td><br/><br/></td><td></td></tr>"
                     "<tr><td><b>Reviewer</b></td><td>%2</td><td><br/><br/></td><td></td></tr></table>")
                     .arg(h.examiner.empty() ? QString() : esc(h.examiner), h.reviewer.empty() ? QString() : esc(h.reviewer));
        sections_.push_back(s);
    }
    footer_ = title;
    if (synthetic_) footer_ += QStringLiteral(" — synthetic data");
}

void Report::appendSection(ReportSection section) {
    sections_.insert(sections_.begin() + static_cast<long>(closing_), std::move(section));
    ++closing_;
}

QString Report::html() const {
    QString h = QStringLiteral("<html><body>");
    for (const auto& s : sections_) {
        if (!s.heading.isEmpty()) h += QStringLiteral("<h2>%1</h2>").arg(esc(s.heading));
        h += s.html;
    }
    return h + QStringLiteral("</body></html>");
}

void Report::writePdf(const QString& path) const {
    const QString tmp = path + QStringLiteral(".part");
    {
        QPdfWriter w(tmp);
        w.setPageSize(QPageSize(QPageSize::A4));
        w.setPageMargins(QMarginsF(18, 15, 18, 15), QPageLayout::Millimeter);
        w.setResolution(300);
        w.setTitle(footer_);
        w.setCreator(QStringLiteral("Umbra"));
        QTextDocument doc;
        doc.documentLayout()->setPaintDevice(&w);
        QFont font(QStringLiteral("DejaVu Sans"));
        font.setPointSizeF(9);
        doc.setDefaultFont(font);
        doc.setDefaultStyleSheet(QStringLiteral("h1 { font-size: 17pt; } h2 { font-size: 12pt; margin-top: 14px; } "
                                                "th { text-align: left; } td { vertical-align: top; }"));
        for (const auto& s : sections_)
            for (const auto& [name, img] : s.images) doc.addResource(QTextDocument::ImageResource, QUrl(name), QVariant(img));
        doc.setHtml(html());
        QPainter p;
        if (!p.begin(&w)) {
            QFile::remove(tmp);
            throw core::InputError(path.toStdString(), "", "cannot write the PDF (folder missing or not writable?)");
        }
        const double dpi = w.resolution();
        const double footer_h = 10.0 / 25.4 * dpi;  // 10 mm for the page footer
        const QSizeF body(w.width(), w.height() - footer_h);
        doc.setPageSize(body);
        const int pages = doc.pageCount();
        QFont ff = font;
        ff.setPointSizeF(7.5);
        for (int i = 0; i < pages; ++i) {
            if (i > 0) w.newPage();
            p.save();
            p.translate(0, -i * body.height());
            doc.drawContents(&p, QRectF(0, i * body.height(), body.width(), body.height()));
            p.restore();
            p.setFont(ff);
            p.setPen(QColor(90, 90, 90));
            const QRectF foot(0, body.height() + footer_h * 0.3, body.width(), footer_h * 0.7);
            p.drawLine(QPointF(0, foot.top()), QPointF(body.width(), foot.top()));
            p.drawText(foot, Qt::AlignLeft | Qt::AlignVCenter, footer_);
            p.drawText(foot, Qt::AlignRight | Qt::AlignVCenter, QStringLiteral("page %1 of %2").arg(i + 1).arg(pages));
        }
        p.end();
    }
    std::error_code ec;
    std::filesystem::rename(tmp.toStdString(), path.toStdString(), ec);
    if (ec) {
        QFile::remove(tmp);
        throw core::InputError(path.toStdString(), "", "cannot replace the PDF: " + ec.message());
    }
}

}  // namespace umbra::ui::report
