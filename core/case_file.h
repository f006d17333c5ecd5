// SPDX-License-Identifier: MIT
#pragma once
// The case: a saved working session (.umbracase, JSON, schema documented in docs/case-file.md).
// Captures are kept by path and SHA-256; in memory paths are as given (normally absolute);
// in the file they are written relative to the case file's folder when possible and resolved
// against it on load.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "core/distance_amplitude.h"
#include "core/finding.h"
#include "core/measurement.h"
#include "core/weld_geometry.h"

namespace umbra::core {

/// Current schema version written by saveCase / caseToJson.
inline constexpr int kCaseVersion = 1;

struct ViewState {
    size_t frame = 0;          ///< frame shown
    double zoom = 1;           ///< 1 = fit
    double centre_x_mm = 0;    ///< view centre, mm
    double centre_z_mm = 0;
    std::string tool;          ///< active tool name, e.g. "caliper" ("" = none)
    /// Views (delay_model.mode names, e.g. "TT-T") chosen for the views strip beside the large
    /// view; empty = no strip. Names the capture cannot image are kept but not shown.
    std::vector<std::string> views;
    bool operator==(const ViewState&) const = default;
};

struct CaseCapture {
    std::string path;          ///< capture file path (absolute after load)
    std::string sha256;        ///< of the capture file's bytes, lowercase hex
    std::string recipe_json;   ///< the recipe as JSON text ({"stage": {"param": value}}; "" = none)
    ViewState view;
    std::vector<Measurement> measurements;
    /// Calibration done on this capture, as plain lines for the technique block: the speed of
    /// sound (and fixed delay) and the element health, each with its method and uncertainty.
    std::vector<std::string> speed_calibration;
    std::vector<std::string> element_health;
    bool operator==(const CaseCapture&) const = default;
};

/// Report header fields, entered by the user (never filled in by the program; blank = the
/// report leaves a line to write on).
struct ReportHeader {
    std::string part;        ///< the part examined, e.g. "Weld W-12, 25 mm plate"
    std::string site;        ///< where it was examined
    std::string date;        ///< date of the examination as the user writes it (ISO 8601 advised)
    std::string examiner;    ///< name (and qualification) of the examiner
    std::string reviewer;    ///< name (and qualification) of the reviewer
    std::string procedure;   ///< written procedure followed (number, revision)
    std::string criteria;    ///< acceptance criteria / code referenced
    bool empty() const {
        return part.empty() && site.empty() && date.empty() && examiner.empty() && reviewer.empty() &&
               procedure.empty() && criteria.empty();
    }
    bool operator==(const ReportHeader&) const = default;
};

struct CaseDocument {
    int version = kCaseVersion;
    std::string title;
    ReportHeader header;        ///< report header fields (case file key "report_header")
    std::string background;     ///< why the examination was ordered
    std::string technique;      ///< technique block text (filled from capture + recipe)
    std::vector<std::string> pertinent_negatives;  ///< things looked for and not present
    std::string prior_comparison;                   ///< comparison with a prior examination
    std::vector<CaseCapture> captures;
    size_t active_capture = 0;
    std::vector<Finding> findings;
    /// The amplitude reference of the case: amplitudes in findings, the trace view and the
    /// readout are given in dB re this curve at their depth. Unset: dB re the frame's peak.
    /// (A file with the older single `amplitude_reference` loads as a one-point curve.)
    std::optional<DistanceAmplitudeCurve> curve;
    /// Sizing: medium of the speed-of-sound default ("steel", "water", "soft tissue", "other";
    /// "" = guessed from the speed) and the case's relative standard uncertainty of the speed
    /// (unset = the medium's default; core/uncertainty.h).
    std::string sizing_medium;
    std::optional<double> speed_uncertainty_rel;
    /// Weld geometry drawn over every view (unset: no overlay; older cases have none).
    std::optional<WeldGeometry> weld;
    bool operator==(const CaseDocument&) const = default;
};

/// JSON text of the case. Capture paths are written relative to `base_dir` when they lie
/// under it (or can be reached with "../"), with the absolute path beside them as a fallback
/// ("path_absolute"; left out when `absolute_fallback` is false); `base_dir` empty = paths
/// written as they are.
std::string caseToJson(const CaseDocument& doc, const std::string& base_dir = "", bool absolute_fallback = true);
/// Parses and checks a case. Relative capture paths are resolved against `base_dir`; when that
/// file does not exist but the recorded absolute path does, the absolute path is used.
/// Throws InputError naming `source` and the JSON key (e.g. "findings[2].interpretation")
/// for bad JSON, a missing/ill-typed key, an unknown enum name or an unknown version.
CaseDocument caseFromJson(const std::string& text, const std::string& source,
                          const std::string& base_dir = "");

/// Saves atomically: writes a temporary file in the same folder, flushes and fsyncs it, renames
/// it over `path` (and fsyncs the folder). On failure the old file is untouched and InputError
/// naming `path` is thrown. `absolute_fallback` false: no "path_absolute" beside relative paths.
void saveCase(const std::string& path, const CaseDocument& doc, bool absolute_fallback = true);
/// Reads a case file; relative capture paths resolve against the file's folder.
CaseDocument loadCase(const std::string& path);
/// Sibling autosave path: "<folder>/<name>.umbracase.autosave" (".umbracase" added if missing).
std::string autosavePath(const std::string& case_path);

enum class CaptureStatus { Ok, Missing, Changed };
/// Ok if the file exists and its SHA-256 matches; Missing if it does not exist or cannot be
/// read; Changed if its bytes differ from the recorded hash.
CaptureStatus checkCapture(const CaseCapture& capture);
/// Re-points a moved capture: hashes `new_path` and, if it matches the recorded hash, sets
/// capture.path = new_path and returns true. If it does not match, returns false and changes
/// nothing unless `accept_changed` (then the path AND recorded hash are updated).
/// Throws InputError if `new_path` cannot be read.
bool relocateCapture(CaseCapture& capture, const std::string& new_path, bool accept_changed = false);

}  // namespace umbra::core
