// Reads waiver files (format in waivers.hpp). The file is checked for bytes that are not
// text first, so that a binary file given by mistake is named as such rather than as a
// malformed waiver; then each line is split into its three fields.
#include "parsers/waivers/waivers.hpp"

#include <algorithm>
#include <cstddef>

#include "parsers/common/mapped_file.hpp"
#include "parsers/common/text.hpp"
#include "parsers/waivers/waiver_errors.hpp"

namespace mirrorcheck::waivers {
namespace {

constexpr std::string_view utf8_bom = "\xEF\xBB\xBF";

bool is_blank(char c) { return c == ' ' || c == '\t'; }

// Control characters other than tab and line ends (NUL, escape, DEL, ...) do not occur in text.
bool is_binary(unsigned char c) { return (c < 0x20 && c != '\t' && c != '\n' && c != '\r') || c == 0x7F; }

void check_text(std::string_view text, const std::string& path) {
    std::size_t line = 1, column = 1;
    for (char c : text) {
        if (is_binary(static_cast<unsigned char>(c)))
            throw errors::waiver_binary_data(Location(path, line, column), static_cast<unsigned char>(c));
        if (c == '\n') ++line, column = 1;
        else ++column;
    }
}

// One line being split into fields; columns are 1-based byte columns.
struct LineCursor {
    std::string_view text;
    std::size_t pos = 0;

    // Skips blanks; false at the end of the line or at a `#` that starts a comment.
    bool at_field() {
        while (pos < text.size() && is_blank(text[pos])) ++pos;
        return pos < text.size() && text[pos] != '#';
    }
    std::string_view take_word() {
        std::size_t start = pos;
        while (pos < text.size() && !is_blank(text[pos])) ++pos;
        return text.substr(start, pos - start);
    }
    std::string_view take_rest() {
        std::size_t end = text.size();
        while (end > pos && is_blank(text[end - 1])) --end;
        return text.substr(pos, end - pos);
    }
    std::size_t column() const { return pos + 1; }
};

Waiver parse_line(std::string_view text, const Location& line, const std::vector<std::string>& known_codes) {
    auto at = [&](std::size_t column) { return Location(line.file, line.line, column); };
    LineCursor cursor{text};
    cursor.at_field();
    Waiver w;
    w.where = at(cursor.column());
    const std::string_view subject = cursor.take_word();
    if (subject != "*" && subject.find('*') != std::string_view::npos)
        throw errors::waiver_bad_subject(w.where, subject);
    w.subject = to_lower(subject);
    if (!cursor.at_field()) throw errors::waiver_missing_code(at(cursor.column()), subject, known_codes);
    const std::size_t code_column = cursor.column();
    w.code = to_lower(cursor.take_word());
    if (w.code != "*" && std::find(known_codes.begin(), known_codes.end(), w.code) == known_codes.end())
        throw errors::waiver_unknown_code(at(code_column), w.code, known_codes);
    if (!cursor.at_field()) throw errors::waiver_missing_reason(at(cursor.column()), subject, w.code);
    w.reason = std::string(cursor.take_rest());
    return w;
}

}  // namespace

Waivers parse_waivers(std::string_view text, const std::string& path, const std::vector<std::string>& known_codes) {
    if (text.substr(0, utf8_bom.size()) == utf8_bom) text.remove_prefix(utf8_bom.size());
    check_text(text, path);
    Waivers out;
    std::size_t number = 0;
    while (!text.empty()) {
        const std::size_t end = text.find('\n');
        std::string_view line = text.substr(0, end);
        text.remove_prefix(end == std::string_view::npos ? text.size() : end + 1);
        ++number;
        if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
        LineCursor probe{line};
        if (probe.at_field()) out.push_back(parse_line(line, Location(path, number), known_codes));
    }
    return out;
}

Waivers read_waivers(const std::filesystem::path& path, const std::vector<std::string>& known_codes) {
    MappedFile file(path);
    return parse_waivers(file.bytes(), file.path(), known_codes);
}

}  // namespace mirrorcheck::waivers
