// Values of a raw file's plots that the model cannot use, though the raw reader read them:
// a non-finite operating-point value, an AC frequency that is negative or not finite.
#pragma once

#include <string_view>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError op_value_not_finite(const Location& where, std::string_view plot, std::string_view vector, double value);
InputError ac_bad_frequency(const Location& where, std::string_view plot, std::size_t point, double value);

}  // namespace mirrorcheck::errors
