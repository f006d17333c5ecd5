// SPDX-License-Identifier: MIT
// umbra-cli batch: every capture of a manifest -> DIR/<stem>.image.h5 (+ PNG), one shard of
// the list per process, with a JSON summary per shard. See docs/batch.md.
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "args.h"
#include "commands.h"
#include "core/atomic_file.h"
#include "core/capture_file.h"
#include "core/error.h"
#include "core/frame.h"
#include "core/json_guard.h"
#include "reconstruct_job.h"
#include "reconstruction/pipeline.h"
#include "reconstruction/tgc_stage.h"
#include "time_limit.h"

namespace umbra::cli {
namespace {

namespace fs = std::filesystem;
using json = nlohmann::json;
using Clock = std::chrono::steady_clock;
double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

constexpr size_t kMaxManifestBytes = size_t(16) << 20;

struct Manifest {
    std::string path;                  ///< as given on the command line
    std::vector<std::string> entries;  ///< captures as written in the manifest
    std::vector<std::string> captures; ///< resolved against the manifest's folder
    std::vector<std::string> stems;    ///< output name stem per capture
    core::Recipe recipe = recon::defaultRecipe();
    bool png = false;
};

// Reads and checks the whole manifest; every problem is an InputError naming the manifest
// and the key.
Manifest readManifest(const std::string& path) {
    Manifest m;
    m.path = path;
    std::error_code ec;
    if (!fs::exists(path, ec)) throw core::InputError(path, "", "manifest does not exist");
    if (fs::is_directory(path, ec)) throw core::InputError(path, "", "is a folder, not a manifest");
    const auto size = fs::file_size(path, ec);
    if (ec) throw core::InputError(path, "", "cannot be read: " + ec.message());
    if (size > kMaxManifestBytes) throw core::InputError(path, "", "is larger than a manifest can be (16 MiB)");
    std::ifstream in(path, std::ios::binary);
    std::stringstream ss;
    ss << in.rdbuf();
    if (!in) throw core::InputError(path, "", "cannot be read");
    core::checkJsonText(ss.str(), path);  // syntax (line, column), depth and size, before parsing
    json j;
    try {
        j = json::parse(ss.str());
    } catch (const json::exception& e) {
        throw core::InputError(path, "", std::string("not valid JSON: ") + e.what());
    }
    if (!j.is_object()) throw core::InputError(path, "", "a manifest is a JSON object with at least 'captures'");
    static const std::vector<std::string> known = {"captures", "recipe", "settings", "grid_mm", "png"};
    for (auto& [k, v] : j.items())
        if (std::find(known.begin(), known.end(), k) == known.end())
            throw core::InputError(path, k, "unknown key (a manifest has captures, recipe, settings, grid_mm, png)");

    if (!j.contains("captures") || !j["captures"].is_array() || j["captures"].empty())
        throw core::InputError(path, "captures", "must be a non-empty list of capture file paths");
    const fs::path folder = fs::absolute(fs::path(path), ec).parent_path();
    std::map<std::string, size_t> by_stem;
    for (size_t i = 0; i < j["captures"].size(); ++i) {
        const std::string key = "captures[" + std::to_string(i) + "]";
        const auto& c = j["captures"][i];
        if (!c.is_string() || c.get<std::string>().empty()) throw core::InputError(path, key, "must be a file path (text)");
        const std::string entry = c.get<std::string>();
        const fs::path p = fs::path(entry).is_absolute() ? fs::path(entry) : (folder / entry).lexically_normal();
        if (!fs::exists(p, ec)) throw core::InputError(path, key, "'" + p.string() + "' does not exist");
        if (!fs::is_regular_file(p, ec)) throw core::InputError(path, key, "'" + p.string() + "' is not a file");
        const std::string stem = p.stem().string();
        if (auto it = by_stem.find(stem); it != by_stem.end())
            throw core::InputError(path, key, "'" + entry + "' has the same file name stem '" + stem + "' as captures[" +
                                                  std::to_string(it->second) + "]; their outputs would overwrite each other");
        by_stem[stem] = i;
        m.entries.push_back(entry);
        m.captures.push_back(p.string());
        m.stems.push_back(stem);
    }
    try {
        if (j.contains("recipe")) {
            if (!j["recipe"].is_object()) throw core::InputError(path, "recipe", "must be a JSON object of stages (as a saved recipe)");
            m.recipe.mergeJson(j["recipe"].dump(), "recipe");
        }
    } catch (const core::SettingError& e) {
        std::string what = e.what();
        if (what.rfind("recipe: ", 0) == 0) what = what.substr(8);
        throw core::InputError(path, "recipe", what);
    }
    if (j.contains("grid_mm")) {
        if (!j["grid_mm"].is_string()) throw core::InputError(path, "grid_mm", "must be text XMIN:XMAX:ZMIN:ZMAX:STEP (mm)");
        try {
            applyGridMm(m.recipe, j["grid_mm"].get<std::string>(), "grid_mm");
        } catch (const std::runtime_error& e) {
            throw core::InputError(path, "grid_mm", e.what());
        }
    }
    if (j.contains("settings")) {
        if (!j["settings"].is_array()) throw core::InputError(path, "settings", "must be a list of \"stage.param=value\" texts");
        for (size_t i = 0; i < j["settings"].size(); ++i) {
            const std::string key = "settings[" + std::to_string(i) + "]";
            const auto& s = j["settings"][i];
            if (!s.is_string()) throw core::InputError(path, key, "must be text \"stage.param=value\"");
            try {
                m.recipe.applyAssignment(s.get<std::string>());
            } catch (const core::SettingError& e) {
                throw core::InputError(path, key, e.what());
            }
        }
    }
    try {
        recon::tgcParams(m.recipe);
    } catch (const core::SettingError& e) {
        throw core::InputError(path, "settings", e.what());
    }
    if (j.contains("png")) {
        if (!j["png"].is_boolean()) throw core::InputError(path, "png", "must be true or false");
        m.png = j["png"].get<bool>();
    }
    return m;
}

struct Shard {
    size_t index = 1, count = 1;  // 1-based index
};

Shard parseShard(const std::string& v) {
    const auto slash = v.find('/');
    if (slash == std::string::npos) throw UsageError("--shard needs I/N (1 <= I <= N), got '" + v + "'");
    Shard s;
    s.count = parseWholeNumber("--shard", v.substr(slash + 1), 1, 1000000);
    s.index = parseWholeNumber("--shard", v.substr(0, slash), 1, s.count);
    return s;
}

// What is known about one capture of this shard, as written to the summary.
struct Item {
    size_t index = 0;  // position in the manifest, 0-based
    std::string image, png;
    std::string status = "pending";  // pending, done, up to date, failed
    std::string sha256, error;
    size_t frames = 0;
    double hash_s = 0, reconstruct_s = 0, output_s = 0, total_s = 0;
};

json summaryJson(const Manifest& m, const Shard& s, const std::string& out_dir, const std::vector<Item>& items) {
    json j;
    j["umbra_format"] = "batch_summary";
    j["umbra_format_version"] = 1;
    std::error_code ec;
    j["manifest"] = fs::absolute(m.path, ec).lexically_normal().string();
    j["out"] = fs::absolute(out_dir, ec).lexically_normal().string();
    j["shard"] = {{"index", s.index}, {"count", s.count}};
    j["recipe"] = json::parse(m.recipe.toJson());
    size_t done = 0, fresh = 0, failed = 0;
    json list = json::array();
    for (const auto& it : items) {
        json c;
        c["index"] = it.index;
        c["capture"] = m.entries[it.index];
        c["path"] = m.captures[it.index];
        c["image"] = it.image;
        if (!it.png.empty()) c["png"] = it.png;
        c["sha256"] = it.sha256;
        c["status"] = it.status;
        c["frames"] = it.frames;
        // Wall times in seconds, to the millisecond.
        auto ms = [](double s) { return std::round(s * 1000) / 1000; };
        c["seconds"] = {{"hash", ms(it.hash_s)}, {"reconstruct", ms(it.reconstruct_s)}, {"output", ms(it.output_s)}, {"total", ms(it.total_s)}};
        if (!it.error.empty()) c["error"] = it.error;
        done += it.status == "done";
        fresh += it.status == "up to date";
        failed += it.status == "failed";
        list.push_back(c);
    }
    j["captures"] = list;
    j["counts"] = {{"done", done}, {"up_to_date", fresh}, {"failed", failed}, {"total", items.size()}};
    return j;
}

// An existing output is up to date when its recorded capture hash and recipe match and the
// PNG(s) asked for are there; then the image's frame count. Computes the capture's hash into
// `sha` when it gets that far.
std::optional<size_t> upToDate(const std::string& image, const std::string& capture, const core::Recipe& recipe,
                               const std::string& png, std::string& sha) {
    std::error_code ec;
    if (!fs::exists(image, ec)) return std::nullopt;
    core::ImageStack old;
    try {
        old = core::readImageFileHeader(image);
    } catch (const core::InputError&) {
        return std::nullopt;  // damaged or foreign: made again
    }
    if (old.recipe_json != recipe.toJson()) return std::nullopt;
    if (!png.empty()) {
        const bool several = old.frames > 1;
        for (size_t f = 0; f < old.frames; ++f)
            if (!fs::exists(pngPathFor(png, f, several), ec)) return std::nullopt;
    }
    sha = core::fileSha256(capture);
    if (old.capture_sha256 != sha) return std::nullopt;
    return old.frames;
}

}  // namespace

void checkManifest(const std::string& path) { (void)readManifest(path); }

int cmdBatch(const Argv& argv) {
    const std::vector<OptionSpec> specs = {
        {"--out", "DIR", "folder for the outputs and the summary (required; created if missing)"},
        {"--shard", "I/N", "process only shard I of N (1-based): the captures at 0-based positions i with i mod N = I - 1"},
        {"--resume", "", "skip captures whose image in DIR records the same capture SHA-256 and recipe"},
        {"--threads", "N", "worker threads per capture (default: all cores)"},
    };
    const char* usage = "umbra-cli batch MANIFEST.json --out DIR [--shard I/N] [--resume] [--threads N]";
    Args a(argv, specs, 0, 1);
    if (a.help()) {
        std::fputs(helpText(usage,
                            "Reconstructs every capture listed in MANIFEST.json (see docs/batch.md) with one recipe:\n"
                            "capture i becomes DIR/<capture file stem>.image.h5 (and .png when the manifest asks),\n"
                            "and DIR/summary-I-of-N.json lists each capture of the shard with its SHA-256, status,\n"
                            "timings and error. A failed capture does not stop the others. Outputs are the same\n"
                            "bytes however the work is sharded. Exit 0 when every capture succeeded, 2 when some\n"
                            "failed (listed) or the manifest is wrong.",
                            specs)
                       .c_str(),
                   stdout);
        return 0;
    }
    if (a.positional().size() != 1) throw UsageError("missing argument MANIFEST.json (see --help)");
    const auto out_dir = a.value("--out");
    if (!out_dir) throw UsageError("option --out DIR is required");
    const Shard shard = parseShard(a.value("--shard").value_or("1/1"));
    int threads = 0;
    if (auto t = a.value("--threads")) threads = int(parseWholeNumber("--threads", *t, 1, 256));
    const bool resume = a.has("--resume");
    const Manifest m = readManifest(a.positional()[0]);

    std::error_code ec;
    fs::create_directories(*out_dir, ec);
    if (!fs::is_directory(*out_dir, ec)) throw core::InputError(*out_dir, "", "cannot create the output folder");

    std::vector<Item> items;
    for (size_t i = shard.index - 1; i < m.captures.size(); i += shard.count) {
        Item it;
        it.index = i;
        const fs::path dir = fs::absolute(*out_dir, ec).lexically_normal();
        it.image = (dir / (m.stems[i] + ".image.h5")).string();
        if (m.png) it.png = (dir / (m.stems[i] + ".png")).string();
        items.push_back(it);
    }
    const std::string summary = (fs::path(*out_dir) / ("summary-" + std::to_string(shard.index) + "-of-" +
                                                       std::to_string(shard.count) + ".json")).string();
    auto saveSummary = [&] { core::writeFileAtomic(summary, summaryJson(m, shard, *out_dir, items).dump(2) + "\n", ".partial"); };
    saveSummary();

    const bool tty = isatty(2);
    TerminalBar bar(30);
    std::fprintf(stderr, "batch: shard %zu of %zu: %zu of %zu capture(s)%s\n", shard.index, shard.count, items.size(),
                 m.captures.size(), resume ? ", resuming" : "");
    for (size_t k = 0; k < items.size(); ++k) {
        Item& it = items[k];
        const std::string& cap = m.captures[it.index];
        const std::string name = fs::path(cap).filename().string();
        const auto t_start = Clock::now();
        try {
            if (resume) {
                const auto t0 = Clock::now();
                if (auto frames = upToDate(it.image, cap, m.recipe, it.png, it.sha256)) {
                    it.hash_s = since(t0);
                    it.frames = *frames;
                    it.status = "up to date";
                }
            }
            if (it.status != "up to date") {
                JobOptions job;
                job.capture = cap;
                job.image = it.image;
                if (m.png) job.png = it.png;
                job.threads = threads;
                if (tty)
                    job.progress = [&](double x, size_t pos, size_t count) {
                        bar.draw((double(k) + x) / double(items.size()), "capture " + std::to_string(k + 1) + "/" +
                                                                             std::to_string(items.size()) + " " + name + "  frame " +
                                                                             std::to_string(pos + 1) + "/" + std::to_string(count));
                    };
                const JobResult r = reconstructToFile(job, m.recipe);
                it.sha256 = r.capture_sha256;
                it.frames = r.frames;
                it.reconstruct_s = r.reconstruct_seconds;
                it.output_s = r.output_seconds;
                for (auto& [stage, s] : r.stage_seconds)
                    if (stage.rfind("capture hash", 0) == 0) it.hash_s += s;  // time spent on (or waiting for) the hash
                it.status = "done";
            }
        } catch (const core::Cancelled&) {
            if (!timeLimitReached()) throw;
            it.status = "failed";
            it.error = "stopped by the time limit (--timeout)";
        } catch (const std::exception& e) {
            it.status = "failed";
            it.error = e.what();
            if (it.sha256.empty()) {
                try {
                    it.sha256 = core::fileSha256(cap);
                } catch (const std::exception&) {
                }
            }
        }
        it.total_s = since(t_start);
        bar.done();
        std::fprintf(stderr, "batch: [%zu/%zu] %s: %s (%.2f s)%s%s\n", k + 1, items.size(), m.entries[it.index].c_str(),
                     it.status.c_str(), it.total_s, it.error.empty() ? "" : ": ", it.error.c_str());
        saveSummary();
        if (timeLimitReached()) throw core::Cancelled();  // the summary records what was done
    }
    size_t failed = 0;
    for (auto& it : items) failed += it.status == "failed";
    std::fprintf(stderr, "batch: %zu of %zu capture(s) ok, %zu failed; summary %s\n", items.size() - failed, items.size(), failed,
                 summary.c_str());
    if (failed) {
        std::fprintf(stderr, "batch: failed:\n");
        for (auto& it : items)
            if (it.status == "failed") std::fprintf(stderr, "  %s: %s\n", m.entries[it.index].c_str(), it.error.c_str());
        return 2;
    }
    return 0;
}

}  // namespace umbra::cli
