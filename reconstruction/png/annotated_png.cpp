// SPDX-License-Identifier: MIT
// Drawing module (libumbra_png.so): lays out one colour-mapped frame with mm axes, a title line and
// a colour bar, and writes it through libpng. Loaded on demand by recon::writePng
// (reconstruction/png_writer.cpp); takes plain data only (png_plot.h), so it links no Umbra library.
#include <opencv2/core.hpp>
#include <opencv2/imgproc.hpp>
#include <png.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "reconstruction/png/png_plot.h"

namespace {

struct WriteError {
    std::string message;
};

double niceStep(double span, int target) {
    const double raw = span / std::max(1, target);
    const double p = std::pow(10.0, std::floor(std::log10(raw)));
    for (double m : {1.0, 2.0, 5.0, 10.0})
        if (m * p >= raw) return m * p;
    return 10 * p;
}

std::string num(double v) {
    char b[32];
    if (std::fabs(v) < 1e-9) v = 0;
    std::snprintf(b, sizeof b, "%g", v);
    return b;
}

// Writes an 8-bit BGR image as an RGB PNG through libpng, atomically (PATH.partial, then rename).
void encodePng(const std::string& path, const cv::Mat& bgr) {
    auto fail = [](const char* what) { throw WriteError{std::string("cannot write the PNG (") + what + ")"}; };
    const std::string tmp = path + ".partial";
    std::FILE* fp = std::fopen(tmp.c_str(), "wb");
    if (!fp) fail("cannot create the file");
    std::unique_ptr<std::FILE, int (*)(std::FILE*)> file(fp, std::fclose);
    png_structp png = png_create_write_struct(PNG_LIBPNG_VER_STRING, nullptr, nullptr, nullptr);
    png_infop info = png ? png_create_info_struct(png) : nullptr;
    if (!png || !info) {
        png_destroy_write_struct(&png, &info);
        fail("out of memory");
    }
    std::vector<uint8_t> row(size_t(bgr.cols) * 3);
    volatile bool ok = false;  // set after the last libpng call that may jump back
    if (setjmp(png_jmpbuf(png)) == 0) {
        png_init_io(png, fp);
        png_set_IHDR(png, info, png_uint_32(bgr.cols), png_uint_32(bgr.rows), 8, PNG_COLOR_TYPE_RGB, PNG_INTERLACE_NONE,
                     PNG_COMPRESSION_TYPE_DEFAULT, PNG_FILTER_TYPE_DEFAULT);
        png_set_compression_level(png, 3);
        png_write_info(png, info);
        for (int y = 0; y < bgr.rows; ++y) {
            const auto* p = bgr.ptr<cv::Vec3b>(y);
            for (int x = 0; x < bgr.cols; ++x) {
                row[size_t(x) * 3] = p[x][2];
                row[size_t(x) * 3 + 1] = p[x][1];
                row[size_t(x) * 3 + 2] = p[x][0];
            }
            png_write_row(png, row.data());
        }
        png_write_end(png, info);
        ok = true;
    }
    png_destroy_write_struct(&png, &info);
    const bool flushed = std::fflush(file.get()) == 0 && !std::ferror(file.get());
    file.reset();
    std::error_code ec;
    if (!ok || !flushed) {
        std::filesystem::remove(tmp, ec);
        fail("write failed");
    }
    std::filesystem::rename(tmp, path, ec);
    if (ec) {
        std::filesystem::remove(tmp, ec);
        fail("cannot rename the temporary file");
    }
}

void draw(const UmbraPngPlot& p) {
    const int nx = p.nx, nz = p.nz;
    const std::string title = p.title ? p.title : "";
    const uint8_t* rgb = p.rgb;
    const double dr = p.dynamic_range_db;

    cv::Mat img(nz, nx, CV_8UC3);
    for (int iz = 0; iz < nz; ++iz)
        for (int ix = 0; ix < nx; ++ix) {
            const size_t q = (size_t(iz) * size_t(nx) + size_t(ix)) * 3;
            img.at<cv::Vec3b>(iz, ix) = cv::Vec3b(rgb[q + 2], rgb[q + 1], rgb[q]);  // BGR
        }
    // Square pixels; scale small images up so labels fit.
    const double scale = std::max(1.0, std::min(4.0, 640.0 / std::max(nx, nz)));
    const int W = int(std::lround(nx * scale)), H = int(std::lround(nz * scale));
    cv::Mat shown;
    cv::resize(img, shown, cv::Size(W, H), 0, 0, scale > 1 ? cv::INTER_NEAREST : cv::INTER_AREA);

    const int left = 70, top = 46, right = 110, bottom = 50;
    int tbase = 0;
    const int title_w = cv::getTextSize(title, cv::FONT_HERSHEY_SIMPLEX, 0.45, 1, &tbase).width + 16;
    const int canvas_w = std::max(W + left + right, title_w);
    cv::Mat canvas(H + top + bottom, canvas_w, CV_8UC3, cv::Scalar(255, 255, 255));
    shown.copyTo(canvas(cv::Rect(left, top, W, H)));
    const cv::Scalar ink(0, 0, 0);
    const int font = cv::FONT_HERSHEY_SIMPLEX;
    const double fsz = 0.4;
    cv::putText(canvas, title, cv::Point(8, 18), font, 0.45, ink, 1, cv::LINE_AA);
    cv::rectangle(canvas, cv::Rect(left - 1, top - 1, W + 2, H + 2), ink, 1);

    const double x0 = p.x0_mm, x1 = p.x1_mm, z0 = p.z0_mm, z1 = p.z1_mm;
    auto colOf = [&](double xmm) { return left + (x1 > x0 ? (xmm - x0) / (x1 - x0) * (W - 1) : 0); };
    auto rowOf = [&](double zmm) { return top + (z1 > z0 ? (zmm - z0) / (z1 - z0) * (H - 1) : 0); };
    const double sx = niceStep(x1 - x0, 6), sz = niceStep(z1 - z0, 8);
    for (double v = std::ceil(x0 / sx) * sx; v <= x1 + 1e-9; v += sx) {
        const int c = int(std::lround(colOf(v)));
        cv::line(canvas, cv::Point(c, top + H), cv::Point(c, top + H + 5), ink, 1);
        const std::string s = num(v);
        int base = 0;
        auto sz2 = cv::getTextSize(s, font, fsz, 1, &base);
        cv::putText(canvas, s, cv::Point(c - sz2.width / 2, top + H + 18), font, fsz, ink, 1, cv::LINE_AA);
    }
    cv::putText(canvas, "x (mm)", cv::Point(left + W / 2 - 20, top + H + 38), font, fsz, ink, 1, cv::LINE_AA);
    for (double v = std::ceil(z0 / sz) * sz; v <= z1 + 1e-9; v += sz) {
        const int rr = int(std::lround(rowOf(v)));
        cv::line(canvas, cv::Point(left - 6, rr), cv::Point(left - 1, rr), ink, 1);
        const std::string s = num(v);
        int base = 0;
        auto sz2 = cv::getTextSize(s, font, fsz, 1, &base);
        cv::putText(canvas, s, cv::Point(left - 9 - sz2.width, rr + 4), font, fsz, ink, 1, cv::LINE_AA);
    }
    cv::putText(canvas, "z (mm)", cv::Point(4, top - 6), font, fsz, ink, 1, cv::LINE_AA);

    // Colour bar: 0 dB at the top, -dynamic range at the bottom.
    const int bx = left + W + 18, bw = 18;
    for (int y = 0; y < H; ++y) {
        const int k = int(std::lround(255.0 * y / std::max(1, H - 1)));
        const uint8_t* c = p.bar_rgb[k];
        cv::line(canvas, cv::Point(bx, top + y), cv::Point(bx + bw - 1, top + y), cv::Scalar(c[2], c[1], c[0]), 1);
    }
    cv::rectangle(canvas, cv::Rect(bx - 1, top - 1, bw + 2, H + 2), ink, 1);
    const double sd = niceStep(dr, 6);
    for (double v = 0; v <= dr + 1e-9; v += sd) {
        const int y = top + int(std::lround(v / dr * (H - 1)));
        cv::line(canvas, cv::Point(bx + bw, y), cv::Point(bx + bw + 4, y), ink, 1);
        cv::putText(canvas, num(-v), cv::Point(bx + bw + 7, y + 4), font, fsz, ink, 1, cv::LINE_AA);
    }
    cv::putText(canvas, "dB", cv::Point(bx, top - 6), font, fsz, ink, 1, cv::LINE_AA);

    encodePng(p.path, canvas);
}

}  // namespace

extern "C" __attribute__((visibility("default"))) int umbra_png_write(const UmbraPngPlot* plot, char* err, size_t err_size) {
    auto report = [&](const std::string& m) {
        if (err && err_size) std::snprintf(err, err_size, "%s", m.c_str());
        return 1;
    };
    if (!plot || plot->version != UMBRA_PNG_PLOT_VERSION) return report("the PNG module does not match this program (version)");
    if (!plot->path || !plot->rgb || plot->nx <= 0 || plot->nz <= 0) return report("nothing to draw");
    try {
        draw(*plot);
        return 0;
    } catch (const WriteError& e) {
        return report(e.message);
    } catch (const std::exception& e) {
        return report(std::string("cannot write the PNG (") + e.what() + ")");
    }
}
