// What the fuzz targets share: a private folder for the files a reader must open by name,
// and the one rule every target checks (an InputError is the only acceptable failure).
#pragma once

#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <string_view>

#include <stdlib.h>  // mkdtemp

namespace mirrorcheck::fuzz {

// A folder of this process's own under $TMPDIR (or /tmp), emptied and removed at exit.
// Readers that take a path (raw files, netlists and their includes) get their input here.
class Scratch {
public:
    Scratch() {
        const char* tmp = std::getenv("TMPDIR");
        std::string pattern = std::string(tmp && *tmp ? tmp : "/tmp") + "/mirrorcheck-fuzz-XXXXXX";
        if (!::mkdtemp(pattern.data())) std::abort();
        dir_ = pattern;
    }
    ~Scratch() {
        std::error_code ec;
        std::filesystem::remove_all(dir_, ec);
    }
    Scratch(const Scratch&) = delete;
    Scratch& operator=(const Scratch&) = delete;

    const std::filesystem::path& dir() const { return dir_; }

    // Removes what the last input left, so that no input sees another's files.
    void clear() const {
        std::error_code ec;
        for (const auto& entry : std::filesystem::directory_iterator(dir_, ec))
            std::filesystem::remove_all(entry.path(), ec);
    }

    std::filesystem::path write(const std::string& name, std::string_view bytes) const {
        const auto path = dir_ / name;
        std::ofstream out(path, std::ios::binary | std::ios::trunc);
        out.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
        if (!out) std::abort();  // the scratch folder itself failing is not a finding
        return path;
    }

private:
    std::filesystem::path dir_;
};

// The scratch folder of the process (one per fuzzing process; libFuzzer's -jobs forks).
inline const Scratch& scratch() {
    static const Scratch s;
    return s;
}

inline std::string_view as_text(const std::uint8_t* data, std::size_t size) {
    return {reinterpret_cast<const char*>(data), size};
}

}  // namespace mirrorcheck::fuzz
