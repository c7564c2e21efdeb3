// Writes an output file whole or not at all: through a temporary file beside it, checked
// at every write and at the close, then renamed over the target, so that a full disk or
// an interruption never leaves a half-written deck or report behind.
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>

namespace mirrorcheck {

// Writes `bytes` to `path`; the reason (strerror's text) when it could not, and then the
// target is as it was. A target that exists and is not a regular file (/dev/stdout, a
// pipe, /dev/full) is written in place instead, since renaming over it would replace it.
std::optional<std::string> write_file_whole(const std::filesystem::path& path, std::string_view bytes);

// Flushes standard output; the reason when what was written to it did not all arrive
// (a full disk behind a redirection, a closed pipe).
std::optional<std::string> flush_standard_output();

}  // namespace mirrorcheck
