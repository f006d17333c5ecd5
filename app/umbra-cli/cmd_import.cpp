// SPDX-License-Identifier: MIT
// umbra-cli import: a DICOM ultrasound image (stored, already beamformed frames) -> Umbra image file.
#include <cstdio>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/dicom_image.h"
#include "core/frame.h"

namespace umbra::cli {

int cmdImport(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"-o", "IMAGE.h5", "output image file (required)"},
        {"--quiet", "", "print nothing on success"},
    };
    const char* usage = "umbra-cli import FILE.dcm -o IMAGE.h5";
    Args a(argv, specs, 1, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Reads a DICOM ultrasound image (single- or multi-frame, 8-bit monochrome or RGB;\n"
                            "uncompressed, deflate, JPEG or RLE) and writes its frames as an Umbra image file.\n"
                            "With a usable Sequence of Ultrasound Regions the calibrated region is kept with\n"
                            "x and depth in metres; without one the whole frame is kept on pixel axes\n"
                            "(axes_unit = px) and a warning says measurements are in pixels. The values are\n"
                            "the stored grey levels (RGB: luminance), not a linear envelope (docs/dicom.md).\n"
                            "Exit 2 with a message naming the file for a damaged or unsupported file.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    const auto out = a.value("-o");
    if (!out) throw UsageError("missing -o IMAGE.h5 (see --help)");
    const std::string path = a.positional()[0];
    const core::DicomImage dcm = core::readDicomFile(path);
    core::writeImageFile(*out, dcm.toImageStack());
    if (!dcm.calibration)
        std::fprintf(stderr, "%s: warning: uncalibrated - pixels (%s); measurements are in pixels\n", path.c_str(),
                     dcm.calibration_note.c_str());
    if (!a.has("--quiet")) {
        std::printf("%s: %zu frame(s) of %zu x %zu pixels, %s", out->c_str(), dcm.frames, dcm.columns, dcm.rows,
                    dcm.samples == 3 ? "RGB (stored as luminance)" : "monochrome");
        if (dcm.calibration)
            std::printf(", region %zu x %zu px, pixel %.4g x %.4g mm", dcm.calibration->cols, dcm.calibration->rows,
                        dcm.calibration->dx_m * 1e3, dcm.calibration->dz_m * 1e3);
        if (dcm.frame_time_s) std::printf(", frame time %.4g ms", *dcm.frame_time_s * 1e3);
        std::printf("%s\n", dcm.synthetic ? " (synthetic data)" : "");
    }
    return 0;
}

}  // namespace umbra::cli
