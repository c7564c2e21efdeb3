// Errors of the review deck and the ngspice batch run, each written once.
#pragma once

#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError deck_not_writable(const std::string& deck_path);
InputError ngspice_missing(const std::string& executable, const std::string& log_tail);
InputError ngspice_no_convergence(const std::string& log_path, const std::string& log_tail);
InputError ngspice_failed(const std::string& log_path, const std::string& what, const std::string& deck_name,
                          const std::string& log_tail);
InputError title_line(const std::string& netlist, const std::string& line);

}  // namespace mirrorcheck::errors
