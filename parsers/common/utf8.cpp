#include "parsers/common/utf8.hpp"

#include <fmt/format.h>

namespace mirrorcheck {

std::optional<std::pair<std::uint32_t, std::size_t>> decode_utf8(std::string_view s) {
    const auto byte = [&](std::size_t i) { return static_cast<unsigned char>(s[i]); };
    const unsigned char lead = byte(0);
    if (lead < 0x80) return std::pair<std::uint32_t, std::size_t>{lead, 1};
    const std::size_t length = lead >= 0xF8 ? 0 : lead >= 0xF0 ? 4 : lead >= 0xE0 ? 3 : lead >= 0xC0 ? 2 : 0;
    if (length == 0 || length > s.size()) return std::nullopt;
    std::uint32_t cp = lead & (0x7F >> length);
    for (std::size_t i = 1; i < length; ++i) {
        if ((byte(i) & 0xC0) != 0x80) return std::nullopt;
        cp = (cp << 6) | (byte(i) & 0x3F);
    }
    static constexpr std::uint32_t smallest[] = {0, 0, 0x80, 0x800, 0x10000};
    if (cp < smallest[length] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return std::nullopt;
    return std::pair<std::uint32_t, std::size_t>{cp, length};
}

std::string printable_text(std::string_view text) {
    std::string out;
    out.reserve(text.size());
    while (!text.empty()) {
        const auto decoded = decode_utf8(text);
        const std::uint32_t c = decoded ? decoded->first : 0;
        const bool control = decoded && ((c < 0x20 && c != '\t' && c != '\n') || c == 0x7F || (c >= 0x80 && c < 0xA0));
        if (decoded && !control) {
            out += text.substr(0, decoded->second);
            text.remove_prefix(decoded->second);
        } else {
            out += fmt::format("\\x{:02x}", static_cast<unsigned char>(text[0]));
            text.remove_prefix(1);
        }
    }
    return out;
}

}  // namespace mirrorcheck
