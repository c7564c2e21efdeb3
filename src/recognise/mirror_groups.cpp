// Private to src/recognise: from a reference to its outputs, the family of each output, and
// the current sources left over.
//
// Outputs: every unclaimed device of the reference's kind gated by the mirror's gate net,
// whose foot (source net, or the far end of its only source resistor) is the reference
// bottom's foot, climbed upwards for as long as the next device is a cascode: its gate on a
// bias net (CircuitIndex::is_bias) or driven by a booster, and its drain not on a supply (a
// device from the output to a supply is a follower, whatever holds its gate). The next
// device is found through an exclusive net (CircuitIndex::step_up) or, for a cascode gated
// by a bias or a booster, through a fold node that also carries another branch
// (CircuitIndex::fold_up: a folded cascode). A follower driven by a signal on top of a
// mirror output is not part of the output.
// A device whose drain is the gate net itself is a parallel reference device, not an output.
// Family of an output:
// - beta-helper reference: beta-helper; Wilson references: wilson or improved-wilson.
// - one device: simple; widlar when only the output has a source resistor; degenerated
//   when the reference has one.
// - two or more devices: regulated-cascode when a device gated by the first cascode's
//   source drives that cascode's gate (the booster, reported as a helper, with the devices
//   on its drain net as its load); cascode when the reference is a stack of diodes and
//   each cascode gate is the gate of the reference diode at the same level (levels above
//   the output's top are not compared); wide-swing-cascode otherwise (cascode gates from a
//   separate bias, whatever the reference).
// Outputs of one reference and one family form one mirror; other families from the same
// reference form further mirrors.
// Booster loads are claimed before any mirror is sought: the load of a booster is often a
// mirror output or a current source of its own (a PMOS gated by a bias line), but it sets
// the booster's gain and belongs to the regulated cascode. A booster whose cascode ends up
// in no mirror gives its loads back, to be found as current sources.
// Current sources: a transistor not in any mirror, not diode-connected, whose foot is a rail
// and whose gate is on a fixed voltage (a net with a diode-connected device of its kind, a
// resistor divider, or a rail other than its own foot: a quiet bias source), with the
// cascodes above it. A signal source (ac or transient) is not a bias, so amplifier inputs
// are not current sources; a DC-only input source would be taken for a bias line.
#include "src/recognise/mirror_groups.hpp"

#include <algorithm>

