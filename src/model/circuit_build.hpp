// Builds the model's Circuit from the netlist reader's plain result: devices with their
// nets, shared evaluated models, the title and the deck's `.control` text.
#pragma once

#include <filesystem>

#include "parsers/netlist/netlist.hpp"
#include "src/model/circuit.hpp"

namespace mirrorcheck {

Circuit build_circuit(const netlist::FlatNetlist& netlist);

// Reads the netlist at `path` and builds its Circuit; throws the reader's InputError.
Circuit read_circuit(const std::filesystem::path& path, const netlist::ReadLimits& limits = {});

}  // namespace mirrorcheck
