// Reader for SPICE netlists in the ngspice dialect: reads a deck and everything it includes
// and returns the flattened circuit, every device named as ngspice names it.
#pragma once

#include <filesystem>

#include "parsers/common/input_error.hpp"
#include "src/model/circuit.hpp"

namespace mirrorcheck::netlist {

// Reads, expands and flattens the netlist at `path`. Throws InputError (codes "netlist.*",
// "input.*") naming file:line:column and what was expected.
Circuit read_netlist(const std::filesystem::path& path);

}  // namespace mirrorcheck::netlist
