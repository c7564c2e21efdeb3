// Back end for `peek` on netlists: the flattened devices with their nets and key parameters.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "src/model/circuit.hpp"

namespace mirrorcheck::report {

// One row per device in netlist order: ngspice name, kind, terminals (role=net), model
// (ngspice's name, type, level), key parameters with units, the designer's instance and
// source line. Then a count of devices and nets.
std::string write_circuit_table(const Circuit& circuit);

// The same as JSON: {"schema": "mirrorcheck-circuit/1", "title", "devices": [...],
// "models": {ngspice name: {...}}, "nets": [{"name", "terminals": [{"device", "terminal"}]}]}.
// Numbers are plain SI values.
nlohmann::json circuit_to_json(const Circuit& circuit);

}  // namespace mirrorcheck::report
