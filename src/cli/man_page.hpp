// mirrorcheck(1): the manual page, in roff (man macros), written from the command line's
// outline, the exit statuses and the catalogue of finding codes.
#pragma once

#include <ostream>

#include "src/cli/cli_outline.hpp"

namespace mirrorcheck::cli {

void write_man_page(const CliOutline& outline, std::ostream& out);

}  // namespace mirrorcheck::cli
