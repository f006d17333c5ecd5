// SPDX-License-Identifier: MIT
// umbra-cli measure: the workstation's sizing tools on an image file (core/sizing.h with the
// context of reconstruction/sizing_setup.h), one result as a readable line or JSON.
#include <cmath>
#include <cstdio>
#include <sstream>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/error.h"
#include "core/frame.h"
#include "core/sizing.h"
#include "reconstruction/sizing_setup.h"

namespace umbra::cli {
namespace {

struct Box {
    double x0, x1, z0, z1;
};

Box parseBox(const std::string& v) {
    std::vector<std::string> parts;
    std::string item;
    std::stringstream ss(v);
    while (std::getline(ss, item, ':')) parts.push_back(item);
    if (!v.empty() && v.back() == ':') parts.push_back("");
    if (parts.size() != 4) throw UsageError("--box-mm needs XMIN:XMAX:ZMIN:ZMAX (four numbers in mm), got '" + v + "'");
    Box b{parseFiniteNumber("--box-mm", parts[0]), parseFiniteNumber("--box-mm", parts[1]), parseFiniteNumber("--box-mm", parts[2]),
          parseFiniteNumber("--box-mm", parts[3])};
    if (!(b.x0 < b.x1) || !(b.z0 < b.z1))
        throw UsageError("--box-mm '" + v + "' is inverted or empty: XMIN must be below XMAX and ZMIN below ZMAX");
    return b;
}

}  // namespace

int cmdMeasure(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"--tool", "drop6|drop20|tips|peak|scan-length", "sizing tool (required); scan-length needs a multi-frame image with scan positions"},
        {"--box-mm", "XMIN:XMAX:ZMIN:ZMAX", "box around the indication, mm (required); scan-length: the x and depth range projected per frame"},
        {"--frame", "N", "frame to measure, 0-based (default 0; ignored by scan-length)"},
        {"--medium", "steel|water|soft-tissue|other", "medium for the default speed-of-sound uncertainty (default: guessed from the speed)"},
        {"--speed-uncertainty", "PERCENT", "relative standard uncertainty of the speed of sound, % (default: the medium's)"},
        {"--json", "", "print one JSON object (values rounded to their uncertainties; budgets listed per component)"},
        {"--budget", "", "also print the uncertainty budget of each value (readable output)"},
    };
    const char* usage = "umbra-cli measure IMAGE.h5 --tool drop6|drop20|tips|peak|scan-length --box-mm XMIN:XMAX:ZMIN:ZMAX [--frame N] [--json]";
    Args a(argv, specs, 0, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Sizes an indication in IMAGE.h5 (written by 'umbra-cli reconstruct') with the workstation's tools:\n"
                            "-6 dB / -20 dB drop (length in x, height in depth), tip-to-tip height, peak position, or the -6 dB\n"
                            "length along the scan axis of an encoded scan. Each value has an expanded uncertainty (k = 2) from\n"
                            "a budget after JCGM 100:2008 and is rounded to it; an extent within 1.2x the point-spread width is\n"
                            "flagged resolution-limited (an upper bound). A sizing aid: codes, written procedures and qualified\n"
                            "personnel decide on acceptance. Exit 2 for bad input (file, box, options); exit 1 when\n"
                            "nothing could be sized (e.g. no pair of tip echoes in the box).",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    if (a.positional().size() != 1) throw UsageError("missing argument IMAGE.h5 (see --help)");
    const auto tool_name = a.value("--tool");
    if (!tool_name) throw UsageError("option --tool is required (drop6, drop20, tips, peak or scan-length)");
    const bool scan = *tool_name == "scan-length";
    const auto tool = core::toolFromName(*tool_name);
    if (!scan && !tool) throw UsageError("--tool '" + *tool_name + "' is not drop6, drop20, tips, peak or scan-length");
    const auto box_text = a.value("--box-mm");
    if (!box_text) throw UsageError("option --box-mm XMIN:XMAX:ZMIN:ZMAX is required");
    const Box box = parseBox(*box_text);
    recon::SizingSettings settings;
    if (auto m = a.value("--medium")) {
        std::string med = *m == "soft-tissue" ? "soft tissue" : *m;
        if (med != "steel" && med != "water" && med != "soft tissue" && med != "other")
            throw UsageError("--medium '" + *m + "' is not steel, water, soft-tissue or other");
        settings.medium = med;
    }
    if (auto s = a.value("--speed-uncertainty")) {
        const double pct = parseFiniteNumber("--speed-uncertainty", *s);
        if (pct < 0 || pct > 50) throw UsageError("--speed-uncertainty needs a percentage from 0 to 50, got '" + *s + "'");
        settings.speed_rel = pct / 100;
    }

    const std::string path = a.positional()[0];
    const core::ImageStack img = core::readImageFile(path);
    if (img.axes_in_pixels)
        throw core::InputError(path, "/@axes_unit", "axes are in pixels (uncalibrated stored frame): sizing in mm is not possible");
    if (img.recipe_json.find("\"source\": \"dicom\"") != std::string::npos)
        throw core::InputError(path, "/@recipe_json", "holds display grey levels imported from DICOM, not a linear envelope: "
                                                     "the dB-drop sizing tools need a reconstructed image");
    size_t frame = 0;
    if (auto f = a.value("--frame")) frame = size_t(parseWholeNumber("--frame", *f, 0, img.frames ? img.frames - 1 : 0));
    // The box must hold at least one pixel centre of the image.
    const double xa = img.x_m.front() * 1e3, xb = img.x_m.back() * 1e3, za = img.z_m.front() * 1e3, zb = img.z_m.back() * 1e3;
    if (box.x1 < xa || box.x0 > xb || box.z1 < za || box.z0 > zb)
        throw UsageError("--box-mm '" + *box_text + "' lies outside the image (x " + std::to_string(xa) + " to " + std::to_string(xb) +
                         " mm, depth " + std::to_string(za) + " to " + std::to_string(zb) + " mm)");

    const core::Recipe recipe = recon::recipeOfImage(img, path);
    const core::Frame fr = img.frame(frame);
    const recon::SizingSetup setup = recon::sizingSetup(recipe, recon::acquisitionOf(img), fr.envelope, settings);
    std::vector<double> x_mm(img.x_m.size()), z_mm(img.z_m.size());
    for (size_t i = 0; i < x_mm.size(); ++i) x_mm[i] = img.x_m[i] * 1e3;
    for (size_t i = 0; i < z_mm.size(); ++i) z_mm[i] = img.z_m[i] * 1e3;

    core::SizingResult r;
    if (scan) {
        if (img.frames < 2) throw UsageError("--tool scan-length needs a multi-frame image; " + path + " holds one frame");
        if (img.scan_position_m.size() != img.frames)
            throw core::InputError(path, "/image/scan_position_m",
                                   "is missing: the capture records no scan positions (or the image was made before they were recorded)");
        std::vector<double> y_mm;
        for (double y : img.scan_position_m) y_mm.push_back(y * 1e3);
        const auto proj = core::scanProjection(img, {box.x0, box.z0}, {box.x1, box.z1});
        r = core::scanLength(y_mm, proj, core::kSixDbDropRatio, setup.elevation_width_mm);
        r.warnings.insert(r.warnings.begin(), setup.context.notes.begin(), setup.context.notes.end());
        frame = 0;
    } else {
        r = core::measureInBox(*tool, fr.envelope, x_mm, z_mm, {box.x0, box.z0}, {box.x1, box.z1}, setup.context);
    }
    if (a.has("--json")) {
        std::string j = core::sizingJson(r, frame);
        if (scan) {
            // The tool name of the command line, not the drop ratio it used.
            const auto p = j.find("\"tool\": \"");
            if (p != std::string::npos) {
                const auto q = j.find('"', p + 9);
                j.replace(p + 9, q - (p + 9), "scan-length");
            }
        }
        std::printf("%s\n", j.c_str());
    } else {
        std::string line = core::sizingLine(r, frame);
        if (scan) line.replace(0, line.find(' '), "scan-length");
        std::printf("%s\n", line.c_str());
        if (a.has("--budget"))
            for (const auto& v : r.values()) std::printf("%s\n", core::formatBudget(v).c_str());
    }
    return r.found ? 0 : 1;
}

}  // namespace umbra::cli
