// SPDX-License-Identifier: MIT
// umbra-cli: headless Umbra. Thin: parses the subcommand and dispatches.
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>

#include "args.h"
#include "commands.h"
#include "core/error.h"
#include "time_limit.h"

namespace umbra::cli {
const std::vector<Command>& commands() {
    static const std::vector<Command> table = {
        {"info", "print a readable summary of a capture", cmdInfo},
        {"validate", "check any file Umbra reads, DICOM included (by content); exit 2 listing each problem", cmdValidate},
        {"simulate", "make a synthetic capture from a scene description", cmdSimulate},
        {"reconstruct", "reconstruct B-scan images from a capture", cmdReconstruct},
        {"batch", "reconstruct every capture of a manifest (one shard of it), with a summary", cmdBatch},
        {"measure", "size an indication in an image file (drop, tips, peak, scan length) with its uncertainty", cmdMeasure},
        {"report", "write a PDF report of a case (findings, images, technique, provenance)", cmdReport},
        {"export-findings", "write a case's findings and measurements as a CSV or JSON table", cmdExportFindings},
        {"blind-copy", "copy a case for a blind second reading (captures and recipes only)", cmdBlindCopy},
        {"agreement", "inter-reader agreement of two or more cases on the same captures (kappa, Bland-Altman)", cmdAgreement},
        {"import", "read a DICOM ultrasound image (stored frames) into an image file", cmdImport},
        {"export-dicom", "write an image file's frames as a DICOM ultrasound (multi-frame) image", cmdExportDicom},
        {"calibrate", "speed of sound from a back wall or two holes, fixed delay, weak or dead elements", cmdCalibrate},
    };
    return table;
}
}  // namespace umbra::cli

int main(int argc, char** argv) {
    using namespace umbra::cli;
    auto usage = [] {
        std::string s = "usage: umbra-cli COMMAND [options]\n\ncommands:\n";
        for (auto& c : commands()) {
            std::string n = "  " + std::string(c.name);
            n.resize(16, ' ');
            s += n + c.summary + "\n";
        }
        s += "\n'umbra-cli COMMAND --help' describes each command; 'umbra-cli --version' prints the version.\n";
        s += "reconstruct, batch and simulate take --timeout SECONDS: stop (exit 124) when the time is up.\n";
        return s;
    };
    if (argc < 2) {
        std::fputs(usage().c_str(), stderr);
        return 2;
    }
    std::string cmd = argv[1];
    if (cmd == "--help" || cmd == "-h" || cmd == "help") {
        std::fputs(usage().c_str(), stdout);
        return 0;
    }
    if (cmd == "--version") {
        std::printf("umbra-cli %s\n", UMBRA_VERSION);
        return 0;
    }
    Argv rest(argv + 2, argv + argc);
    // --timeout SECONDS (long work only): taken out here, the command never sees it.
    const bool long_work = cmd == "reconstruct" || cmd == "batch" || cmd == "simulate";
    for (size_t i = 0; long_work && i < rest.size(); ++i) {
        std::string v;
        if (rest[i] == "--timeout" && i + 1 < rest.size()) {
            v = rest[i + 1];
            rest.erase(rest.begin() + long(i), rest.begin() + long(i) + 2);
        } else if (rest[i].rfind("--timeout=", 0) == 0) {
            v = rest[i].substr(10);
            rest.erase(rest.begin() + long(i));
        } else if (rest[i] == "--timeout") {
            std::fprintf(stderr, "umbra-cli %s: --timeout needs a number of seconds\n", cmd.c_str());
            return 2;
        } else {
            continue;
        }
        char* end = nullptr;
        const double s = std::strtod(v.c_str(), &end);
        if (v.empty() || *end != '\0' || !(s > 0 && s <= 1e7)) {
            std::fprintf(stderr, "umbra-cli %s: --timeout '%s' is not a number of seconds in (0, 1e7]\n", cmd.c_str(), v.c_str());
            return 2;
        }
        startTimeLimit(s, cmd);
        break;
    }
    for (auto& c : commands())
        if (cmd == c.name) {
            // Exit codes (commands.h): 2 for usage errors, bad settings and bad input files;
            // 1 for any other failure. Input errors already name the file.
            try {
                return c.run(rest);
            } catch (const UsageError& e) {
                std::fprintf(stderr, "umbra-cli %s: %s\n", c.name, e.what());
                return 2;
            } catch (const umbra::core::SettingError& e) {
                std::fprintf(stderr, "umbra-cli %s: bad setting: %s\n", c.name, e.what());
                return 2;
            } catch (const umbra::core::InputError& e) {
                std::fprintf(stderr, "%s\n", e.what());
                return 2;
            } catch (const umbra::core::Cancelled&) {
                if (!timeLimitReached()) throw;
                std::fprintf(stderr, "%s\n", timeLimitMessage().c_str());
                return kTimeLimitExitCode;
            } catch (const std::exception& e) {
                std::fprintf(stderr, "umbra-cli %s: %s\n", c.name, e.what());
                return 1;
            }
        }
    std::fprintf(stderr, "umbra-cli: unknown command '%s'\n\n%s", cmd.c_str(), usage().c_str());
    return 2;
}
