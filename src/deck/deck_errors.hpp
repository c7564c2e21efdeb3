// Errors of `prepare` and `run`: in the user's deck, found before ngspice runs, and of the
// ngspice batch run. Each message is written once, here, with a stable code.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError deck_not_writable(const std::string& deck_path);
InputError ngspice_missing(const std::string& executable, const std::string& log_tail);
InputError ngspice_no_convergence(const std::string& log_path, const std::string& log_tail);
InputError ngspice_timed_out(const std::string& log_path, long seconds, const std::string& deck_name,
                             const std::string& log_tail);
InputError ngspice_failed(const std::string& log_path, const std::string& what, const std::string& deck_name,
                          const std::string& log_tail);
InputError card_in_library(const Location& where, std::string_view keyword);
InputError cannot_write(const Location& where, std::string_view what, std::string_view reason);
// `sweep --corners`: a deck with no `.lib FILE SECTION` line; a library without that section.
InputError no_corner_lib(const std::string& deck_path);
// Two `.include` lines of one file family (`x__tt.corner.spice`, `x__mismatch.corner.spice`),
// neither or both named among the corners asked for: which one is the deck's corner?
InputError ambiguous_corner(const std::string& deck_path, std::size_t line, const std::vector<std::string>& words);
InputError unknown_corner(const std::string& library, const std::string& corner, const std::string& sections);

}  // namespace mirrorcheck::errors
