// The folder `run` and `sweep` write their decks, ngspice's logs and results into: a new
// one under the system's temporary folder, or the user's --keep folder, claimed for
// mirrorcheck so that nothing in it it did not write is ever replaced.
#pragma once

#include <filesystem>
#include <string>
#include <string_view>

namespace mirrorcheck::cli {

// The marker a --keep folder carries once mirrorcheck has written into it.
inline constexpr std::string_view work_folder_marker = ".mirrorcheck-work";

// With `keep` empty: a new folder `mirrorcheck-COMMAND-XXXXXX` under the temporary folder.
// Else the folder `keep`, created when missing, and marked; an existing one must be empty
// or marked by an earlier `COMMAND --keep` (its files are then replaced). Throws InputError
// "usage.keep" for a file, or a folder holding files mirrorcheck did not write (the user's
// netlist, say), and "usage.temporary-folder" when no folder can be made.
std::filesystem::path claim_work_folder(const std::string& keep, std::string_view command);

}  // namespace mirrorcheck::cli