namespace mirrorcheck::recognise {

namespace {

constexpr std::size_t max_stack = 16;  // guards against rings of transistors

void claim(Claims& claims, const std::vector<std::size_t>& transistors, bool value = true) {
    for (std::size_t t : transistors) claims[t] = value;
}

void claim(Claims& claims, const std::vector<Step>& steps) {
    for (const Step& s : steps) claims[s.transistor] = true;
}

bool contains(const std::vector<Step>& steps, std::size_t t) {
    return std::any_of(steps.begin(), steps.end(), [&](const Step& s) { return s.transistor == t; });
}

// A device above `below` is a cascode when its gate is held at AC ground (a bias net) or
// driven by a booster; otherwise (a follower driven by a signal) the stack ends below it.
// A device with its drain on a supply is a follower (the case: a source follower fed by a
// mirror, its gate on a DC input source); an output held by its own DC source is not a supply.
bool is_cascode_step(const CircuitIndex& ix, const Step& step) {
    const Transistor& t = ix.transistor(step.transistor);
    if (ix.is_supply(t.drain)) return false;
    return ix.is_bias(t.control, t.kind) || ix.booster_of(step.transistor).has_value();
}

std::optional<Step> next_level(const CircuitIndex& ix, std::size_t below) {
    if (auto step = ix.step_up(below)) return step;
    return ix.fold_up(below);
}

std::vector<Step> climb(const CircuitIndex& ix, std::vector<Step> stack, const Claims& claims) {
    while (stack.size() < max_stack) {
        auto step = next_level(ix, stack.back().transistor);
        if (!step || claims[step->transistor] || contains(stack, step->transistor) || !is_cascode_step(ix, *step))
            break;
        stack.push_back(*step);
    }
    return stack;
}

std::optional<std::size_t> booster(const CircuitIndex& ix, const std::vector<Step>& stack, const Claims& claims) {
    auto a = ix.booster_of(stack[1].transistor);
    if (!a || claims[*a] || contains(stack, *a)) return std::nullopt;
    return a;
}

Family single_device_family(const Reference& ref, const std::vector<Step>& stack) {
    if (ref.degeneration.front()) return Family::degenerated;
    return stack.front().resistor ? Family::widlar : Family::simple;
}

bool gates_follow_reference(const CircuitIndex& ix, const Reference& ref, const std::vector<Step>& stack) {
    if (ref.shape != Shape::diode_stack || ref.devices.size() < 2) return false;
    std::size_t levels = std::min(ref.devices.size(), stack.size());
    for (std::size_t i = 1; i < levels; ++i) {
        const Transistor& level = ix.transistor(ref.devices[i]);
        if (!level.diode() || ix.transistor(stack[i].transistor).control != level.control) return false;
    }
    return true;
}

Family output_family(const CircuitIndex& ix, const Reference& ref, const std::vector<Step>& stack, bool boosted) {
    if (ref.shape == Shape::beta_helper) return Family::beta_helper;
    if (stack.size() == 1) return single_device_family(ref, stack);
    if (boosted) return Family::regulated_cascode;
    return gates_follow_reference(ix, ref, stack) ? Family::cascode : Family::wide_swing_cascode;
}

FoundMirror& group_for(std::vector<FoundMirror>& groups, Family family, const Reference& ref, Kind kind) {
    for (FoundMirror& g : groups)
        if (g.family == family) return g;
    return groups.emplace_back(FoundMirror{family, kind, ref, {}, ref.helpers, {}});
}

bool is_output_candidate(const CircuitIndex& ix, std::size_t t, std::size_t gate, const Reference& ref,
                         const Claims& claims) {
    const Transistor& tr = ix.transistor(t);
    const Transistor& bottom = ix.transistor(ref.devices.front());
    return !claims[t] && tr.kind == bottom.kind && tr.drain != gate && tr.source != gate &&
           ix.foot(t).net == ix.foot(ref.devices.front()).net;
}

void add_output(const CircuitIndex& ix, std::vector<FoundMirror>& groups, const Reference& ref, std::size_t t,
                BoosterLoads& loads, Claims& claims) {
    auto stack = climb(ix, {Step{t, ix.foot(t).resistor}}, claims);
    claim(claims, stack);
    auto boost = stack.size() >= 2 ? booster(ix, stack, claims) : std::nullopt;
    FoundMirror& group = group_for(groups, output_family(ix, ref, stack, boost.has_value()), ref,
                                   ix.transistor(t).kind);
    group.outputs.push_back(std::move(stack));
    if (boost) {
        claims[*boost] = true;
        group.helpers.push_back(*boost);
        if (auto it = loads.find(*boost); it != loads.end()) {
            group.helper_loads.insert(group.helper_loads.end(), it->second.begin(), it->second.end());
            loads.erase(it);
        }
    }
}

std::vector<FoundMirror> wilson_mirror(const CircuitIndex& ix, const Reference& ref, Claims& claims) {
    auto stack = climb(ix, ref.wilson_output, claims);
    claim(claims, stack);
    Family family = ref.shape == Shape::wilson ? Family::wilson : Family::improved_wilson;
    return {FoundMirror{family, ix.transistor(ref.devices.front()).kind, ref, {std::move(stack)}, {}, {}}};
}

std::vector<FoundMirror> mirrors_on_net(const CircuitIndex& ix, std::size_t gate, BoosterLoads& loads,
                                        Claims& claims) {
    auto ref = find_reference(ix, gate, claims);
    if (!ref) return {};
    claim(claims, ref->devices);
    claim(claims, ref->helpers);
    if (!ref->wilson_output.empty()) return wilson_mirror(ix, *ref, claims);
    std::vector<FoundMirror> groups;
    for (std::size_t t : ix.use(gate).controls)
        if (is_output_candidate(ix, t, gate, *ref, claims)) add_output(ix, groups, *ref, t, loads, claims);
    if (groups.empty()) {
        claim(claims, ref->devices, false);
        claim(claims, ref->helpers, false);
    }
    return groups;
}

bool is_current_source_bottom(const CircuitIndex& ix, std::size_t t) {
    const Transistor& tr = ix.transistor(t);
    std::size_t foot = ix.foot(t).net;
    if (tr.diode() || !ix.is_rail(foot) || tr.control == foot || tr.control == tr.source) return false;
    return ix.is_bias(tr.control, tr.kind);
}

}  // namespace

BoosterLoads find_booster_loads(const CircuitIndex& ix, Claims& claims) {
    BoosterLoads loads;
    for (std::size_t c = 0; c < ix.transistors().size(); ++c) {
        auto booster = ix.stacked_booster_of(c);
        if (!booster || loads.contains(*booster)) continue;
        std::vector<std::size_t>& on_drain = loads[*booster];
        for (std::size_t t : ix.use(ix.transistor(*booster).drain).drains)
            if (t != *booster && t != c && !claims[t]) on_drain.push_back(t);
        claim(claims, on_drain);
    }
    return loads;
}

std::vector<FoundMirror> find_mirror_groups(const CircuitIndex& ix, BoosterLoads loads, Claims& claims) {
    std::vector<FoundMirror> found;
    for (std::size_t net = 0; net < ix.net_count(); ++net) {
        auto groups = mirrors_on_net(ix, net, loads, claims);
        std::move(groups.begin(), groups.end(), std::back_inserter(found));
    }
    for (const auto& [booster, unused] : loads) claim(claims, unused, false);
    return found;
}

std::vector<FoundMirror> find_current_sources(const CircuitIndex& ix, Claims& claims) {
    std::vector<FoundMirror> found;
    for (std::size_t t = 0; t < ix.transistors().size(); ++t) {
        if (claims[t] || !is_current_source_bottom(ix, t)) continue;
        auto stack = climb(ix, {Step{t, ix.foot(t).resistor}}, claims);
        claim(claims, stack);
        found.push_back(
            FoundMirror{Family::current_source, ix.transistor(t).kind, std::nullopt, {std::move(stack)}, {}, {}});
    }
    return found;
}

}  // namespace mirrorcheck::recognise
