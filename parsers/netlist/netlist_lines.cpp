// The netlist lexer: logical lines and tokens (see netlist_lines.hpp for the rules).
#include "parsers/netlist/netlist_lines.hpp"

#include <algorithm>

#include "parsers/netlist/netlist_errors.hpp"

namespace mirrorcheck::netlist::detail {

namespace {

bool is_blank(char c) { return c == ' ' || c == '\t' || c == '\f' || c == '\v'; }

// The length of the line's text once an inline comment is cut off. Quotes and braces
// protect their contents: `'a;b'` is not a comment.
std::size_t content_length(std::string_view line) {
    char quote = 0;
    int braces = 0;
    for (std::size_t i = 0; i < line.size(); ++i) {
        char c = line[i];
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
    Location where{file ? *file : std::string{}};
    auto it = std::upper_bound(continued.begin(), continued.end(), offset,
                               [](std::size_t o, const Piece& p) { return o < p.offset; });
    const Piece& piece = it == continued.begin() ? first : *(it - 1);
    where.line = piece.line;
    where.column = piece.column + (offset >= piece.offset ? offset - piece.offset : 0);
    return where;
}

SplitFile split_lines(std::string_view text, const std::string* file, bool first_is_title) {
    SplitFile out;
    std::size_t pos = 0;
    std::size_t line_number = 0;
    while (pos < text.size()) {
        std::size_t eol = text.find('\n', pos);
        if (eol == std::string_view::npos) eol = text.size();
        std::string_view raw = text.substr(pos, eol - pos);
        pos = eol + 1;
        ++line_number;
        if (first_is_title && line_number == 1) {
            out.title = std::string(trim_right(raw));
            continue;
        }
        std::size_t start = 0;
        while (start < raw.size() && is_blank(raw[start])) ++start;
        if (start == raw.size() || raw[start] == '*' || raw[start] == '\r') continue;
        std::string_view content = trim_right(raw.substr(0, content_length(raw)));
        if (content.size() <= start) continue;
        if (raw[start] == '+') {
            if (out.lines.empty())
                throw errors::continuation_without_line(Location{file ? *file : "", line_number, start + 1});
            LogicalLine& last = out.lines.back();
            last.text += ' ';
            last.continued.push_back({last.text.size(), line_number, start + 2});
            last.text.append(content.substr(start + 1));
            continue;
        }
        LogicalLine line;
        line.file = file;
        line.text = std::string(content.substr(start));
        line.first = {0, line_number, start + 1};
        out.lines.push_back(std::move(line));
    }
    return out;
}

std::vector<Token> tokenize(const LogicalLine& line) {
    const std::string& s = line.text;
    std::vector<Token> tokens;
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
            if (j == std::string::npos) throw errors::unbalanced(line.locate(i), c);
            t.kind = c == '"' ? TokenKind::string : TokenKind::quoted;
            t.text = s.substr(i + 1, j - i - 1);
            i = j + 1;
        } else if (c == '=' || c == '(' || c == ')' || c == ',' || c == '[' || c == ']') {
            t.kind = TokenKind::punct;
            t.text = std::string(1, c);
            ++i;
        } else if (c == '}') {
            throw errors::netlist_syntax(line.locate(i), "a name or a value (a `}` without its `{`)", "}");
        } else {
            std::size_t j = i;
            while (j < s.size() && !is_blank(s[j]) && std::string_view("={}'\"(),[]").find(s[j]) == std::string_view::npos)
                ++j;
            t.kind = TokenKind::word;
            t.text = s.substr(i, j - i);
            i = j;
        }
        t.end = i;
        tokens.push_back(std::move(t));
    }
    return tokens;
}

}  // namespace mirrorcheck::netlist::detail
