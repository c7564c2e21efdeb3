// What stdout is: a terminal (its width, colour unless NO_COLOR is set or TERM is dumb) or
// a file or pipe (120 columns, no colour).
#pragma once

#include <cstddef>

namespace mirrorcheck::cli {

struct Terminal {
    std::size_t width = 120;
    bool colour = false;
};

Terminal stdout_terminal();

}  // namespace mirrorcheck::cli
