// What "the mirror alone" is, as a structure: the devices and the nets that the exact solve
// of the mirror alone (own_resistance.cpp) and ngspice's testbench of the mirror alone
// (src/deck/alone_deck.cpp) both describe. mirror_alone.cpp says what is kept, held and free.
#pragma once

#include <cstddef>
#include <set>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

// One mirror by itself. Nets are lower case; ground ("0") is always held and never listed.
struct MirrorAlone {
    std::string mirror;                // Mirror::id
    std::vector<std::size_t> devices;  // indices into Circuit::devices, ascending
    std::vector<std::string> outputs;  // the mirror's output nodes, in its order
    // Nets of the devices held at their operating voltage whatever output is measured:
    // rails, the feet of the bottom devices, gate or base nets driven from outside.
    std::vector<std::string> held;
    // Nets of the devices that are free in small signal, at their operating voltage at DC
    // (whatever the circuit brings them is an ideal source there): the reference node,
    // nodes inside a stack, a booster's gate, a gate held by a bias resistor. The outputs
    // are neither: each output is measured with the others held.
    std::vector<std::string> free_nets;
};

// One per mirror, in the order of `mirrors`. `rails` is source_held_nets(circuit).
std::vector<MirrorAlone> describe_mirrors_alone(const Circuit& circuit, const std::vector<Mirror>& mirrors,
                                                const std::set<std::string>& rails);

}  // namespace mirrorcheck
