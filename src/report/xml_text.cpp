// XML 1.0's escaping and character rules (the Char production), for the JUnit back ends.
#include "src/report/xml_text.hpp"

#include <cstddef>
#include <cstdint>
#include <optional>
#include <utility>

#include <fmt/format.h>

namespace mirrorcheck::report::xml {
namespace {

constexpr std::string_view replacement_character = "\xEF\xBF\xBD";

// The code point of the UTF-8 sequence at the start of `s` and its length, or nothing when
// it is not well-formed UTF-8 (overlong forms and surrogates included).
std::optional<std::pair<std::uint32_t, std::size_t>> decode_utf8(std::string_view s) {
    const auto byte = [&](std::size_t i) { return static_cast<unsigned char>(s[i]); };
    const unsigned char lead = byte(0);
    if (lead < 0x80) return std::pair<std::uint32_t, std::size_t>{lead, 1};
    const std::size_t length = lead >= 0xF0 ? 4 : lead >= 0xE0 ? 3 : lead >= 0xC0 ? 2 : 0;
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

// XML 1.0's Char production.
bool allowed_in_xml(std::uint32_t cp) {
    return cp == 0x9 || cp == 0xA || cp == 0xD || (cp >= 0x20 && cp <= 0xD7FF) || (cp >= 0xE000 && cp <= 0xFFFD) ||
           cp >= 0x10000;
}

// Escaped for element content, or for a double-quoted attribute value when `attribute`
// (where tab and line ends are written as references, which attribute normalisation keeps).
std::string escape(std::string_view text, bool attribute) {
    std::string out;
    out.reserve(text.size());
    while (!text.empty()) {
        const auto decoded = decode_utf8(text);
        const std::size_t length = decoded ? decoded->second : 1;
        const std::uint32_t cp = decoded ? decoded->first : 0;
        if (!decoded || !allowed_in_xml(cp)) out += replacement_character;
        else if (cp == '&') out += "&amp;";
        else if (cp == '<') out += "&lt;";
        else if (cp == '>') out += "&gt;";
        else if (cp == '"') out += "&quot;";
        else if (cp == '\'') out += "&apos;";
        else if (cp == '\r' || (attribute && (cp == '\t' || cp == '\n'))) out += fmt::format("&#{};", cp);
        else out += text.substr(0, length);
        text.remove_prefix(length);
    }
    return out;
}

}  // namespace

std::string attr(std::string_view text) { return escape(text, true); }
std::string content(std::string_view text) { return escape(text, false); }

std::string undotted(std::string_view name) {
    std::string s(name);
    for (char& c : s)
        if (c == '.') c = '/';
    return s;
}

}  // namespace mirrorcheck::report::xml
