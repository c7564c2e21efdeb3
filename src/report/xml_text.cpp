// XML 1.0's escaping and character rules (the Char production), for the JUnit back ends.
#include "src/report/xml_text.hpp"

#include <cstddef>
#include <cstdint>
#include <optional>
#include <utility>

#include <fmt/format.h>

#include "parsers/common/utf8.hpp"

namespace mirrorcheck::report::xml {
namespace {

constexpr std::string_view replacement_character = "\xEF\xBF\xBD";

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
