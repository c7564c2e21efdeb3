// `mirrorcheck list NETLIST`: the mirrors and current sources found, with no simulation data.
#pragma once

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

// Adds the `list` subcommand to the application; its callback sets `status`.
void add_list_command(CLI::App& app, int& status);

}  // namespace mirrorcheck::cli
