// Private to the raw reader: where it is in the file, and how it names that place.
#pragma once

#include <algorithm>
#include <cstddef>
#include <string>
#include <string_view>

#include "parsers/common/input_error.hpp"
#include "parsers/common/mapped_file.hpp"
#include "parsers/raw/raw.hpp"
#include "parsers/raw/raw_errors.hpp"

namespace mirrorcheck::raw::detail {

// Where the reader is in the file. Lines are counted while the text is read; once binary
// data has been passed, line numbers mean nothing and errors give byte offsets instead.
struct Cursor {
    std::string_view bytes;
    std::string path;
    std::size_t pos = 0;
    std::size_t line = 1;       // line number at `pos` (1-based)
    std::size_t line_read = 0;  // line number of the last line next_line() returned
    std::size_t line_start = 0; // byte offset where that line starts
    bool after_binary = false;
    const MappedFile* file = nullptr;

    bool at_end() const { return pos >= bytes.size(); }
    std::size_t remaining() const { return bytes.size() - pos; }

    // Where the last header line read is; after binary data, its byte offset.
    Location here() const { return after_binary ? Location::at_byte(path, line_start) : Location(path, line_read); }
    // Where `pos` is: the line of the value being read.
    Location value_here() const { return after_binary ? Location::at_byte(path, pos) : Location(path, line); }
    Location at_byte(std::size_t offset) const { return Location::at_byte(path, offset); }

    // Header lines are short; one without a line end this far is data (a sparse or padded
    // file would otherwise be scanned to its end, gigabytes, for a line end).
    static constexpr std::size_t max_line = std::size_t{1} << 20;

    // The next line without its line ending (LF or CRLF); advances past it. Throws
    // "raw.line-too-long" when no line end comes within max_line bytes.
    std::string_view next_line() {
        const std::size_t window = std::min(bytes.size() - pos, max_line + 2);
        std::size_t end = bytes.substr(pos, window).find('\n');
        if (end != std::string_view::npos) end += pos;
        else if (bytes.size() - pos > max_line + 1) throw errors::raw_line_too_long(at_byte(pos), max_line);
        std::size_t stop = end == std::string_view::npos ? bytes.size() : end;
        std::string_view l = bytes.substr(pos, stop - pos);
        if (!l.empty() && l.back() == '\r') l.remove_suffix(1);
        line_read = line;
        line_start = pos;
        if (end != std::string_view::npos) ++line;
        pos = end == std::string_view::npos ? bytes.size() : end + 1;
        return l;
    }

    std::string_view peek_line() const {
        Cursor copy = *this;
        return copy.next_line();
    }

    // Skips spaces, tabs, CRs and newlines, counting the lines.
    void skip_space() {
        while (pos < bytes.size()) {
            char ch = bytes[pos];
            if (ch == '\n') ++line;
            else if (ch != ' ' && ch != '\t' && ch != '\r') break;
            ++pos;
        }
    }
};

// Reads one plot's header up to and including its `Binary:` or `Values:` line.
Plot read_plot_header(Cursor& c);

// Decodes the plot's values (`wanted`) or skips them, leaving the cursor after them.
void read_binary(Cursor& c, Plot& plot, bool wanted);
void read_ascii(Cursor& c, Plot& plot, bool wanted);

}  // namespace mirrorcheck::raw::detail
