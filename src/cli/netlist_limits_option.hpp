// The option that raises the netlist reader's limit on flattened devices, for every
// command that reads a netlist.
#pragma once

#include <CLI/CLI.hpp>

#include "parsers/netlist/netlist.hpp"

namespace mirrorcheck::cli {

void add_netlist_limit_options(CLI::App& cmd, netlist::ReadLimits& limits);

}  // namespace mirrorcheck::cli
