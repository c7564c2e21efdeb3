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
    const std::string& path() const { return path_; }

private:
    std::string path_;
    const char* data_ = nullptr;
    std::size_t size_ = 0;
};

}  // namespace mirrorcheck
