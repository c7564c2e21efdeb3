// The `show` listing reader's error messages, each written once.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError listing_no_table(const std::string& path);
InputError listing_missing_device_row(const Location& where, std::string_view model_type);
InputError listing_no_devices(const Location& where);
InputError listing_row_width(const Location& where, std::string_view row, std::size_t expected,
                             std::size_t found);
InputError listing_bad_number(const Location& where, std::string_view row, std::string_view text);
InputError listing_expected_number(const Location& where, std::string_view row, std::string_view text);
InputError listing_stray_continuation(const Location& where);
InputError listing_misaligned_row(const Location& where, std::string_view row);
InputError listing_truncated(const Location& where, std::string_view model_type);

}  // namespace mirrorcheck::errors
