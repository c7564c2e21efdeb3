// An error in an input file: where it happened and what was expected.
#pragma once

#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>

namespace mirrorcheck {

// Where in an input a problem was found. A text position has a line (1-based) and
// optionally a column; a binary position has a byte offset from the file's start.
struct Location {
    Location() = default;
    Location(std::string file_, std::size_t line_ = 0, std::size_t column_ = 0)
        : file(std::move(file_)), line(line_), column(column_) {}
    static Location at_byte(std::string file_, std::uint64_t offset) {
        Location l(std::move(file_));
        l.byte_offset = offset;
        return l;
    }

    std::string file;
    std::size_t line = 0;
    std::size_t column = 0;
    std::optional<std::uint64_t> byte_offset;

    // "deck.cir:14:7", "run.raw:3", "run.raw: byte 4096" or just "run.raw".
    std::string to_string() const;
};

// Thrown by every front end for unreadable input. The CLI maps it to exit status 2.
class InputError : public std::runtime_error {
public:
    InputError(std::string code, Location where, std::string message);

    // A stable identifier for tests and tools, for example "raw.truncated-data".
    const std::string& code() const { return code_; }
    const Location& where() const { return where_; }
    // The message without its location prefix.
    const std::string& message() const { return message_; }

private:
    std::string code_;
    Location where_;
    std::string message_;
};

}  // namespace mirrorcheck
