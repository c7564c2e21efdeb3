// Private to src/recognise: mirrors and current sources found, in transistor indices, before they
// are described with device indices and names.
#pragma once

#include <cstddef>
#include <optional>
#include <unordered_map>
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
    std::vector<std::size_t> helper_loads;   // transistors: the loads of a booster
};

// Per regulated-cascode booster (a transistor), the transistors on its drain net: its load.
using BoosterLoads = std::unordered_map<std::size_t, std::vector<std::size_t>>;

// The loads of every booster of a cascode stacked on a device of its kind (see
// CircuitIndex::stacked_booster_of); claims them, so that no mirror takes them for outputs.
BoosterLoads find_booster_loads(const CircuitIndex& index, Claims& claims);

// The mirrors on every gate (base) net, one per reference and family; claims their devices.
// A booster's loads go with its regulated cascode; those of boosters that end up in no
// mirror are released.
std::vector<FoundMirror> find_mirror_groups(const CircuitIndex& index, BoosterLoads loads, Claims& claims);

// Current sources: still unclaimed transistors whose foot is a rail and whose gate is on a
// fixed voltage (CircuitIndex::is_bias) other than that foot, with the cascodes above them.
std::vector<FoundMirror> find_current_sources(const CircuitIndex& index, Claims& claims);

}  // namespace mirrorcheck::recognise
