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
    // Asks the kernel to map this byte range in at once rather than page by page, before
    // a reader goes through all of it. Advice only: nothing changes if it is not followed.
    void prefetch(std::size_t offset, std::size_t length) const;
    const std::string& path() const { return path_; }

private:
    std::string path_;
    const char* data_ = nullptr;
    std::size_t size_ = 0;
};

}  // namespace mirrorcheck
