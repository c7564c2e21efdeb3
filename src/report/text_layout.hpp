// Laying out text for a terminal: widths in characters (UTF-8 aware, colour codes take no
// room), lines wrapped at spaces with a hanging indent, and colour that is only ever added
// to words that already say the same thing.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>

namespace mirrorcheck::report {

// Characters as a terminal shows them: UTF-8 sequences count once, ANSI colour codes not at all.
std::size_t display_width(std::string_view text);

// `line` (no line end) broken at spaces into lines of at most `width` characters; lines after
// the first start with `indent` spaces. A word longer than the room stays whole. Each line
// ends with '\n'.
std::string wrap(std::string_view line, std::size_t width, std::size_t indent);

// `text` padded with spaces to `width` characters, on the right (left aligned) or the left.
std::string pad_right(std::string_view text, std::size_t width);
std::string pad_left(std::string_view text, std::size_t width);

enum class Colour { none, red, yellow, green, dim, bold };

// `text` in that colour when `enabled`, else as it is.
std::string coloured(std::string_view text, Colour colour, bool enabled);

// A whole table as it may reach a terminal: names from the input that are not UTF-8 or
// hold control bytes (a hostile netlist's escape sequences) written as `\xNN`
// (printable_text); with `colour`, the SGR colour codes `coloured` adds are kept.
std::string terminal_text(std::string_view text, bool colour);

}  // namespace mirrorcheck::report
