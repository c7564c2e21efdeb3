// UTF-8 for everything that echoes input: well-formed sequences pass, other bytes are
// escaped, so a terminal, a CI log or an XML or JSON reader never sees broken text.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <utility>

namespace mirrorcheck {

// The code point of the UTF-8 sequence at the start of `s` (not empty) and its length, or
// nothing when it is not well-formed UTF-8 (overlong forms and surrogates included).
std::optional<std::pair<std::uint32_t, std::size_t>> decode_utf8(std::string_view s);

// `text` for a message: well-formed UTF-8 kept, tab and line feed kept (a message's own
// layout, such as the indented end of ngspice's log; the readers split their input into
// lines, so no echoed name holds one), every other control byte (NUL, escape, carriage
// return, DEL) and every byte that is not well-formed UTF-8 written as `\xNN`.
std::string printable_text(std::string_view text);

}  // namespace mirrorcheck
