#include "src/cli/terminal.hpp"

#include <cstdlib>
#include <string_view>

#include <sys/ioctl.h>
#include <unistd.h>

namespace mirrorcheck::cli {

Terminal stdout_terminal() {
    Terminal t;
    if (!isatty(STDOUT_FILENO)) return t;
    winsize size{};
    if (ioctl(STDOUT_FILENO, TIOCGWINSZ, &size) == 0 && size.ws_col >= 40) t.width = size.ws_col;
    const char* term = std::getenv("TERM");
    t.colour = !std::getenv("NO_COLOR") && !(term && std::string_view(term) == "dumb");
    return t;
}

}  // namespace mirrorcheck::cli
