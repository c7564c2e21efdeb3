// Errors in how the command line asks for things (exit status 2), each written once.
#pragma once

#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::cli::usage {

InputError missing_vector(const std::string& path, const std::string& name);
InputError option_needs_raw(const std::string& path);
InputError bad_quantity(const std::string& option, const std::string& text, const std::string& unit);
InputError no_op_plot(const std::string& path);
InputError bad_probe(const std::string& text);
InputError no_small_signal_plot(const std::string& path);

}  // namespace mirrorcheck::cli::usage
