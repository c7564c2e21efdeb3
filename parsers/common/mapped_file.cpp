#include "parsers/common/mapped_file.hpp"

#include <algorithm>
#include <cerrno>
#include <cstring>

#include <fcntl.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include "parsers/common/errors.hpp"

namespace mirrorcheck {

MappedFile::MappedFile(const std::filesystem::path& path) : path_(path.string()) {
    // O_NONBLOCK: opening a FIFO (`.include` of a named pipe) would otherwise wait for a
    // writer forever; it is refused below as not a regular file, and has no effect on one.
    int fd = ::open(path_.c_str(), O_RDONLY | O_CLOEXEC | O_NONBLOCK);
    if (fd < 0) throw errors::cannot_open(path_, std::strerror(errno));
    struct stat st {};
    if (::fstat(fd, &st) != 0 || !S_ISREG(st.st_mode)) {
        ::close(fd);
        throw errors::cannot_open(path_, "not a regular file");
    }
    size_ = static_cast<std::size_t>(st.st_size);
    if (size_ > 0) {
        void* p = ::mmap(nullptr, size_, PROT_READ, MAP_PRIVATE, fd, 0);
        if (p == MAP_FAILED) {
            int e = errno;
            ::close(fd);
            throw errors::cannot_open(path_, std::strerror(e));
        }
        ::madvise(p, size_, MADV_SEQUENTIAL);
        data_ = static_cast<const char*>(p);
    }
    fd_ = fd;
}

void MappedFile::copy_out(std::size_t offset, std::size_t length, char* out) const {
    std::size_t done = 0;
    while (done < length) {
        ssize_t n = ::pread(fd_, out + done, length - done, static_cast<off_t>(offset + done));
        if (n <= 0) break;
        done += static_cast<std::size_t>(n);
    }
    // The mapping holds the same bytes; it is the fallback should pread stop short.
    if (done < length) std::memcpy(out + done, data_ + offset + done, length - done);
}

MappedFile::~MappedFile() {
    if (data_) ::munmap(const_cast<char*>(data_), size_);
    if (fd_ >= 0) ::close(fd_);
}

}  // namespace mirrorcheck
