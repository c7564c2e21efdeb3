// Recognition of current mirrors and current sources in a flattened circuit, from the
// netlist alone (no operating point). The rules are described in find_mirrors.cpp.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "src/model/circuit.hpp"

namespace mirrorcheck {

// The topology of a mirror. `current_source`: a transistor (with the cascodes stacked on
// it) biased from a fixed voltage that mirrors no reference: a bias line, a resistor
// divider, the gate (base) line of a bias loop on another rail; it has no reference and no
// ratio.
enum class Family {
    simple,
    degenerated,
    widlar,
    cascode,
    wide_swing_cascode,
    wilson,
    improved_wilson,
    regulated_cascode,
    beta_helper,
    current_source,
};

// "simple", "degenerated", "widlar", "cascode", "wide-swing-cascode", "wilson",
// "improved-wilson", "regulated-cascode", "beta-helper", "current-source".
std::string_view to_string(Family family);

// One output branch: the stack of transistors from the rail side up to the output node.
struct MirrorOutput {
    std::string node;                  // the net at the drain or collector of the top device
    std::vector<std::size_t> devices;  // indices into Circuit::devices(), bottom (rail side) to top
    // Per device: the resistor between its source or emitter and the level below (or the
    // rail), when there is one.
    std::vector<std::optional<std::size_t>> degeneration;
    // Sizing of the bottom device over the reference's bottom device: m·nf·W/L for MOS,
    // area·m for bipolar. Empty for a current source, which has no reference.
    std::optional<double> design_ratio;
};

// A current mirror (one reference, one or more outputs of the same family) or a current
// source (no reference, one output).
struct Mirror {
    std::string id;                         // "<kind>-<family>:<top device of the first output>"
    Family family = Family::simple;
    std::string kind;                       // nmos, pmos, npn or pnp
    std::vector<std::size_t> reference;     // reference-side devices, bottom to top; empty for a current source
    // Per reference device: its source or emitter resistor, as for MirrorOutput::degeneration.
    std::vector<std::optional<std::size_t>> reference_degeneration;
    std::string reference_node;             // where the reference current enters; empty for a current source
    std::vector<MirrorOutput> outputs;      // in the order of their bottom devices in the netlist
    std::vector<std::size_t> helpers;       // booster amplifier or beta-helper devices
    // A regulated cascode's booster load: the transistors whose drain (collector) is on the
    // booster's drain net, which set the booster's gain; neither outputs nor current sources.
    std::vector<std::size_t> helper_loads;
};

// "nmos-cascode", "npn-wilson", "pmos-current-source", ...
std::string mirror_family_label(const Mirror& mirror);

// Every mirror and current source of the circuit, each transistor in at most one of them.
// Mirrors come first, in the order of their gate (base) nets; current sources follow, in
// device order.
std::vector<Mirror> find_mirrors(const Circuit& circuit);

// The ngspice names of every transistor of `mirrors` (references, helpers and their loads,
// outputs), each once, mirror by mirror.
std::vector<std::string> mirror_transistor_names(const Circuit& circuit, const std::vector<Mirror>& mirrors);

}  // namespace mirrorcheck
