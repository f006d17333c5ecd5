// SPDX-License-Identifier: MIT
#pragma once
// Practice mode: a trainee measures the structures of a practice set (a synthetic capture with
// an answer file), submits, and sees each measurement against the truth; attempts are kept in a
// local practice log per trainee. No Qt. See docs/practice.md.
//
// The answers stay hidden until submission: a PracticeSet hands out only the structure labels
// (structureLabels); the true values are reached only through scoreAttempt, which the
// workstation calls on Submit.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "core/agreement.h"
#include "core/measurement.h"

namespace umbra::core {

/// One true value of a structure that a reading can be compared with.
struct PracticeTarget {
    std::string name;       ///< "diameter", "width", "height", "length", "depth", ...
    double value_mm = 0;
    /// Direction of the extent in the image (degrees from +x toward +z, 0..180); unset = any
    /// direction (e.g. a circle's diameter). Ignored for depth targets.
    std::optional<double> direction_deg;
    bool depth = false;     ///< a depth below the surface (read with a depth marker), not an extent
};

struct PracticeStructure {
    std::string label;      ///< what the trainee picks when measuring, e.g. "cyst A1"
    std::string kind;       ///< e.g. "anechoic circle"
    std::vector<PracticeTarget> targets;
};

/// An answer file (samples/practice_set_*.answers.json, docs/practice.md).
class PracticeSet {
public:
    /// Parses an answer file's text; InputError naming `source` and the key on bad content.
    static PracticeSet fromJson(const std::string& text, const std::string& source);
    /// Reads an answer file (at most 1 MiB).
    static PracticeSet load(const std::string& path);
    /// The answer file beside a capture: "X.h5" → "X.answers.json" ("" when absent).
    static std::string answersPathFor(const std::string& capture_path);

    const std::string& scenario() const { return scenario_; }
    /// Labels of the structures to measure, in file order (no values).
    std::vector<std::string> structureLabels() const;
    /// What each structure is to be measured for, e.g. "cyst A1: diameter" (no values).
    std::vector<std::string> tasks() const;
    /// Note of the answer file (the expected resolution), shown with the results only.
    const std::string& note() const { return note_; }

private:
    friend struct PracticeAccess;
    std::string scenario_, note_;
    std::vector<PracticeStructure> structures_;
};

/// One reading of a trainee's measurement: an extent along a direction, or a depth.
struct PracticeReading {
    std::string structure;          ///< the measurement's label (a structure label)
    std::string measurement_id;     ///< "M3"
    std::string quantity;           ///< "distance", "length", "height", "axis 1", "axis 2", "depth"
    double value_mm = 0;
    double expanded_mm = 0;         ///< U (k = 2)
    double direction_deg = 0;       ///< of the extent, 0..180 from +x toward +z
    bool depth = false;
};

/// Readings of one measurement: caliper → distance along its line; extent box → length (0°) and
/// height (90°); ellipse → both axes along their directions; depth marker → depth. Image-sizing
/// boxes give their box length and height. Uses evaluate() for values and uncertainties.
std::vector<PracticeReading> practiceReadings(const Measurement& m, const UncertaintyModel& u);
/// The same from quantities already computed for `m` (e.g. the workstation's, which sizes the
/// image-sizing boxes from the image: their "length" and "height" are then the sized extents).
std::vector<PracticeReading> practiceReadings(const Measurement& m, const std::vector<Quantity>& quantities);

/// A reading scored against the truth.
struct PracticeResult {
    std::string structure, target, measurement_id, quantity;
    double measured_mm = 0, expanded_mm = 0, true_mm = 0;
    double error_mm = 0;                 ///< measured − true
    std::optional<double> error_in_u;    ///< error / U (unset when U = 0)
    bool operator==(const PracticeResult&) const = default;
};

struct PracticeAttempt {
    std::string scenario;                ///< practice set
    std::string capture_sha256;
    std::string submitted_utc;           ///< ISO 8601, e.g. "2026-12-02T15:40:00Z"
    std::vector<PracticeResult> results;
    std::vector<std::string> unmeasured; ///< structure labels with no reading
    std::vector<std::string> unknown_labels;  ///< measurement labels that name no structure
    bool operator==(const PracticeAttempt&) const = default;
};

/// Scores readings: each reading of a structure is compared with the structure's target of the
/// same kind (extent or depth) whose direction is closest to the reading's (targets without a
/// direction match any). Readings whose label names no structure are listed, not scored.
PracticeAttempt scoreAttempt(const PracticeSet& set, const std::vector<PracticeReading>& readings,
                             const std::string& capture_sha256, const std::string& submitted_utc);

/// A trainee's practice log (one JSON file per trainee).
struct PracticeLog {
    std::string trainee;
    std::vector<PracticeAttempt> attempts;
    bool operator==(const PracticeLog&) const = default;
};

/// File name of a trainee's log: the name with every byte outside [A-Za-z0-9-] written as
/// "_XX" (hex), then ".practice.json" — distinct names give distinct files. SettingError for an
/// empty (or blank) name or one longer than 100 bytes.
std::string practiceLogFileName(const std::string& trainee);
std::string practiceLogToJson(const PracticeLog& log);
PracticeLog practiceLogFromJson(const std::string& text, const std::string& source);
/// Loads FOLDER/practiceLogFileName(trainee); an absent file is an empty log for that trainee.
PracticeLog loadPracticeLog(const std::string& folder, const std::string& trainee);
/// Appends the attempt to the trainee's log and saves it atomically (creating the folder).
PracticeLog appendAttempt(const std::string& folder, const std::string& trainee, const PracticeAttempt& attempt);

/// Progress over all attempts: Bland–Altman of measured vs true (difference measured − true),
/// and per structure and target the error of each attempt in order.
struct PracticeProgress {
    BlandAltmanResult ba;                 ///< a = measured, b = true
    struct Series {
        std::string key;                  ///< "cyst A1 · diameter"
        std::vector<size_t> attempt;      ///< attempt number (1-based)
        std::vector<double> error_mm;
    };
    std::vector<Series> series;
    size_t attempts = 0;
};
PracticeProgress practiceProgress(const PracticeLog& log);

/// Current UTC time as "YYYY-MM-DDTHH:MM:SSZ".
std::string utcNow();

}  // namespace umbra::core
