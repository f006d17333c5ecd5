// SPDX-License-Identifier: MIT
// umbra-cli export-dicom: Umbra image file -> DICOM Ultrasound (Multi-frame) Image.
#include <cmath>
#include <cstdio>
#include <nlohmann/json.hpp>
#include <set>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/capture_file.h"
#include "core/dicom_image.h"
#include "core/frame.h"
#include "core/json_guard.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/sizing_setup.h"

namespace umbra::cli {
namespace {

// "0,2,5-9" (0-based, as --frame of measure) -> sorted distinct frame indices below `count`.
std::vector<size_t> parseFrameList(const std::string& text, size_t count) {
    std::set<size_t> out;
    size_t pos = 0;
    while (pos <= text.size()) {
        const size_t comma = text.find(',', pos);
        const std::string item = text.substr(pos, comma == std::string::npos ? std::string::npos : comma - pos);
        const size_t dash = item.find('-');
        const uint64_t hi_allowed = count ? count - 1 : 0;
        if (dash == std::string::npos) {
            out.insert(size_t(parseWholeNumber("--frames", item, 0, hi_allowed)));
        } else {
            const uint64_t lo = parseWholeNumber("--frames", item.substr(0, dash), 0, hi_allowed);
            const uint64_t hi = parseWholeNumber("--frames", item.substr(dash + 1), 0, hi_allowed);
            if (hi < lo) throw UsageError("--frames: range '" + item + "' runs backwards");
            for (uint64_t i = lo; i <= hi; ++i) out.insert(size_t(i));
        }
        if (comma == std::string::npos) break;
        pos = comma + 1;
    }
    return {out.begin(), out.end()};
}

}  // namespace

int cmdExportDicom(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"-o", "OUT.dcm", "output DICOM file (required)"},
        {"--frames", "LIST", "frames to write, 0-based: e.g. 0,3,5-9 (default: all)"},
        {"--capture", "CAPTURE.h5", "the capture the image was made from: title, part id and the synthetic label"},
        {"--title", "TEXT", "title (Study/Series Description); overrides the capture's"},
        {"--part", "ID", "part identifier (Patient ID); overrides the capture's provenance part id"},
        {"--frame-time-ms", "MS", "Frame Time of a multi-frame file (default: the imported file's, else 100 ms)"},
        {"--rgb", "", "write the recipe's colour map as RGB instead of grey levels"},
        {"--quiet", "", "print nothing on success"},
    };
    const char* usage = "umbra-cli export-dicom IMAGE.h5 -o OUT.dcm [--frames LIST] [--capture CAPTURE.h5]";
    Args a(argv, specs, 1, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Writes the frames of IMAGE.h5 as a DICOM Ultrasound Image (one frame) or Ultrasound\n"
                            "Multi-frame Image: the recipe's display chain (log compression, dynamic range) gives\n"
                            "8-bit grey levels, a Sequence of Ultrasound Regions carries the grid (cm), Image\n"
                            "Comments the capture SHA-256 and the recipe. No person's name is written: Patient's\n"
                            "Name and Patient ID hold the part id (or stay empty). See docs/dicom.md.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    const auto out = a.value("-o");
    if (!out) throw UsageError("missing -o OUT.dcm (see --help)");
    const std::string path = a.positional()[0];
    const core::ImageStack img = core::readImageFile(path);
    if (img.axes_in_pixels)
        throw core::InputError(path, "/@axes_unit", "axes are in pixels (uncalibrated); a DICOM export needs a grid in metres");
    const std::vector<size_t> frames = a.value("--frames") ? parseFrameList(*a.value("--frames"), img.frames) : [&] {
        std::vector<size_t> all(img.frames);
        for (size_t i = 0; i < img.frames; ++i) all[i] = i;
        return all;
    }();

    core::DicomExportInfo info;
    info.capture_sha256 = img.capture_sha256;
    info.recipe_json = img.recipe_json;
    // An image imported from DICOM holds grey levels already: written back as they are.
    bool grey_levels = false;
    std::optional<double> imported_frame_time;
    {
        const auto j = nlohmann::json::parse(img.recipe_json, nullptr, false);
        if (j.is_object() && j.value("source", "") == "dicom") {
            grey_levels = true;
            if (j.contains("frame_time_s") && j["frame_time_s"].is_number()) imported_frame_time = j["frame_time_s"].get<double>();
            if (j.value("synthetic", false)) info.synthetic = true;
            if (j.contains("description") && j["description"].is_string()) info.title = j["description"].get<std::string>();
        }
    }
    if (auto c = a.value("--capture")) {
        if (auto problems = checkCaptureIsolated(*c, false); !problems.empty()) throw core::InputError(*c, problems);
        core::CaptureReader r(*c);
        const auto& h = r.header();
        info.title = h.title;
        info.synthetic = info.synthetic || h.isSynthetic();
        for (const auto& [k, v] : h.provenance)
            if (k == "part" || k == "part_id" || k == "specimen") info.part_id = v;
    }
    if (auto t = a.value("--title")) info.title = *t;
    if (auto p = a.value("--part")) info.part_id = *p;
    info.frame_time_s = imported_frame_time;
    if (auto ft = a.value("--frame-time-ms")) {
        const double ms = parseFiniteNumber("--frame-time-ms", *ft);
        if (!(ms > 0) || ms > 1e6) throw UsageError("--frame-time-ms needs a value in (0, 1e6] ms, got '" + *ft + "'");
        info.frame_time_s = ms * 1e-3;
    }

    const bool rgb = a.has("--rgb");
    const size_t n = img.x_m.size() * img.z_m.size(), samples = rgb ? 3 : 1;
    std::vector<uint8_t> pixels;
    pixels.reserve(frames.size() * n * samples);
    const core::Recipe recipe = grey_levels ? recon::defaultRecipe() : recon::recipeOfImage(img, path);
    for (size_t fi : frames) {
        const core::Frame f = img.frame(fi);
        if (grey_levels) {
            for (float v : f.envelope) {
                const uint8_t g = uint8_t(std::lround(std::clamp(double(v), 0.0, 255.0)));
                for (size_t s = 0; s < samples; ++s) pixels.push_back(g);
            }
            continue;
        }
        const std::vector<float> db = recon::logCompress(f, recipe);
        if (rgb) {
            const auto c = recon::colourise(db, recipe);
            pixels.insert(pixels.end(), c.begin(), c.end());
        } else {
            const double range = recipe.number("log_compression.dynamic_range_db");
            for (float d : db) pixels.push_back(uint8_t(std::lround(std::clamp(255.0 * (1.0 + double(d) / range), 0.0, 255.0))));
        }
    }
    core::writeDicomFile(*out, img.x_m, img.z_m, frames.size(), samples, pixels, info);
    if (!a.has("--quiet"))
        std::printf("%s: %zu frame(s) of %zu x %zu pixels, pixel %.4g x %.4g mm%s\n", out->c_str(), frames.size(), img.x_m.size(),
                    img.z_m.size(), (img.x_m.back() - img.x_m.front()) / double(img.x_m.size() - 1) * 1e3,
                    (img.z_m.back() - img.z_m.front()) / double(img.z_m.size() - 1) * 1e3, info.synthetic ? " (synthetic data)" : "");
    return 0;
}

}  // namespace umbra::cli
