// Private to src/recognise: what drives a mirror's gate (base) net, i.e. the reference side.
#pragma once

#include <cstddef>
#include <optional>
#include <vector>

#include "src/recognise/circuit_index.hpp"

namespace mirrorcheck::recognise {

enum class Shape {
    diode_stack,      // one diode-connected device, possibly with diodes stacked on it
    wide_swing,       // bottom gate tied to the drain at the top of a cascoded branch
    beta_helper,      // follower from the reference drain (collector) to the gate net
    wilson,           // input device, output diode and output device (Wilson)
    improved_wilson,  // Wilson with a diode stacked on the input device
};

struct Reference {
    Shape shape = Shape::diode_stack;
    std::vector<std::size_t> devices;  // transistors, bottom to top
    std::vector<std::optional<std::size_t>> degeneration;  // per device, resistor below it
    std::size_t node = 0;              // net where the reference current enters
    std::vector<std::size_t> helpers;  // beta-helper follower
    std::vector<Step> wilson_output;   // Wilson only: the output diode and the device above it
};

// Transistors already taken by a mirror or stack.
using Claims = std::vector<bool>;

// The reference driving gate net `net`, tried in this order: Wilson (improved or not), a
// stack of diodes, a wide-swing branch, a beta helper. Uses unclaimed transistors only.
std::optional<Reference> find_reference(const CircuitIndex& index, std::size_t net, const Claims& claims);

}  // namespace mirrorcheck::recognise
