// The output resistance of each mirror alone, by an exact small-signal solve: what the hand
// formula describes, as opposed to the impedance the node shows in the circuit (linearise.hpp).
// See own_resistance.cpp for what "alone" keeps and what it holds.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "src/analyse/linearise.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

struct OwnResistance {
    std::string mirror;              // Mirror::id
    std::string node;                // the output, lower case
    LinearisedImpedance value;       // resistance (and range); scope "mirror alone"; note when absent
    std::vector<std::string> devices;  // what was solved: the mirror's devices and its own bias elements
    std::vector<std::string> held;     // the nets of those devices held at their operating voltage
                                       // (ground, always held, is not listed)
};

// One per output of every mirror, mirror by mirror, output by output.
std::vector<OwnResistance> compute_own_resistances(const Circuit& circuit, const OpPoint& op,
                                                   const std::vector<Mirror>& mirrors);

}  // namespace mirrorcheck
