#include "src/cli/work_folder.hpp"

#include <fmt/format.h>
#include <stdlib.h>

#include "src/cli/usage_errors.hpp"
#include "src/output/write_file.hpp"

namespace mirrorcheck::cli {

namespace fs = std::filesystem;

fs::path claim_work_folder(const std::string& keep, std::string_view command) {
    if (keep.empty()) {
        std::string pattern = (fs::temp_directory_path() / fmt::format("mirrorcheck-{}-XXXXXX", command)).string();
        if (!mkdtemp(pattern.data())) throw usage::no_temporary_folder(fs::temp_directory_path().string());
        return pattern;
    }
    const fs::path folder = fs::absolute(keep).lexically_normal();
    std::error_code ec;
    const auto status = fs::status(folder, ec);
    if (fs::exists(status) && !fs::is_directory(status)) throw usage::keep_not_folder(keep);
    const fs::path marker = folder / work_folder_marker;
    if (fs::exists(status) && !fs::exists(marker) && !fs::is_empty(folder, ec))
        throw usage::keep_not_ours(keep, std::string(work_folder_marker));
    fs::create_directories(folder, ec);
    if (ec) throw usage::no_temporary_folder(folder.string());
    if (auto failed = write_file_whole(
            marker, fmt::format("mirrorcheck {} --keep wrote this folder; the next one may replace its files\n", command)))
        throw usage::cannot_write(marker.string(), *failed);
    return folder;
}

}  // namespace mirrorcheck::cli
