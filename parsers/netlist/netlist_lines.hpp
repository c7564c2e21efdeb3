// Private to the netlist reader: the lexer. Turns a file's bytes into logical lines (comments
// removed, `+` continuations joined, CR LF accepted) that remember where each character came
// from, and splits a logical line into tokens.
//
// Comments: a line whose first non-blank character is `*`; from `;` to the end of a line; from
// a `$` that starts a word and is followed by a blank or the end of the line. A `+` line
// continues the last logical line even across comment and blank lines.
#pragma once

#include <cstddef>
#include <cstdint>
#include <deque>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::netlist::detail {

struct SplitFile;

// A logical line: a view of its text in the file's bytes (or, for a line with `+`
// continuations, of its joined text), and where each physical line's part starts.
struct LogicalLine {
    std::string_view text;
    const SplitFile* owner = nullptr;  // the split file that holds the text and the pieces
    std::uint32_t line = 0;            // the first physical line, 1-based
    std::uint32_t column = 0;          // of the text's first character, 1-based
    // The `+` lines joined to it: owner->pieces[continued_first, + continued_count).
    std::uint32_t continued_first = 0;
    std::uint32_t continued_count = 0;

    Location locate(std::size_t offset) const;
    std::size_t first_line() const { return line; }
    std::size_t last_line() const;
    const std::string& file() const;
};

// Where a continuation's text starts in its logical line's text, and where it was read.
struct LinePiece {
    std::uint32_t offset = 0;
    std::uint32_t line = 0;
    std::uint32_t column = 0;
};

// A file split into logical lines. The lines point into it: it is not copied or moved
// once split (split_lines hands it out on the heap).
struct SplitFile {
    const std::string* file = nullptr;  // its name; owned by the reader, stable for its lifetime
    std::string title;                  // the first physical line, when asked for
    std::vector<LogicalLine> lines;
    std::vector<LinePiece> pieces;      // of the continued lines, each line's together
    std::unique_ptr<char[]> bytes;      // the file's text
    std::deque<std::string> joined;     // the text of each line that has continuations

    SplitFile() = default;
    SplitFile(const SplitFile&) = delete;
    SplitFile& operator=(const SplitFile&) = delete;
};

// The largest netlist file read (positions are kept in 32 bits); no real deck comes near.
inline constexpr std::size_t max_netlist_file_bytes = std::size_t{0xffffffff};

// Splits a file's text (`size` bytes, taken over) into logical lines. With `first_is_title`
// the first physical line is the title and not a statement.
std::unique_ptr<SplitFile> split_lines(std::unique_ptr<char[]> bytes, std::size_t size, const std::string* file,
                                       bool first_is_title);

enum class TokenKind {
    word,        // a name, number or node: anything up to a blank or one of = ( ) , [ ]
    braced,      // {expression}, text without the braces
    quoted,      // 'expression', text without the quotes
    string,      // "text", without the quotes
    punct,       // one of = ( ) , [ ]
};

struct Token {
    TokenKind kind = TokenKind::word;
    std::string_view text;   // as written (case kept), in the line's text
    std::size_t offset = 0;  // in the logical line, of the first character (the brace or quote)
    std::size_t end = 0;     // one past the last character

    bool is(char c) const { return kind == TokenKind::punct && text.size() == 1 && text[0] == c; }
    bool is_value() const { return kind == TokenKind::word || kind == TokenKind::braced || kind == TokenKind::quoted; }
};

// Splits a logical line into tokens; throws InputError for an unclosed brace or quote.
std::vector<Token> tokenize(const LogicalLine& line);
// The same into `out` (cleared first), which keeps its storage from line to line.
void tokenize(const LogicalLine& line, std::vector<Token>& out);

}  // namespace mirrorcheck::netlist::detail
