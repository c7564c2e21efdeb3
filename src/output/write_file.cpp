#include "src/output/write_file.hpp"

#include <cerrno>
#include <cstdio>
#include <cstring>

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

namespace mirrorcheck {
namespace {

namespace fs = std::filesystem;

// Writes all of `bytes` to `fd`; false (errno set) on any failure.
bool write_all(int fd, std::string_view bytes) {
    while (!bytes.empty()) {
        const ssize_t n = ::write(fd, bytes.data(), bytes.size());
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) {
            if (n == 0) errno = EIO;
            return false;
        }
        bytes.remove_prefix(static_cast<std::size_t>(n));
    }
    return true;
}

std::string reason() { return std::strerror(errno); }

}  // namespace

std::optional<std::string> write_file_whole(const fs::path& path, std::string_view bytes) {
    struct stat st {};
    if (::stat(path.c_str(), &st) == 0 && !S_ISREG(st.st_mode)) {
        const int fd = ::open(path.c_str(), O_WRONLY | O_CLOEXEC | O_NONBLOCK);
        if (fd < 0) return reason();
        const bool written = write_all(fd, bytes);
        const std::string why = written ? std::string() : reason();
        if (::close(fd) != 0 && written) return reason();
        if (!written) return why;
        return std::nullopt;
    }
    const fs::path folder = path.has_parent_path() ? path.parent_path() : fs::path(".");
    std::string temporary = (folder / ("." + path.filename().string() + ".partial-XXXXXX")).string();
    const int fd = ::mkstemp(temporary.data());
    if (fd < 0) return reason();
    bool ok = write_all(fd, bytes);
    std::string why = ok ? std::string() : reason();
    if (::close(fd) != 0 && ok) {
        ok = false;
        why = reason();
    }
    // The file gets the permissions a plain new file would (mkstemp makes it 0600).
    if (ok) {
        const mode_t mask = ::umask(0);
        ::umask(mask);
        ::chmod(temporary.c_str(), 0666 & ~mask);
    }
    if (ok && ::rename(temporary.c_str(), path.c_str()) != 0) {
        ok = false;
        why = reason();
    }
    if (!ok) {
        ::unlink(temporary.c_str());
        return why;
    }
    return std::nullopt;
}

std::optional<std::string> flush_standard_output() {
    errno = 0;
    if (std::fflush(stdout) != 0 || std::ferror(stdout)) return errno != 0 ? reason() : std::string("write error");
    return std::nullopt;
}

}  // namespace mirrorcheck
