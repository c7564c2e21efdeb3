// The output resistance of each mirror alone ("own"): the quantity analysis by inspection
// describes. A mirror inside an amplifier shares its output node with a load, an input
// pair's drain, a follower; the node's impedance in the circuit (linearise.cpp) is the
// mirror's own in parallel with all of that, so comparing it with the hand formula tells
// nothing about the formula. This pass solves the mirror by itself instead.
//
// What the mirror alone is, for one output:
//   - its devices: the reference side, every output stack, the helpers (a regulated
//     cascode's booster, a beta helper), their source and emitter resistors;
//   - its own bias elements: the load of a booster (Mirror::helper_loads: its gain is
//     gm·(ro ∥ its load)), and the
//     resistors that hold a gate or base net of the mirror to a rail (a divider on the base
//     of a bipolar current source sets the base's source resistance);
//   - the reference node fed by an ideal current at its operating value: in small signal,
//     nothing (whatever feeds the reference in the circuit is left out);
//   - every other net it touches held at its operating voltage (AC ground): the rails and
//     any net voltage sources hold to ground, the feet of its bottom devices (the far end of their
//     degeneration resistors), the mirror's other outputs, and gate or base nets driven from
//     outside the mirror (a cascode bias line);
//   - nets joining its devices keep their voltages, even when something outside the mirror
//     also sits there (a folded cascode's fold node carries an input pair: left out).
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
#include "src/analyse/small_signal_network.hpp"

namespace mirrorcheck {

namespace {

constexpr const char* mirror_alone = "mirror alone";

bool is_transistor(const Device& d) { return d.kind == DeviceKind::mosfet || d.kind == DeviceKind::bjt; }

const std::string* net_of(const Device& d, std::initializer_list<std::string_view> roles) {
    for (std::string_view role : roles)
        if (const Terminal* t = d.terminal(role)) return &t->net;
    return nullptr;
}

class MirrorAlone {
public:
    MirrorAlone(const Circuit& circuit, const Mirror& mirror, const std::set<std::string>& rails)
        : circuit_(circuit), mirror_(mirror), rails_(rails) {
        for (std::size_t i : mirror.reference) add(i);
        for (const auto& r : mirror.reference_degeneration)
            if (r) add(*r);
        for (const auto& o : mirror.outputs) {
            for (std::size_t i : o.devices) add(i);
            for (const auto& r : o.degeneration)
                if (r) add(*r);
        }
        for (std::size_t i : mirror.helpers) add(i);
        add_helper_loads();
        add_bias_resistors();
        feet_.insert(foot(mirror.reference, mirror.reference_degeneration));
        for (const auto& o : mirror.outputs) feet_.insert(foot(o.devices, o.degeneration));
    }

    OwnResistance solve(const OpPoint& op, const MirrorOutput& output) const {
        OwnResistance own;
        own.mirror = mirror_.id;
        own.node = to_lower(output.node);
        own.value.node = own.node;
        std::vector<std::size_t> devices(members_.begin(), members_.end());
        for (std::size_t i : devices) own.devices.push_back(circuit_.devices()[i].name);
        std::vector<std::string> kept = {own.node};
        for (const std::string& net : touched())
            if (net != own.node && !is_held(net, output)) kept.push_back(net);
        // Every other net of the devices is held: rails, feet, other outputs, outside gates.
        std::set<std::string> held;
        for (std::size_t i : devices)
            for (const Terminal& t : circuit_.devices()[i].terminals) held.insert(to_lower(t.net));
        for (const std::string& net : kept) held.erase(net);
        held.erase("0");
        own.held.assign(held.begin(), held.end());
        SmallSignalNetwork network = build_device_network(circuit_, op, devices, kept);
        if (!network.problems.empty()) {
            own.value.note = "the mirror alone could not be linearised: " + describe(network.problems);
            return own;
        }
        DcSolver dc(network);
        if (!dc.failure().empty()) {
            own.value.note = "the mirror alone could not be solved: " + dc.failure();
            return own;
        }
        solve_port(own.value, dc, network.port(own.node));
        if (!own.value.resistance) {
            own.value.note = "the solve of the mirror alone failed";
            return own;
        }
        own.value.scope = mirror_alone;
        own.value.note = dc.note();
        return own;
    }

private:
    void add(std::size_t device) {
        if (device < circuit_.devices().size()) members_.insert(device);
    }

