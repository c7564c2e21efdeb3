// Private to src/recognise: finds the reference side of a mirror from its gate (base) net G.
//
// Rules, tried in this order on the unclaimed transistors of one kind:
// - Wilson: a diode-connected M2 on G; a device M3 whose source is on G (not a diode) and
//   whose gate is the drain of a device M1 gated by G, with M1's foot equal to M2's.
//   Improved Wilson: the same, but M1's drain reaches M3's gate through a diode-connected
//   M4 stacked on M1. The reference is M1 (and M4); M2 and M3 form the output.
// - Diode stack: a diode-connected device on G, any diode-connected devices stacked
//   directly on it (the standard cascode reference), and then any cascode devices (gate on
//   a bias net, drain not on a supply) stacked on those, through which the reference current enters (a
//   low-voltage cascode reference whose bottom device is a diode).
// - Wide-swing: a device gated by G whose stack (through exclusive nets) tops out at a
//   drain on G: the bottom gate is tied to the top of the cascoded reference branch.
// - Beta helper: a device R gated by G whose drain is the control of a follower H whose
//   source (emitter) is on G. Allowed for MOS too, where the follower only level-shifts.
// Each search costs the size of G's own lists (maps keyed by net, no pairwise loops).
#include "src/recognise/reference_shapes.hpp"

#include <unordered_map>

