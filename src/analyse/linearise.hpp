// The exact DC small-signal impedance at chosen nodes of a whole circuit, from the flat
// Circuit and its operating point: the "linearised" value that analysis by inspection is
// checked against. See linearise.cpp for the method, its assumptions and what it leaves out.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"

namespace mirrorcheck {

struct LinearisedImpedance {
    std::string node;                 // as asked, lower case
    std::optional<double> resistance; // ohms; absent when the network could not be built or solved
    std::string note;                 // why it is absent, or what was assumed ("probe vout removed; ...")
};

// The small-signal resistance seen at each node to ground, with the circuit linearised at
// `op`. Each node is expected to be held in the deck by a probe voltage source (e.g.
// `vout out 0 dc 1.2`): every independent voltage source touching any asked node is left
// out of the network (it is the probe), so that the node is held by nothing but the
// circuit. One result per asked node, in order.
std::vector<LinearisedImpedance> compute_linearised_impedances(const Circuit& circuit, const OpPoint& op,
                                                               const std::vector<std::string>& nodes);

}  // namespace mirrorcheck
