#include "parsers/common/input_error.hpp"

#include <fmt/format.h>

#include "parsers/common/utf8.hpp"

namespace mirrorcheck {

std::string Location::to_string() const {
    if (byte_offset) return fmt::format("{}: byte {}", file, *byte_offset);
    if (line == 0) return file;
    if (column == 0) return fmt::format("{}:{}", file, line);
    return fmt::format("{}:{}:{}", file, line, column);
}

InputError::InputError(std::string code, Location where, std::string message)
    : std::runtime_error(
          fmt::format("{}: error: {} [{}]", printable_text(where.to_string()), printable_text(message), code)),
      code_(std::move(code)),
      where_(std::move(where)),
      message_(printable_text(message)) {}

}  // namespace mirrorcheck
