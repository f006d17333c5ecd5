// SPDX-License-Identifier: MIT
#pragma once
// The examination report of a case as a PDF (QPdfWriter + QTextDocument, Qt Gui only: it runs on
// the offscreen platform from `umbra-cli report` and inside the workstation alike).
//
// Sections, in order: header (title, part and site, date, examiner, reviewer, procedure,
// criteria), background, technique, findings table (indication / interpretation / evaluation
// kept apart, values with their expanded uncertainty), one annotated image per finding (light
// theme) and the top view of encoded scans, pertinent negatives, comparison with prior
// examinations, [sections appended by appendSection], cautions, provenance, sign-off. Every
// page carries "page N of M". What the case does not hold is left blank to be filled in by hand,
// never invented. docs/report.md says where each value comes from.
#include <QImage>
#include <QString>

#include <functional>
#include <map>
#include <string>
#include <vector>

#include "core/case_file.h"

namespace umbra::ui::report {

struct ReportSettings {
    QString software;             ///< program name and version for the provenance, e.g. "Umbra 0.4.0"
    int threads = 0;              ///< worker threads for the reconstruction, 0 = all cores
    int image_width_px = 1600;    ///< width of each annotated image (pixels; printed 170 mm wide)
    /// Check each capture in a child process before reading it (command line: yes; a program
    /// with other threads using HDF5 must not fork, see core/isolated_check.h).
    bool isolated_check = false;
    /// Encoded scans: largest frames × pixels reconstructed for the top view (bounds time and memory).
    size_t top_view_max_pixels = 40'000'000;
    std::function<void(const QString&)> progress;  ///< what is being done (may be empty)
};

/// One section: a heading and its body in the HTML subset QTextDocument reads. Images the body
/// names (<img src="NAME">) are given in `images`.
struct ReportSection {
    QString id;        ///< stable name, e.g. "findings", "cautions"
    QString heading;   ///< "" = no heading (the title block)
    QString html;
    std::map<QString, QImage> images;
};

class Report {
public:
    /// Builds every section from the case: reconstructs each finding's frame with its capture's
    /// recipe (defaults when the case has none) through the same Reconstructor and display chain
    /// as the workstation and umbra-cli. `case_path` names the case (may be "" for an unsaved
    /// case). A missing or changed capture is said in the report (no image), never an exception;
    /// a recipe the capture cannot use throws core::SettingError naming the capture.
    Report(const core::CaseDocument& doc, const QString& case_path, const ReportSettings& settings);

    const std::vector<ReportSection>& sections() const { return sections_; }
    /// Adds a section after the case's own sections and before the closing ones (cautions,
    /// provenance, sign-off), after sections appended earlier: the hook for later additions
    /// such as a second reading and its agreement.
    void appendSection(ReportSection section);

    /// The whole report as one HTML text (images named as in the sections).
    QString html() const;
    /// Writes the PDF (A4, page numbers in the footer) atomically: a temporary file beside
    /// `path`, renamed over it. Throws core::InputError naming `path` if it cannot be written.
    void writePdf(const QString& path) const;
    /// True when any capture of the case is synthetic (simulated).
    bool synthetic() const { return synthetic_; }

private:
    std::vector<ReportSection> sections_;
    size_t closing_ = 0;  ///< index of the first closing section
    QString footer_;
    bool synthetic_ = false;
};

/// "Umbra is an aid …": the cautions printed in every report.
QString cautionsText();

}  // namespace umbra::ui::report
