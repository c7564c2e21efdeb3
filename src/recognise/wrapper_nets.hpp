// Private to src/recognise: sees through process-kit wrappers, subcircuits that hold one
// transistor and small series resistors (contact and access parasitics).
#pragma once

#include <cstddef>
#include <vector>

#include "src/model/circuit.hpp"

namespace mirrorcheck::recognise {

// Largest resistor taken for a wrapper's parasitic; larger ones are circuit resistors
// (a one-transistor cell with a source resistor keeps its degeneration).
inline constexpr double max_parasitic_ohms = 100.0;

struct WrapperMerge {
    std::vector<bool> shorted;               // per device: a parasitic resistor, read as a wire
    std::vector<std::size_t> representative;  // per net: the net it is merged into
};

// `terminal_net[first_terminal[d] + k]` is the net of terminal k of device d.
WrapperMerge merge_wrapper_parasitics(const Circuit& circuit, const std::vector<std::size_t>& first_terminal,
                                      const std::vector<std::size_t>& terminal_net);

}  // namespace mirrorcheck::recognise
