// Recognition pass: finds every current mirror and every current source of a flattened
// circuit from its connections alone (no operating point), so that the analysis can
// recompute each output by inspection.
//
// Algorithm: index the circuit once (transistors by the nets of their drain, gate and
// source; rails; resistor dividers), then mark the loads of regulated-cascode boosters so
// that no mirror takes them for outputs; for each net taken as a gate (base) net, find the
// reference that drives it (reference_shapes.cpp: Wilson, stacked diodes, wide-swing
// branch, beta helper) and the outputs it mirrors into, each climbed up its stack and given
// a family (mirror_groups.cpp); finally, report as current sources the transistors left
// over that stand on a rail with their gate on a fixed voltage. Every step looks only at
// the nets next to a device, so the pass is linear in the circuit's size. Families follow
// DESIGN.md; the rule for each is written where it is applied.
//
// Assumptions: the circuit is flat (subcircuits, including transistors wrapped one per
// subcircuit, are already expanded; nets are nets). PMOS and PNP mirrors are the mirror
// images of NMOS and NPN, with no special case. Each transistor belongs to at most one
// mirror or current source.
//
// MOS drain and source are taken as written on the element line (the source towards the
// rail). Rails are ground and nets held to it by voltage sources without an ac or transient
// part; a fixed-voltage (bias) net is a rail, a net with a diode-connected transistor of
// the same kind, or a resistor divider between rails.
//
// Left out: mirrors whose devices are joined by resistors other than source or emitter
// degeneration (such as small parasitic resistors in a wrapper subcircuit), devices wired
// in parallel as one (a parallel reference device is ignored, a parallel output is a
// separate output on the same node), further outputs on a Wilson's diode (reported as
// current sources), and gates held by anything but a diode-connected device, a quiet
// voltage source or a divider (a DC-only amplifier input is taken for a bias line, which
// matters only for a device standing on a rail: an input pair stands on its tail).
#include "src/recognise/find_mirrors.hpp"

#include "src/recognise/circuit_index.hpp"
#include "src/recognise/mirror_groups.hpp"

namespace mirrorcheck {

namespace {

using recognise::CircuitIndex;
using recognise::FoundMirror;
using recognise::Step;

std::vector<std::size_t> device_indices(const CircuitIndex& ix, const std::vector<std::size_t>& transistors) {
    std::vector<std::size_t> devices;
    for (std::size_t t : transistors) devices.push_back(ix.transistor(t).device);
    return devices;
}

MirrorOutput describe_output(const CircuitIndex& ix, const FoundMirror& found, const std::vector<Step>& stack) {
    MirrorOutput out;
    out.node = ix.net_name(ix.transistor(stack.back().transistor).drain);
    for (const Step& s : stack) {
        out.devices.push_back(ix.transistor(s.transistor).device);
        out.degeneration.push_back(s.resistor);
    }
    if (found.reference)
        out.design_ratio = ix.size(stack.front().transistor) / ix.size(found.reference->devices.front());
    return out;
}

Mirror describe(const CircuitIndex& ix, const FoundMirror& found) {
    Mirror m;
    m.family = found.family;
    m.kind = std::string(recognise::to_string(found.kind));
    if (found.reference) {
        m.reference = device_indices(ix, found.reference->devices);
        m.reference_degeneration = found.reference->degeneration;
        m.reference_node = ix.net_name(found.reference->node);
    }
    for (const auto& stack : found.outputs) m.outputs.push_back(describe_output(ix, found, stack));
    m.helpers = device_indices(ix, found.helpers);
    m.helper_loads = device_indices(ix, found.helper_loads);
    m.id = mirror_family_label(m) + ":" + ix.circuit().devices()[m.outputs.front().devices.back()].name;
    return m;
}

std::vector<Mirror> describe_all(const CircuitIndex& ix, const std::vector<FoundMirror>& found) {
    std::vector<Mirror> mirrors;
    mirrors.reserve(found.size());
    for (const FoundMirror& f : found) mirrors.push_back(describe(ix, f));
    return mirrors;
}

}  // namespace

std::string_view to_string(Family family) {
    switch (family) {
        case Family::simple: return "simple";
        case Family::degenerated: return "degenerated";
        case Family::widlar: return "widlar";
        case Family::cascode: return "cascode";
        case Family::wide_swing_cascode: return "wide-swing-cascode";
        case Family::wilson: return "wilson";
        case Family::improved_wilson: return "improved-wilson";
        case Family::regulated_cascode: return "regulated-cascode";
        case Family::beta_helper: return "beta-helper";
        case Family::current_source: return "current-source";
    }
    return "current-source";
}

std::string mirror_family_label(const Mirror& mirror) {
    return mirror.kind + "-" + std::string(to_string(mirror.family));
}

std::vector<Mirror> find_mirrors(const Circuit& circuit) {
    const CircuitIndex index(circuit);
    recognise::Claims claims(index.transistors().size(), false);
    const recognise::BoosterLoads loads = recognise::find_booster_loads(index, claims);
    std::vector<FoundMirror> found = recognise::find_mirror_groups(index, loads, claims);
    std::vector<FoundMirror> sources = recognise::find_current_sources(index, claims);
    found.insert(found.end(), sources.begin(), sources.end());
    return describe_all(index, found);
}

std::vector<std::string> mirror_transistor_names(const Circuit& circuit, const std::vector<Mirror>& mirrors) {
    std::vector<std::string> names;
    std::vector<bool> listed(circuit.devices().size(), false);
    auto add = [&](const std::vector<std::size_t>& devices) {
        for (std::size_t i : devices)
            if (i < listed.size() && !listed[i]) {
                listed[i] = true;
                names.push_back(circuit.devices()[i].name);
            }
    };
    for (const Mirror& m : mirrors) {
        add(m.reference);
        add(m.helpers);
        add(m.helper_loads);
        for (const MirrorOutput& o : m.outputs) add(o.devices);
    }
    return names;
}

}  // namespace mirrorcheck
