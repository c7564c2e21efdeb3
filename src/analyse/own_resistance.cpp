// The output resistance of each mirror alone ("own"): the quantity analysis by inspection
// describes. A mirror inside an amplifier shares its output node with a load, an input
// pair's drain, a follower; the node's impedance in the circuit (linearise.cpp) is the
// mirror's own in parallel with all of that, so comparing it with the hand formula tells
// nothing about the formula. This pass solves the mirror by itself instead.
//
// What the mirror alone is (its devices, the nets held, the nets left free) is mirror_alone.cpp's.
// For one output, the other outputs are held too.
// The output is driven with 1 A and its voltage is the resistance (a DC solve, with the
// range the op data leaves open as in linearise.cpp). Every stamp is the whole-circuit
// solve's (small_signal_network.cpp), so "own" and "at the node" differ only by what the
// circuit adds.
//
// Left out: the spectrum (the mirror alone is a DC quantity here); elements that bias a gate
// through anything but one resistor to a rail.
#include "src/analyse/own_resistance.hpp"

#include <algorithm>
#include <set>

#include "parsers/common/text.hpp"
#include "src/analyse/dc_solver.hpp"
#include "src/analyse/mirror_alone.hpp"
#include "src/analyse/small_signal_network.hpp"

namespace mirrorcheck {

namespace {

constexpr const char* mirror_alone = "mirror alone";

OwnResistance solve(const Circuit& circuit, const OpPoint& op, const MirrorAlone& alone, const std::string& node) {
    OwnResistance own;
    own.mirror = alone.mirror;
    own.node = node;
    own.value.node = node;
    for (std::size_t i : alone.devices) own.devices.push_back(circuit.devices()[i].name);
    std::vector<std::string> kept = {node};
    kept.insert(kept.end(), alone.free_nets.begin(), alone.free_nets.end());
    std::set<std::string> held(alone.held.begin(), alone.held.end());
    for (const std::string& o : alone.outputs)
        if (o != node) held.insert(o);
    own.held.assign(held.begin(), held.end());
    SmallSignalNetwork network = build_device_network(circuit, op, alone.devices, kept);
    if (!network.problems.empty()) {
        own.value.note = "the mirror alone could not be linearised: " + describe(network.problems);
        return own;
    }
    DcSolver dc(network);
    if (!dc.failure().empty()) {
        own.value.note = "the mirror alone could not be solved: " + dc.failure();
        return own;
    }
    solve_port(own.value, dc, network.port(node));
    if (!own.value.resistance) {
        own.value.note = "the solve of the mirror alone failed";
        return own;
    }
    own.value.scope = mirror_alone;
    own.value.note = dc.note();
    return own;
}

}  // namespace

std::vector<OwnResistance> compute_own_resistances(const Circuit& circuit, const OpPoint& op,
                                                   const std::vector<Mirror>& mirrors) {
    const std::vector<MirrorAlone> alone = describe_mirrors_alone(circuit, mirrors, source_held_nets(circuit));
    std::vector<OwnResistance> result;
    for (std::size_t k = 0; k < mirrors.size(); ++k)
        for (const MirrorOutput& o : mirrors[k].outputs) result.push_back(solve(circuit, op, alone[k], to_lower(o.node)));
    return result;
}

}  // namespace mirrorcheck
