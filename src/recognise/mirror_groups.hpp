// Private to src/recognise: mirrors and stacks found, in transistor indices, before they
// are described with device indices and names.
#pragma once

#include <cstddef>
#include <optional>
#include <vector>

#include "src/recognise/circuit_index.hpp"
#include "src/recognise/find_mirrors.hpp"
#include "src/recognise/reference_shapes.hpp"

namespace mirrorcheck::recognise {

struct FoundMirror {
    Family family = Family::simple;
    Kind kind = Kind::nmos;
    std::optional<Reference> reference;      // none for a stack
    std::vector<std::vector<Step>> outputs;  // each bottom to top; step resistor = the one below
    std::vector<std::size_t> helpers;        // transistors
};

// The mirrors on every gate (base) net, one per reference and family; claims their devices.
std::vector<FoundMirror> find_mirror_groups(const CircuitIndex& index, Claims& claims);

// Stacks of still unclaimed transistors whose bottom sits on a rail and whose gate is biased
// by a diode-connected device of the same kind or held by a quiet voltage source.
std::vector<FoundMirror> find_stacks(const CircuitIndex& index, Claims& claims);

}  // namespace mirrorcheck::recognise
