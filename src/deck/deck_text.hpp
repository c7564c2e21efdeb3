// The text of a deck's files as ngspice reads it, for the tools that write derived copies:
// physical lines, the logical lines `+` continuations make of them, and where each
// subcircuit definition starts and ends.
#pragma once

#include <cstddef>
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

namespace mirrorcheck {

// A file name as the netlist reader names files: absolute and normal (as given when it
// cannot be made absolute).
std::filesystem::path normal(const std::string& file);

// The file's physical lines, each with its own line break (CR LF kept; one is added to a
// last line without). Throws InputError "input.cannot-open" when it cannot be read.
std::vector<std::string> physical_lines(const std::filesystem::path& path);

// The last physical line (1-based) of the logical line starting at `first`: its `+`
// continuation lines, across blank and comment lines between them, as ngspice joins them.
std::size_t last_physical_line(const std::vector<std::string>& lines, std::size_t first);

// The logical line starting at `first`, its continuations joined with a space, without
// the `+` marks and the line breaks.
std::string logical_line(const std::vector<std::string>& lines, std::size_t first);

// The line's first word, lower case: ".subckt", "m1".
std::string first_word(std::string_view line);

// A `.subckt NAME ...` ... `.ends` block: its first and last physical lines (1-based).
struct SubcktDefinition {
    std::string name;  // lower case
    std::size_t first = 0, last = 0;
};

// Every definition of the file, nested ones too, in the order their `.ends` close them.
std::vector<SubcktDefinition> subckt_definitions(const std::vector<std::string>& lines);

}  // namespace mirrorcheck
