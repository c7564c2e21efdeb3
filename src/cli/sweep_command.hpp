// `mirrorcheck sweep NETLIST --op FILE...`: every operating point of the given raw files
// reviewed against one netlist, with per-mirror statistics and yield.
#pragma once

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

// Adds the `sweep` subcommand; its callback sets `status` (0, or 1 when a run failed, a
// run's review failed or the yield is below --min-yield).
void add_sweep_command(CLI::App& app, int& status);

// The --min-yield option's value as a fraction (a usage error above 100 %); shared with `merge`.
double min_yield_fraction(const std::string& text);

}  // namespace mirrorcheck::cli
