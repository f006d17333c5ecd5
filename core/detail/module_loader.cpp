// SPDX-License-Identifier: MIT
#include "core/detail/module_loader.h"

#include <dlfcn.h>

#include <cstdlib>
#include <filesystem>
#include <map>
#include <mutex>
#include <utility>
#include <vector>

namespace umbra::core::detail {
namespace {
namespace fs = std::filesystem;

std::vector<fs::path> candidates(const ModuleSpec& s) {
    std::vector<fs::path> out;
    if (const char* env = s.env_var ? std::getenv(s.env_var) : nullptr; env && *env) out.emplace_back(env);
    std::error_code ec;
    const fs::path exe = fs::read_symlink("/proc/self/exe", ec);
    if (!ec) {
        out.push_back(exe.parent_path() / s.file);
        out.push_back(exe.parent_path().parent_path() / "lib" / "umbra" / s.file);
    }
    if (s.build_path && *s.build_path) out.emplace_back(s.build_path);
    return out;
}

std::pair<void*, std::string> load(const ModuleSpec& s) {
    std::string tried;
    for (const auto& p : candidates(s)) {
        std::error_code ec;
        if (!fs::exists(p, ec)) {
            tried += (tried.empty() ? "" : ", ") + p.string();
            continue;
        }
        void* h = dlopen(p.c_str(), RTLD_NOW | RTLD_LOCAL);
        if (!h) {
            const char* e = dlerror();
            return {nullptr, std::string("the ") + s.what + " " + p.string() + " cannot be loaded: " + (e ? e : "unknown reason")};
        }
        void* fn = dlsym(h, s.symbol);
        if (!fn) return {nullptr, std::string("the ") + s.what + " " + p.string() + " has no entry point " + s.symbol};
        return {fn, ""};
    }
    return {nullptr, std::string("the ") + s.what + " " + s.file + " was not found (looked at " + tried + ")"};
}

}  // namespace

void* loadModuleSymbol(const ModuleSpec& spec, std::string& why) {
    static std::mutex m;
    static std::map<std::string, std::pair<void*, std::string>> loaded;
    std::lock_guard lock(m);
    auto it = loaded.find(spec.file);
    if (it == loaded.end()) it = loaded.emplace(spec.file, load(spec)).first;
    why = it->second.second;
    return it->second.first;
}

}  // namespace umbra::core::detail