namespace mirrorcheck::recognise {

namespace {

constexpr std::size_t max_levels = 8;  // taller stacks are not references

std::optional<std::size_t> diode_on(const CircuitIndex& ix, std::size_t g, const Claims& claims) {
    for (std::size_t t : ix.use(g).controls) {
        const Transistor& tr = ix.transistor(t);
        if (!claims[t] && tr.drain == g && tr.source != g) return t;
    }
    return std::nullopt;
}

// Devices with their source on G and their gate elsewhere, keyed by that gate net.
std::unordered_map<std::size_t, std::size_t> sources_by_control(const CircuitIndex& ix, std::size_t g, Kind kind,
                                                                const Claims& claims) {
    std::unordered_map<std::size_t, std::size_t> by_control;
    for (std::size_t t : ix.use(g).sources) {
        const Transistor& tr = ix.transistor(t);
        if (!claims[t] && tr.kind == kind && tr.control != g && !tr.diode()) by_control.emplace(tr.control, t);
    }
    return by_control;
}

bool usable_gated(const CircuitIndex& ix, std::size_t t, std::size_t g, Kind kind, const Claims& claims) {
    const Transistor& tr = ix.transistor(t);
    return !claims[t] && tr.kind == kind && tr.drain != g && tr.source != g;
}

std::optional<Reference> find_wilson(const CircuitIndex& ix, std::size_t g, std::size_t m2, const Claims& claims) {
    Kind kind = ix.transistor(m2).kind;
    auto m3_by_gate = sources_by_control(ix, g, kind, claims);
    if (m3_by_gate.empty()) return std::nullopt;
    Foot foot2 = ix.foot(m2);
    for (std::size_t m1 : ix.use(g).controls) {
        if (m1 == m2 || !usable_gated(ix, m1, g, kind, claims)) continue;
        Foot foot1 = ix.foot(m1);
        if (foot1.net != foot2.net) continue;
        std::size_t drain1 = ix.transistor(m1).drain;
        if (auto it = m3_by_gate.find(drain1); it != m3_by_gate.end())
            return Reference{Shape::wilson, {m1}, {foot1.resistor}, drain1, {}, {{m2, foot2.resistor}, {it->second, {}}}};
        auto m4 = ix.step_up(m1);
        if (!m4 || claims[m4->transistor] || !ix.transistor(m4->transistor).diode()) continue;
        std::size_t drain4 = ix.transistor(m4->transistor).drain;
        if (auto it = m3_by_gate.find(drain4); it != m3_by_gate.end())
            return Reference{Shape::improved_wilson, {m1, m4->transistor}, {foot1.resistor, m4->resistor}, drain4, {},
                             {{m2, foot2.resistor}, {it->second, {}}}};
    }
    return std::nullopt;
}

std::optional<std::size_t> diode_above(const CircuitIndex& ix, std::size_t below, const Claims& claims) {
    const Transistor& b = ix.transistor(below);
    for (std::size_t t : ix.use(b.drain).sources) {
        const Transistor& tr = ix.transistor(t);
        if (!claims[t] && t != below && tr.kind == b.kind && tr.diode() && tr.drain != tr.source) return t;
    }
    return std::nullopt;
}

Reference diode_stack(const CircuitIndex& ix, std::size_t diode, const Claims& claims) {
    Reference ref{Shape::diode_stack, {diode}, {ix.foot(diode).resistor}, 0, {}, {}};
    while (ref.devices.size() < max_levels) {
        auto next = diode_above(ix, ref.devices.back(), claims);
        if (!next) break;
        ref.devices.push_back(*next);
        ref.degeneration.push_back(std::nullopt);
    }
    while (ref.devices.size() < max_levels) {
        auto step = ix.step_up(ref.devices.back());
        if (!step || claims[step->transistor]) break;
        const Transistor& cascode = ix.transistor(step->transistor);
        if (cascode.diode() || ix.is_supply(cascode.drain) || !ix.is_bias(cascode.control, cascode.kind)) break;
        ref.devices.push_back(step->transistor);
        ref.degeneration.push_back(step->resistor);
    }
    ref.node = ix.transistor(ref.devices.back()).drain;
    return ref;
}

std::optional<Reference> wide_swing_branch(const CircuitIndex& ix, std::size_t g, std::size_t bottom,
                                           const Claims& claims) {
    Reference ref{Shape::wide_swing, {bottom}, {ix.foot(bottom).resistor}, g, {}, {}};
    while (ref.devices.size() < max_levels) {
        auto step = ix.step_up(ref.devices.back());
        if (!step || claims[step->transistor]) return std::nullopt;
        ref.devices.push_back(step->transistor);
        ref.degeneration.push_back(step->resistor);
        if (ix.transistor(step->transistor).drain == g) return ref;
    }
    return std::nullopt;
}

std::optional<Reference> find_wide_swing(const CircuitIndex& ix, std::size_t g, const Claims& claims) {
    if (ix.use(g).drains.empty()) return std::nullopt;
    for (std::size_t t : ix.use(g).controls) {
        if (!usable_gated(ix, t, g, ix.transistor(t).kind, claims)) continue;
        if (auto ref = wide_swing_branch(ix, g, t, claims)) return ref;
    }
    return std::nullopt;
}

std::optional<Reference> find_beta_helper(const CircuitIndex& ix, std::size_t g, const Claims& claims) {
    const auto& controls = ix.use(g).controls;
    if (controls.empty() || ix.use(g).sources.empty()) return std::nullopt;
    Kind kind = ix.transistor(controls.front()).kind;  // one kind per gate net is the norm
    auto helpers = sources_by_control(ix, g, kind, claims);
    for (std::size_t t : controls) {
        if (!usable_gated(ix, t, g, kind, claims)) continue;
        auto it = helpers.find(ix.transistor(t).drain);
        if (it != helpers.end() && it->second != t)
            return Reference{Shape::beta_helper, {t}, {ix.foot(t).resistor}, ix.transistor(t).drain, {it->second}, {}};
    }
    return std::nullopt;
}

}  // namespace

std::optional<Reference> find_reference(const CircuitIndex& ix, std::size_t net, const Claims& claims) {
    if (auto diode = diode_on(ix, net, claims)) {
        if (auto wilson = find_wilson(ix, net, *diode, claims)) return wilson;
        return diode_stack(ix, *diode, claims);
    }
    if (auto wide = find_wide_swing(ix, net, claims)) return wide;
    return find_beta_helper(ix, net, claims);
}

}  // namespace mirrorcheck::recognise
