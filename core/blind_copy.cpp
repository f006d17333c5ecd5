// SPDX-License-Identifier: MIT
#include "core/blind_copy.h"

#include <filesystem>
#include <system_error>

#include "core/capture_file.h"
#include "core/error.h"

namespace umbra::core {
namespace fs = std::filesystem;

CaseDocument blindCopy(const CaseDocument& doc) {
    CaseDocument out;
    out.version = doc.version;
    out.title = kBlindCopyTitle;
    out.sizing_medium = doc.sizing_medium;
    out.speed_uncertainty_rel = doc.speed_uncertainty_rel;
    out.active_capture = 0;
    for (const CaseCapture& c : doc.captures) {
        CaseCapture b;
        b.path = c.path;
        b.sha256 = c.sha256;
        b.recipe_json = c.recipe_json;
        out.captures.push_back(std::move(b));
    }
    return out;
}

CaseDocument writeBlindCopy(const std::string& case_path, const std::string& new_path, bool copy_captures) {
    std::error_code ec;
    if (fs::exists(new_path, ec) && fs::equivalent(case_path, new_path, ec))
        throw InputError(new_path, "", "is the case being copied; give a new file name for the blind copy");
    CaseDocument blind = blindCopy(loadCase(case_path));
    if (copy_captures) {
        const fs::path folder = fs::absolute(fs::path(new_path), ec).parent_path();
        for (CaseCapture& c : blind.captures) {
            if (checkCapture(c) != CaptureStatus::Ok)
                throw InputError(c.path, "", "cannot be copied: missing, or its SHA-256 differs from the one the case records");
            const fs::path target = folder / fs::path(c.path).filename();
            if (fs::exists(target, ec)) {
                if (fileSha256(target.string()) != c.sha256)
                    throw InputError(target.string(), "", "already exists and is a different file; copy the captures by hand or choose another folder");
            } else {
                const fs::path tmp = target.string() + ".copying";
                fs::copy_file(c.path, tmp, fs::copy_options::overwrite_existing, ec);
                if (!ec) fs::rename(tmp, target, ec);
                if (ec) {
                    const std::string why = ec.message();
                    fs::remove(tmp, ec);
                    throw InputError(target.string(), "", "cannot be written: " + why);
                }
            }
            c.path = target.string();
        }
    }
    saveCase(new_path, blind, /*absolute_fallback=*/false);
    return blind;
}

}  // namespace umbra::core
