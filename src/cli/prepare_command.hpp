// `mirrorcheck prepare NETLIST -o DECK` and `mirrorcheck run NETLIST`: from a bare netlist
// to the ngspice results a review needs, and (run) on to the review itself.
#pragma once

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

void add_prepare_command(CLI::App& app, int& status);
void add_run_command(CLI::App& app, int& status);

}  // namespace mirrorcheck::cli
