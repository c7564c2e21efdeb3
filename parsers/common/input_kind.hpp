// Tells which front end reads a file, from its content rather than its name.
#pragma once

#include <filesystem>

namespace mirrorcheck {

enum class InputKind { raw, listing, netlist };

// raw: the file starts with `Title:`; listing: it holds a `show` table; netlist: anything
// else (the netlist reader then says what it cannot read). Throws InputError when the
// file cannot be read or is empty.
InputKind detect_input_kind(const std::filesystem::path& path);

}  // namespace mirrorcheck
