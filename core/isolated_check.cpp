// SPDX-License-Identifier: MIT
#include "core/isolated_check.h"

#include <poll.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <csignal>
#include <cstdio>
#include <nlohmann/json.hpp>

#include "core/capture_file.h"
#include "core/error.h"

namespace umbra::core {

std::vector<Problem> checkCaptureIsolated(const std::string& path, bool full, int header_seconds) {
    auto header = [&]() -> std::vector<Problem> {
        try {
            CaptureReader r(path);
            return {};
        } catch (const InputError& e) {
            return e.problems();
        } catch (const std::exception& e) {
            return {{"", e.what()}};
        }
    };
    ProblemCheck rest;
    if (full) rest = [&] { return CaptureReader::validate(path); };
    return runIsolated(header, rest, header_seconds);
}

std::vector<Problem> runIsolated(const ProblemCheck& header, const ProblemCheck& rest, int header_seconds) {
    const bool full = bool(rest);
    auto inProcess = [&] {
        auto p = header();
        if (p.empty() && full) p = rest();
        return p;
    };
    int fds[2];
    if (pipe(fds) != 0) return inProcess();
    std::fflush(nullptr);
    const pid_t parent = getpid();
    const pid_t pid = fork();
    if (pid < 0) {
        close(fds[0]);
        close(fds[1]);
        return inProcess();
    }
    if (pid == 0) {
        // The child dies with its parent: a killed umbra-cli (a batch system's time limit, kill -9)
        // or workstation never leaves it spinning inside the HDF5 library.
        prctl(PR_SET_PDEATHSIG, SIGKILL);
        if (getppid() != parent) _exit(3);
        close(fds[0]);
        auto send = [&](const std::string& out) {
            size_t done = 0;
            while (done < out.size()) {
                ssize_t n = write(fds[1], out.data() + done, out.size() - done);
                if (n < 0 && errno == EINTR) continue;
                if (n <= 0) _exit(3);
                done += size_t(n);
            }
        };
        std::vector<Problem> problems;
        try {
            problems = header();
        } catch (const InputError& e) {
            problems = e.problems();
        } catch (const std::exception& e) {
            problems = {{"", e.what()}};
        }
        send("H");  // the header was read (well or badly) in time
        if (problems.empty() && full) {
            try {
                problems = rest();
            } catch (const InputError& e) {
                problems = e.problems();
            } catch (const std::exception& e) {
                problems = {{"", e.what()}};
            }
        }
        nlohmann::json j = nlohmann::json::array();
        for (auto& p : problems) j.push_back({p.where, p.what});
        send(j.dump(-1, ' ', false, nlohmann::json::error_handler_t::replace));
        close(fds[1]);
        _exit(0);
    }
    close(fds[1]);
    std::string buf;
    char tmp[4096];
    bool timed_out = false;
    for (;;) {
        if (buf.empty()) {  // still in the header phase: wait with a deadline
            pollfd pfd{fds[0], POLLIN, 0};
            int r = poll(&pfd, 1, header_seconds * 1000);
            if (r < 0 && errno == EINTR) continue;
            if (r == 0) {
                timed_out = true;
                kill(pid, SIGKILL);
                break;
            }
        }
        ssize_t n = read(fds[0], tmp, sizeof tmp);
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) break;
        buf.append(tmp, size_t(n));
    }
    close(fds[0]);
    int status = 0;
    while (waitpid(pid, &status, 0) < 0 && errno == EINTR) {}
    if (timed_out)
        return {{"", "damaged HDF5 structure: reading the header did not finish within " + std::to_string(header_seconds) + " s"}};
    if (WIFEXITED(status) && WEXITSTATUS(status) == 0 && buf.size() > 1 && buf[0] == 'H') {
        try {
            std::vector<Problem> problems;
            for (auto& p : nlohmann::json::parse(buf.substr(1)))
                problems.push_back({p.at(0).get<std::string>(), p.at(1).get<std::string>()});
            return problems;
        } catch (const std::exception&) {
        }
    }
    std::string why = WIFSIGNALED(status) ? "signal " + std::to_string(WTERMSIG(status)) : "status " + std::to_string(WEXITSTATUS(status));
    return {{"", "damaged HDF5 structure: reading it failed inside the HDF5 library (" + why + ")"}};
}

}  // namespace umbra::core
