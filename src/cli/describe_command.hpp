// `mirrorcheck describe-cli man|bash-completion`: a hidden command, run by the build, that
// writes the man page or the bash completion from this program's own command line.
#pragma once

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

// Adds the hidden subcommand; it describes `app` as it stands when it runs, so it sees
// every command added before or after it.
void add_describe_command(CLI::App& app, int& status);

}  // namespace mirrorcheck::cli
