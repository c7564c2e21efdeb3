// Back end for `list`: the mirrors and current sources found in a circuit, without simulation data.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck::report {

// One block per mirror: id, family, reference devices and node, then one line per output
// (node, devices bottom to top, design ratio).
std::string write_mirror_table(const Circuit& circuit, const std::vector<Mirror>& mirrors);

// {"schema": "mirrorcheck-list/1", "mirrors": [{"id", "family", "reference", "reference_node",
//  "outputs": [{"node", "devices", "degeneration", "design_ratio"}], "helpers"}]}.
// Device names are ngspice's; "designer" gives the designer's instance of each.
nlohmann::json mirrors_to_json(const Circuit& circuit, const std::vector<Mirror>& mirrors);

}  // namespace mirrorcheck::report
