// A read-only view of a whole file, memory-mapped so that large raw files are not copied.
#pragma once

#include <filesystem>
#include <string>
#include <string_view>

namespace mirrorcheck {

class MappedFile {
public:
    // Opens and maps the file; throws InputError (code "input.cannot-open") when it cannot.
    explicit MappedFile(const std::filesystem::path& path);
    ~MappedFile();
    MappedFile(const MappedFile&) = delete;
    MappedFile& operator=(const MappedFile&) = delete;

    std::string_view bytes() const { return {data_, size_}; }
    // Copies bytes [offset, offset + length) into `out` with pread(), which on virtual
    // machines is several times faster than faulting the same pages of the mapping in.
    // The range must lie within the file.
    void copy_out(std::size_t offset, std::size_t length, char* out) const;
    const std::string& path() const { return path_; }

private:
    std::string path_;
    int fd_ = -1;
    const char* data_ = nullptr;
    std::size_t size_ = 0;
};

}  // namespace mirrorcheck
