// Errors shared by every front end. Each message is written once, here.
#pragma once

#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError cannot_open(const std::string& path, const std::string& reason);
InputError empty_file(const std::string& path);

}  // namespace mirrorcheck::errors
