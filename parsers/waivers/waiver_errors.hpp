// The waiver reader's error messages, each written once.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError waiver_binary_data(const Location& where, unsigned char byte);
InputError waiver_bad_subject(const Location& where, std::string_view subject);
InputError waiver_missing_code(const Location& where, std::string_view subject, const std::vector<std::string>& known);
InputError waiver_unknown_code(const Location& where, std::string_view code, const std::vector<std::string>& known);
InputError waiver_missing_reason(const Location& where, std::string_view subject, std::string_view code);

}  // namespace mirrorcheck::errors