    // A booster's load (recognition names it): the booster's gain is gm·(ro ∥ its load).
    void add_helper_loads() {
        for (std::size_t i : mirror_.helper_loads) add(i);
    }

    // Resistors from a gate or base net of the mirror to a rail, except at the reference
    // node (which the ideal reference current feeds).
    void add_bias_resistors() {
        std::set<std::string> controls;
        for (std::size_t i : members_) {
            const Device& d = circuit_.devices()[i];
            if (const std::string* g = is_transistor(d) ? net_of(d, {"g", "b"}) : nullptr) controls.insert(to_lower(*g));
        }
        const std::string reference = to_lower(mirror_.reference_node);
        for (const std::string& g : controls) {
            if (g == reference || rails_.count(g)) continue;
            const Net* net = circuit_.find_net(g);
            if (!net) continue;
            for (const TerminalRef& t : net->terminals) {
                const Device& d = circuit_.devices()[t.device];
                if (d.kind != DeviceKind::resistor || d.terminals.size() != 2) continue;
                const std::string& other = d.terminals[1 - t.terminal].net;
                if (rails_.count(to_lower(other))) {
                    add(t.device);
                    biased_.insert(g);
                }
            }
        }
    }

    // Where the bottom of a stack ends: the far end of its resistor, or its source (emitter).
    std::string foot(const std::vector<std::size_t>& stack, const std::vector<std::optional<std::size_t>>& resistors) const {
        if (stack.empty()) return "0";
        const Device& bottom = circuit_.devices()[stack.front()];
        const std::string* source = net_of(bottom, {"s", "e"});
        if (!source) return "0";
        std::string net = to_lower(*source);
        if (!resistors.empty() && resistors.front()) {
            const Device& r = circuit_.devices()[*resistors.front()];
            for (const Terminal& t : r.terminals)
                if (to_lower(t.net) != net) return to_lower(t.net);
        }
        return net;
    }

    // The nets the members' current-carrying terminals reach, the reference node, and the
    // gate nets held by a bias resistor.
    std::set<std::string> touched() const {
        std::set<std::string> nets(biased_.begin(), biased_.end());
        for (std::size_t i : members_) {
            const Device& d = circuit_.devices()[i];
            for (const Terminal& t : d.terminals)
                if (!is_control_terminal(d, t.role)) nets.insert(to_lower(t.net));
        }
        if (!mirror_.reference_node.empty()) nets.insert(to_lower(mirror_.reference_node));
        return nets;
    }

    bool is_held(const std::string& net, const MirrorOutput& measured) const {
        if (rails_.count(net) || feet_.count(net)) return true;
        for (const auto& o : mirror_.outputs)
            if (&o != &measured && to_lower(o.node) == net) return true;
        return false;
    }

    const Circuit& circuit_;
    const Mirror& mirror_;
    const std::set<std::string>& rails_;
    std::set<std::size_t> members_;
    std::set<std::string> biased_;  // gate or base nets held to a rail by a member resistor
    std::set<std::string> feet_;
};

}  // namespace

std::vector<OwnResistance> compute_own_resistances(const Circuit& circuit, const OpPoint& op,
                                                   const std::vector<Mirror>& mirrors) {
    const std::set<std::string> rails = source_held_nets(circuit);
    std::vector<OwnResistance> result;
    for (const Mirror& m : mirrors) {
        const MirrorAlone alone(circuit, m, rails);
        for (const MirrorOutput& o : m.outputs) result.push_back(alone.solve(op, o));
    }
    return result;
}

}  // namespace mirrorcheck
