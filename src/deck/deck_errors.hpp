// Errors of `prepare` and `run` in the user's deck, found before ngspice runs. Each message is
// written once, here, with a stable code ("prepare.<what>").
#pragma once

#include <string_view>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::deck_errors {

InputError card_in_library(const Location& where, std::string_view keyword);
InputError cannot_write(const Location& where, std::string_view what);

}  // namespace mirrorcheck::deck_errors
