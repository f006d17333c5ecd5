// SPDX-License-Identifier: MIT
// umbra-cli validate: checks any file Umbra reads, by its content (core/file_kind.h). Files the
// HDF5 library parses are checked in a child process with a time limit.
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "args.h"
#include "commands.h"
#include "core/capture_file.h"
#include "core/case_file.h"
#include "core/dicom_image.h"
#include "core/file_kind.h"
#include "core/frame.h"
#include "core/isolated_check.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/simulate/scene.h"

namespace umbra::cli {
namespace {

struct Outcome {
    std::vector<core::Problem> problems;  ///< empty = valid
    std::vector<core::Problem> warnings;  ///< shown, do not make the file invalid
    std::string valid_text;               ///< e.g. "valid capture (format v1)"
};

std::vector<core::Problem> problemsOf(const std::function<void()>& f) {
    try {
        f();
    } catch (const core::InputError& e) {
        return e.problems();
    } catch (const core::SettingError& e) {
        return {{"", e.what()}};
    }
    return {};
}

bool g_header_only = false;  // --header: HDF5 files are checked up to their header only

Outcome checkCapture(const std::string& path) {
    Outcome o;
    o.problems = checkCaptureIsolated(path, !g_header_only);
    if (o.problems.empty()) o.warnings = core::headerWarnings(core::CaptureReader(path).header());  // header known readable
    o.valid_text = "valid capture (format v1)";
    return o;
}

Outcome checkImage(const std::string& path) {
    Outcome o;
    core::ProblemCheck rest;
    if (!g_header_only)
        rest = [&] {
            return problemsOf([&] {
                const auto img = core::readImageFile(path);
                for (float v : img.envelope)
                    if (!std::isfinite(v)) throw core::InputError(path, "/image/envelope", "holds values that are not finite");
            });
        };
    o.problems = core::runIsolated([&] { return problemsOf([&] { (void)core::readImageFileHeader(path); }); }, rest, headerSeconds());
    o.valid_text = "valid image file";
    return o;
}

Outcome checkCase(const std::string& path) {
    Outcome o;
    core::CaseDocument doc;
    o.problems = problemsOf([&] { doc = core::loadCase(path); });
    if (o.problems.empty())
        for (size_t i = 0; i < doc.captures.size(); ++i) {
            const auto st = core::checkCapture(doc.captures[i]);
            const std::string key = "captures[" + std::to_string(i) + "]";
            if (st == core::CaptureStatus::Missing) o.warnings.push_back({key, "capture '" + doc.captures[i].path + "' is missing"});
            if (st == core::CaptureStatus::Changed) o.warnings.push_back({key, "capture '" + doc.captures[i].path + "' has changed since the case recorded it (SHA-256 differs)"});
        }
    o.valid_text = "valid case file (version " + std::to_string(core::kCaseVersion) + ", " + std::to_string(doc.captures.size()) + " captures, " +
                   std::to_string(doc.findings.size()) + " findings)";
    return o;
}

Outcome checkScene(const std::string& path) {
    Outcome o;
    o.problems = problemsOf([&] { (void)recon::sim::loadScene(path); });
    o.valid_text = "valid scene file";
    return o;
}

Outcome checkRecipe(const std::string& path) {
    Outcome o;
    o.problems = problemsOf([&] {
        std::ifstream in(path, std::ios::binary);
        std::ostringstream ss;
        ss << in.rdbuf();
        core::Recipe r = recon::defaultRecipe();
        try {
            r.mergeJson(ss.str(), path);
        } catch (const core::SettingError& e) {
            std::string what = e.what();
            if (what.rfind(path + ": ", 0) == 0) what = what.substr(path.size() + 2);  // the line names the file already
            throw core::InputError(path, "", what);
        }
    });
    o.valid_text = "valid recipe";
    return o;
}

Outcome checkManifestFile(const std::string& path) {
    Outcome o;
    o.problems = problemsOf([&] { checkManifest(path); });
    o.valid_text = "valid batch manifest";
    return o;
}

Outcome notRead(const std::string& what) {
    Outcome o;
    o.problems = {{"", what}};
    return o;
}

// A DICOM image as Umbra reads it: parsed, every frame decoded, sizes and the ultrasound region
// calibration checked (no region: a warning, the frame opens in pixels).
Outcome checkDicom(const std::string& path) {
    Outcome o;
    std::string text;
    o.problems = problemsOf([&] {
        const core::DicomImage d = core::readDicomFile(path);
        if (!d.calibration) o.warnings.push_back({"", "uncalibrated - pixels: " + d.calibration_note});
        char b[200];
        std::snprintf(b, sizeof b, "valid DICOM image (%zu frame(s), %zu x %zu, %s, %s)", d.frames, d.columns, d.rows,
                      d.photometric.c_str(), d.calibration ? "calibrated from its ultrasound region" : "uncalibrated");
        text = b;
    });
    o.valid_text = text;
    return o;
}

// One row per kind of file; a new reader (e.g. DICOM) replaces its row's function.
struct KindCheck {
    core::FileKind kind;
    Outcome (*check)(const std::string& path);
};
const KindCheck kChecks[] = {
    {core::FileKind::Capture, checkCapture},
    {core::FileKind::Image, checkImage},
    {core::FileKind::Case, checkCase},
    {core::FileKind::Scene, checkScene},
    {core::FileKind::Recipe, checkRecipe},
    {core::FileKind::Manifest, checkManifestFile},
    {core::FileKind::Dicom, checkDicom},
    {core::FileKind::BatchSummary, [](const std::string&) { return notRead("is a batch summary (written by umbra-cli batch), not a file Umbra reads"); }},
    {core::FileKind::Hdf5, [](const std::string&) { return notRead("is an HDF5 file but neither a capture (/data) nor an image file (/image)"); }},
    {core::FileKind::Unknown, [](const std::string&) { return notRead("is not a file Umbra reads: not an HDF5 file, not DICOM, not one of Umbra's JSON files"); }},
};

// Kind of an HDF5 file, told in a child process (opening it runs the HDF5 library).
core::FileKind hdf5KindIsolated(const std::string& path, std::vector<core::Problem>& problems) {
    core::FileKind kind = core::FileKind::Hdf5;
    const std::string tag = "\x1f" "kind";
    auto out = core::runIsolated([&]() -> std::vector<core::Problem> { return {{tag, std::to_string(int(core::hdf5Kind(path)))}}; }, {}, headerSeconds());
    for (auto& p : out) {
        if (p.where == tag) kind = core::FileKind(std::atoi(p.what.c_str()));
        else problems.push_back(p);
    }
    return kind;
}

}  // namespace

int cmdValidate(const Argv& argv) {
    const std::vector<OptionSpec> specs = {{"--quiet", "", "print nothing for a valid file"},
                                           {"--header", "", "captures and image files: check the header only (fast)"}};
    const char* usage = "umbra-cli validate [--quiet] [--header] FILE";
    Args a(argv, specs, 1, 1);
    if (a.help()) {
        std::fputs(helpText(usage, "Checks any file Umbra reads, told by its content: a capture (format v1: names,\n"
                                   "shapes, units, finite and physical numbers, index ranges, every trace block\n"
                                   "readable and finite), an image file, a case file (and whether its captures\n"
                                   "are present and unchanged), a scene file, a recipe, a batch manifest or a DICOM\n"
                                   "ultrasound image (every frame decoded, region calibration checked).\n"
                                   "HDF5 files are checked in a child process with a time limit. Exit 0 when\n"
                                   "valid; exit 2 with one line per problem (FILE: where: problem) otherwise.", specs).c_str(), stdout);
        return 0;
    }
    const std::string path = a.positional()[0];
    g_header_only = a.has("--header");
    std::vector<core::Problem> early;
    core::FileKind kind = core::sniffFileKind(path);  // InputError (exit 2) for a missing, empty or bad-JSON file
    if (kind == core::FileKind::Hdf5) kind = hdf5KindIsolated(path, early);
    if (kind == core::FileKind::Unknown) {  // DICOM without the Part 10 preamble: by its name
        const auto ext = std::filesystem::path(path).extension().string();
        if (ext == ".dcm" || ext == ".DCM" || ext == ".dicom") kind = core::FileKind::Dicom;
    }
    Outcome o;
    if (!early.empty()) {
        o.problems = early;
    } else {
        for (const auto& c : kChecks)
            if (c.kind == kind) o = c.check(path);
    }
    for (auto& w : o.warnings)
        std::fprintf(stderr, "%s: warning: %s%s\n", path.c_str(), w.where.empty() ? "" : (w.where + ": ").c_str(), w.what.c_str());
    if (o.problems.empty()) {
        if (!a.has("--quiet")) std::printf("%s: %s\n", path.c_str(), o.valid_text.c_str());
        return 0;
    }
    for (auto& p : o.problems)
        std::fprintf(stderr, "%s: %s%s\n", path.c_str(), p.where.empty() ? "" : (p.where + ": ").c_str(), p.what.c_str());
    return 2;
}

}  // namespace umbra::cli
