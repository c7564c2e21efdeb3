// The bash completion script for mirrorcheck, written from the command line's outline:
// commands, each command's options, and the values of options that list them.
#pragma once

#include <ostream>

#include "src/cli/cli_outline.hpp"

namespace mirrorcheck::cli {

void write_bash_completion(const CliOutline& outline, std::ostream& out);

}  // namespace mirrorcheck::cli
