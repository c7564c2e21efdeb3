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
    int fd = ::open(path_.c_str(), O_RDONLY | O_CLOEXEC);
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
    ::close(fd);
}

void MappedFile::prefetch(std::size_t offset, std::size_t length) const {
#ifdef MADV_POPULATE_READ
    if (!data_ || offset >= size_) return;
    const std::size_t page = static_cast<std::size_t>(::sysconf(_SC_PAGESIZE));
    const std::size_t start = offset / page * page;
    const std::size_t end = std::min(size_, offset + length);
    ::madvise(const_cast<char*>(data_) + start, end - start, MADV_POPULATE_READ);
#else
    (void)offset;
    (void)length;
#endif
}

MappedFile::~MappedFile() {
    if (data_) ::munmap(const_cast<char*>(data_), size_);
}

}  // namespace mirrorcheck
