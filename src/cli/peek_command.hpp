// `mirrorcheck peek FILE`: what a raw file, `show` listing or netlist holds.
#pragma once

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

// Adds the `peek` subcommand to the application; its callback sets `status`.
void add_peek_command(CLI::App& app, int& status);

}  // namespace mirrorcheck::cli
