// SPDX-License-Identifier: MIT
// Plain-data description of an annotated PNG, passed from umbra_recon to the drawing module
// (libumbra_png.so). The module is loaded only when a PNG is asked for, so that the drawing
// library and its dependencies cost nothing at start-up of commands that write no PNG.
#pragma once

#include <cstddef>
#include <cstdint>

extern "C" {

/// Bump when the layout of UmbraPngPlot changes; the module refuses other versions.
#define UMBRA_PNG_PLOT_VERSION 1

struct UmbraPngPlot {
    int version;                 ///< UMBRA_PNG_PLOT_VERSION
    const char* path;            ///< output file (written atomically: PATH.partial, then rename)
    const char* title;           ///< title line (UTF-8; drawn as ASCII)
    const uint8_t* rgb;          ///< [nz][nx][3] colour-mapped image
    int nx, nz;                  ///< image size, pixels
    double x0_mm, x1_mm;         ///< lateral axis of the first and last column
    double z0_mm, z1_mm;         ///< depth axis of the first and last row
    double dynamic_range_db;     ///< colour bar spans 0 .. -dynamic_range_db
    uint8_t bar_rgb[256][3];     ///< colour bar, [0] = top (0 dB) .. [255] = bottom
};

/// Draws and writes the PNG. Returns 0 on success; otherwise writes a message into err.
typedef int (*UmbraPngWriteFn)(const UmbraPngPlot* plot, char* err, size_t err_size);

}  // extern "C"

/// Name of the entry point in the module.
#define UMBRA_PNG_WRITE_SYMBOL "umbra_png_write"
