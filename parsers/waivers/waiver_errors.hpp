// The waiver reader's error messages, each written once.
#pragma once

#include <string_view>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError waiver_binary_data(const Location& where, unsigned char byte);
InputError waiver_bad_subject(const Location& where, std::string_view subject);
InputError waiver_missing_code(const Location& where, std::string_view subject);
InputError waiver_unknown_code(const Location& where, std::string_view code);
InputError waiver_missing_reason(const Location& where, std::string_view subject, std::string_view code);

}  // namespace mirrorcheck::errors
