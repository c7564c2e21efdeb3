// The raw-file reader's error messages, each written once.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError raw_not_a_raw_file(const Location& where);
InputError raw_bad_header_line(const Location& where, std::string_view line);
// A header line with no line end within `limit` bytes (data where a header belongs).
InputError raw_line_too_long(const Location& where, std::size_t limit);
InputError raw_missing_header_field(const Location& where, std::string_view field);
InputError raw_duplicate_header_field(const Location& where, std::string_view field);
InputError raw_bad_count(const Location& where, std::string_view field, std::string_view text);
InputError raw_unknown_flag(const Location& where, std::string_view flag);
InputError raw_no_real_or_complex(const Location& where);
InputError raw_no_variables(const Location& where);
InputError raw_too_many_variables(const Location& where, std::uint64_t announced, std::uint64_t room);
InputError raw_bad_variable_line(const Location& where, std::size_t expected_index, std::string_view line);
InputError raw_short_variable_table(const Location& where, std::size_t found, std::size_t announced);
InputError raw_duplicate_variable(const Location& where, std::string_view name, std::string_view first);
InputError raw_missing_data_marker(const Location& where, std::string_view found);
// `row_bytes` per point; the product is not wrapped round.
InputError raw_truncated_binary(const Location& where, std::uint64_t points, std::uint64_t row_bytes,
                                std::uint64_t available);
InputError raw_too_many_points(const Location& where, std::uint64_t points, std::uint64_t room);
InputError raw_truncated_values(const Location& where, std::uint64_t point, std::uint64_t points);
InputError raw_bad_point_index(const Location& where, std::uint64_t expected);
InputError raw_bad_number(const Location& where, std::string_view text, bool complex);
InputError raw_trailing_data(const Location& where, std::uint64_t points);

}  // namespace mirrorcheck::errors
