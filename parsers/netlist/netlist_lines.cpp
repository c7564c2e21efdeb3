// The netlist lexer: logical lines and tokens (see netlist_lines.hpp for the rules).
#include "parsers/netlist/netlist_lines.hpp"

#include <algorithm>
#include <array>
#include <cstring>

#include "parsers/netlist/netlist_errors.hpp"

namespace mirrorcheck::netlist::detail {

namespace {

bool is_blank(char c) { return c == ' ' || c == '\t' || c == '\f' || c == '\v'; }

// The length of the line's text once an inline comment is cut off. Quotes and braces
// protect their contents: `'a;b'` is not a comment.
std::size_t content_length(std::string_view line) {
    // The characters that can start or end a comment or protect one: most lines hold none.
    static constexpr auto special = [] {
        std::array<bool, 256> table{};
        for (unsigned char c : std::string_view("';\"{}$")) table[c] = true;
        return table;
    }();
    char quote = 0;
    int braces = 0;
    for (std::size_t i = 0; i < line.size(); ++i) {
        char c = line[i];
        if (!special[static_cast<unsigned char>(c)]) continue;
        if (quote) {
            if (c == quote) quote = 0;
            continue;
        }
        if (c == '\'' || c == '"') quote = c;
        else if (c == '{') ++braces;
        else if (c == '}' && braces > 0) --braces;
        else if (braces == 0 && c == ';') return i;
        else if (braces == 0 && c == '$' && (i == 0 || is_blank(line[i - 1])) &&
                 (i + 1 == line.size() || is_blank(line[i + 1])))
            return i;
    }
    return line.size();
}

std::string_view trim_right(std::string_view s) {
    while (!s.empty() && (is_blank(s.back()) || s.back() == '\r')) s.remove_suffix(1);
    return s;
}

}  // namespace

Location LogicalLine::locate(std::size_t offset) const {
    Location where{file()};
    std::size_t piece_offset = 0, piece_line = line, piece_column = column;
    if (continued_count > 0) {
        const LinePiece* begin = owner->pieces.data() + continued_first;
        const LinePiece* end = begin + continued_count;
        const LinePiece* it =
            std::upper_bound(begin, end, offset, [](std::size_t o, const LinePiece& p) { return o < p.offset; });
        if (it != begin) {
            piece_offset = (it - 1)->offset;
            piece_line = (it - 1)->line;
            piece_column = (it - 1)->column;
        }
    }
    where.line = piece_line;
    where.column = piece_column + (offset >= piece_offset ? offset - piece_offset : 0);
    return where;
}

std::size_t LogicalLine::last_line() const {
    return continued_count == 0 ? line : owner->pieces[continued_first + continued_count - 1].line;
}

const std::string& LogicalLine::file() const {
    static const std::string none;
    return owner && owner->file ? *owner->file : none;
}

std::unique_ptr<SplitFile> split_lines(std::unique_ptr<char[]> bytes, std::size_t size, const std::string* file,
                                       bool first_is_title) {
    auto out = std::make_unique<SplitFile>();
    out->file = file;
    out->bytes = std::move(bytes);
    const std::string_view text(out->bytes.get(), size);
    // About one logical line per 30 bytes in generated decks; a guess that saves regrowing.
    out->lines.reserve(size / 32 + 1);
    std::size_t pos = 0;
    std::uint32_t line_number = 0;
    while (pos < text.size()) {
        const char* nl = static_cast<const char*>(std::memchr(text.data() + pos, '\n', text.size() - pos));
        std::size_t eol = nl ? static_cast<std::size_t>(nl - text.data()) : text.size();
        std::string_view raw = text.substr(pos, eol - pos);
        pos = eol + 1;
        ++line_number;
        if (first_is_title && line_number == 1) {
            out->title = std::string(trim_right(raw));
            continue;
        }
        std::size_t start = 0;
        while (start < raw.size() && is_blank(raw[start])) ++start;
        if (start == raw.size() || raw[start] == '*' || raw[start] == '\r') continue;
        std::string_view content = trim_right(raw.substr(0, content_length(raw)));
        if (content.size() <= start) continue;
        const auto column = static_cast<std::uint32_t>(start + 1);
        if (raw[start] == '+') {
            if (out->lines.empty())
                throw errors::continuation_without_line(Location{file ? *file : "", line_number, start + 1});
            LogicalLine& last = out->lines.back();
            if (last.continued_count == 0) {
                out->joined.emplace_back(last.text);
                last.continued_first = static_cast<std::uint32_t>(out->pieces.size());
            }
            std::string& joined = out->joined.back();
            joined += ' ';
            out->pieces.push_back({static_cast<std::uint32_t>(joined.size()), line_number, column + 1});
            joined.append(content.substr(start + 1));
            last.text = joined;
            ++last.continued_count;
            continue;
        }
        LogicalLine line;
        line.owner = out.get();
        line.text = content.substr(start);
        line.line = line_number;
        line.column = column;
        out->lines.push_back(line);
    }
    return out;
}

std::vector<Token> tokenize(const LogicalLine& line) {
    std::vector<Token> tokens;
    tokenize(line, tokens);
    return tokens;
}

void tokenize(const LogicalLine& line, std::vector<Token>& tokens) {
    // Characters that end a word: blanks and = { } ' " ( ) , [ ]
    static constexpr auto ends_word = [] {
        std::array<bool, 256> table{};
        for (unsigned char c : std::string_view(" \t\f\v={}'\"(),[]")) table[c] = true;
        return table;
    }();
    const std::string_view s = line.text;
    tokens.clear();
    std::size_t i = 0;
    while (i < s.size()) {
        char c = s[i];
        if (is_blank(c)) {
            ++i;
            continue;
        }
        Token t;
        t.offset = i;
        if (c == '{') {
            int depth = 0;
            std::size_t j = i;
            for (; j < s.size(); ++j) {
                if (s[j] == '{') ++depth;
                else if (s[j] == '}' && --depth == 0) break;
            }
            if (j == s.size()) throw errors::unbalanced(line.locate(i), '{');
            t.kind = TokenKind::braced;
            t.text = s.substr(i + 1, j - i - 1);
            i = j + 1;
        } else if (c == '\'' || c == '"') {
            std::size_t j = s.find(c, i + 1);
            if (j == std::string_view::npos) throw errors::unbalanced(line.locate(i), c);
            t.kind = c == '"' ? TokenKind::string : TokenKind::quoted;
            t.text = s.substr(i + 1, j - i - 1);
            i = j + 1;
        } else if (c == '=' || c == '(' || c == ')' || c == ',' || c == '[' || c == ']') {
            t.kind = TokenKind::punct;
            t.text = s.substr(i, 1);
            ++i;
        } else if (c == '}') {
            throw errors::netlist_syntax(line.locate(i), "a name or a value (a `}` without its `{`)", "}");
        } else {
            std::size_t j = i;
            while (j < s.size() && !ends_word[static_cast<unsigned char>(s[j])]) ++j;
            t.kind = TokenKind::word;
            t.text = s.substr(i, j - i);
            i = j;
        }
        t.end = i;
        tokens.push_back(t);
    }
}

}  // namespace mirrorcheck::netlist::detail
