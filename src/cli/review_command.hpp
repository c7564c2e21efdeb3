// `mirrorcheck review NETLIST --op FILE`: the mirrors checked against one operating point.
#pragma once

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

// Adds the `review` subcommand to the application; its callback sets `status`
// (0, or 1 when a finding has error severity).
void add_review_command(CLI::App& app, int& status);

}  // namespace mirrorcheck::cli
