// Private to the netlist reader: the lexer. Turns a file's bytes into logical lines (comments
// removed, `+` continuations joined, CR LF accepted) that remember where each character came
// from, and splits a logical line into tokens.
//
// Comments: a line whose first non-blank character is `*`; from `;` to the end of a line; from
// a `$` that starts a word and is followed by a blank or the end of the line. A `+` line
// continues the last logical line even across comment and blank lines.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::netlist::detail {

struct LogicalLine {
    std::string text;
    const std::string* file = nullptr;  // owned by the reader, stable for its lifetime
    // Where each physical line's text starts in `text`: {offset, line, column}; the first
    // one apart, since most lines have no continuation.
    struct Piece {
        std::size_t offset = 0;
        std::size_t line = 0;
        std::size_t column = 0;
    };
    Piece first;
    std::vector<Piece> continued;

    Location locate(std::size_t offset) const;
    std::size_t first_line() const { return first.line; }
};

struct SplitFile {
    std::string title;  // the first physical line, when asked for
    std::vector<LogicalLine> lines;
};

// Splits a file's text into logical lines. With `first_is_title` the first physical line is
// the title and not a statement.
SplitFile split_lines(std::string_view text, const std::string* file, bool first_is_title);

enum class TokenKind {
    word,        // a name, number or node: anything up to a blank or one of = ( ) , [ ]
    braced,      // {expression}, text without the braces
    quoted,      // 'expression', text without the quotes
    string,      // "text", without the quotes
    punct,       // one of = ( ) , [ ]
};

struct Token {
    TokenKind kind = TokenKind::word;
    std::string text;      // as written (case kept)
    std::size_t offset = 0;  // in the logical line, of the first character (the brace or quote)
    std::size_t end = 0;     // one past the last character

    bool is(char c) const { return kind == TokenKind::punct && text.size() == 1 && text[0] == c; }
    bool is_value() const { return kind == TokenKind::word || kind == TokenKind::braced || kind == TokenKind::quoted; }
};

// Splits a logical line into tokens; throws InputError for an unclosed brace or quote.
std::vector<Token> tokenize(const LogicalLine& line);

}  // namespace mirrorcheck::netlist::detail
