// Errors in what a review is asked to read (exit status 2), each written once: a probe named
// with --probe that is not there, a frequency (--at) outside the AC sweep.
#pragma once

#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError probe_not_a_source(const std::string& node, const std::string& source);
InputError probe_not_on_node(const std::string& node, const std::string& source);
InputError at_outside_sweep(double at, const std::string& plot, double lowest, double highest);

}  // namespace mirrorcheck::errors
