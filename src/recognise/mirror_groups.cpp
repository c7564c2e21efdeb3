// Private to src/recognise: from a reference to its outputs, the family of each output, and
// the stacks left over.
//
// Outputs: every unclaimed device of the reference's kind gated by the mirror's gate net,
// whose foot (source net, or the far end of its only source resistor) is the reference
// bottom's foot, climbed upwards through exclusive nets (see CircuitIndex::step_up) for as
// long as the next device is a cascode: its gate on a bias net (a rail or a net with a
// diode-connected device of its kind) or driven by a booster. A follower driven by a signal
// on top of a mirror output is not part of the output.
// A device whose drain is the gate net itself is a parallel reference device, not an output.
// Family of an output:
// - beta-helper reference: beta-helper; Wilson references: wilson or improved-wilson.
// - one device: simple; widlar when only the output has a source resistor; degenerated
//   when the reference has one.
// - two or more devices: regulated-cascode when a device gated by the first cascode's
//   source drives that cascode's gate (the booster, reported as a helper); cascode when the
//   reference is a stack of diodes and each cascode gate is the gate of the reference diode
//   at the same level (levels above the output's top are not compared);
//   wide-swing-cascode otherwise (cascode gates from a separate bias,
//   whatever the reference).
// Outputs of one reference and one family form one mirror; other families from the same
// reference form further mirrors.
// Stacks: a transistor not in any mirror, not diode-connected, whose foot is a rail and
// whose gate is on a net with a diode-connected device of its kind, or on a rail other than
// its own foot (a quiet bias source). A signal source (ac or transient) is not a bias, so
// amplifier inputs are not stacks; a DC-only input source would be taken for a bias.
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
bool is_cascode_step(const CircuitIndex& ix, const Step& step) {
    const Transistor& t = ix.transistor(step.transistor);
    return ix.is_bias(t.control, t.kind) || ix.booster_of(step.transistor).has_value();
}

std::vector<Step> climb(const CircuitIndex& ix, std::vector<Step> stack, const Claims& claims) {
    while (stack.size() < max_stack) {
        auto step = ix.step_up(stack.back().transistor);
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
    return groups.emplace_back(FoundMirror{family, kind, ref, {}, ref.helpers});
}

bool is_output_candidate(const CircuitIndex& ix, std::size_t t, std::size_t gate, const Reference& ref,
                         const Claims& claims) {
    const Transistor& tr = ix.transistor(t);
    const Transistor& bottom = ix.transistor(ref.devices.front());
    return !claims[t] && tr.kind == bottom.kind && tr.drain != gate && tr.source != gate &&
           ix.foot(t).net == ix.foot(ref.devices.front()).net;
}

void add_output(const CircuitIndex& ix, std::vector<FoundMirror>& groups, const Reference& ref, std::size_t t,
                Claims& claims) {
    auto stack = climb(ix, {Step{t, ix.foot(t).resistor}}, claims);
    claim(claims, stack);
    auto boost = stack.size() >= 2 ? booster(ix, stack, claims) : std::nullopt;
    FoundMirror& group = group_for(groups, output_family(ix, ref, stack, boost.has_value()), ref,
                                   ix.transistor(t).kind);
    group.outputs.push_back(std::move(stack));
    if (boost) {
        claims[*boost] = true;
        group.helpers.push_back(*boost);
    }
}

std::vector<FoundMirror> wilson_mirror(const CircuitIndex& ix, const Reference& ref, Claims& claims) {
    auto stack = climb(ix, ref.wilson_output, claims);
    claim(claims, stack);
    Family family = ref.shape == Shape::wilson ? Family::wilson : Family::improved_wilson;
    return {FoundMirror{family, ix.transistor(ref.devices.front()).kind, ref, {std::move(stack)}, {}}};
}

std::vector<FoundMirror> mirrors_on_net(const CircuitIndex& ix, std::size_t gate, Claims& claims) {
    auto ref = find_reference(ix, gate, claims);
    if (!ref) return {};
    claim(claims, ref->devices);
    claim(claims, ref->helpers);
    if (!ref->wilson_output.empty()) return wilson_mirror(ix, *ref, claims);
    std::vector<FoundMirror> groups;
    for (std::size_t t : ix.use(gate).controls)
        if (is_output_candidate(ix, t, gate, *ref, claims)) add_output(ix, groups, *ref, t, claims);
    if (groups.empty()) {
        claim(claims, ref->devices, false);
        claim(claims, ref->helpers, false);
    }
    return groups;
}

bool is_stack_bottom(const CircuitIndex& ix, std::size_t t) {
    const Transistor& tr = ix.transistor(t);
    std::size_t foot = ix.foot(t).net;
    if (tr.diode() || !ix.is_rail(foot) || tr.control == foot || tr.control == tr.source) return false;
    return ix.is_bias(tr.control, tr.kind);
}

}  // namespace

std::vector<FoundMirror> find_mirror_groups(const CircuitIndex& ix, Claims& claims) {
    std::vector<FoundMirror> found;
    for (std::size_t net = 0; net < ix.net_count(); ++net) {
        auto groups = mirrors_on_net(ix, net, claims);
        std::move(groups.begin(), groups.end(), std::back_inserter(found));
    }
    return found;
}

std::vector<FoundMirror> find_stacks(const CircuitIndex& ix, Claims& claims) {
    std::vector<FoundMirror> found;
    for (std::size_t t = 0; t < ix.transistors().size(); ++t) {
        if (claims[t] || !is_stack_bottom(ix, t)) continue;
        auto stack = climb(ix, {Step{t, ix.foot(t).resistor}}, claims);
        claim(claims, stack);
        found.push_back(FoundMirror{Family::stack, ix.transistor(t).kind, std::nullopt, {std::move(stack)}, {}});
    }
    return found;
}

}  // namespace mirrorcheck::recognise
