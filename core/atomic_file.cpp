// SPDX-License-Identifier: MIT
#include "core/atomic_file.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>

#include "core/error.h"

namespace umbra::core {

void writeFileAtomic(const std::string& path, const std::string& bytes, const std::string& suffix) {
    std::error_code ec;
    std::filesystem::path abs = std::filesystem::absolute(std::filesystem::path(path), ec);
    if (ec) abs = std::filesystem::path(path);
    const std::string folder = abs.parent_path().string();
    const auto errnoText = [](int e) { return std::string(std::strerror(e)); };
    // The temporary file sits beside the target so the final rename stays on one file system.
    const std::string tmp = path + suffix;
    const int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
    if (fd < 0) {
        const int e = errno;
        throw InputError(path, "", "cannot be saved: cannot create temporary file " + tmp + ": " + errnoText(e));
    }
    auto failAndClean = [&](const std::string& what, int e) {
        ::close(fd);
        ::unlink(tmp.c_str());
        throw InputError(path, "", "cannot be saved: " + what + ": " + errnoText(e));
    };
    size_t done = 0;
    while (done < bytes.size()) {
        const ssize_t n = ::write(fd, bytes.data() + done, bytes.size() - done);
        if (n < 0) {
            if (errno == EINTR) continue;
            failAndClean("writing " + tmp, errno);
        }
        done += size_t(n);
    }
    if (::fsync(fd) != 0) failAndClean("flushing " + tmp + " to disk", errno);
    if (::close(fd) != 0) {
        const int e = errno;
        ::unlink(tmp.c_str());
        throw InputError(path, "", "cannot be saved: closing " + tmp + ": " + errnoText(e));
    }
    if (::rename(tmp.c_str(), path.c_str()) != 0) {
        const int e = errno;
        ::unlink(tmp.c_str());
        throw InputError(path, "", "cannot be saved: renaming " + tmp + " over it: " + errnoText(e));
    }
    // Make the rename itself durable (best effort: some file systems refuse fsync on folders).
    const int dfd = ::open(folder.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (dfd >= 0) {
        (void)::fsync(dfd);
        ::close(dfd);
    }
}

}  // namespace umbra::core
