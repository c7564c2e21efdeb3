// The mirror alone, for one mirror:
//   - its devices: the reference side, every output stack, the helpers (a regulated
//     cascode's booster, a beta helper), their source and emitter resistors;
//   - its own bias elements: the load of a booster (Mirror::helper_loads: its gain is
//     gm·(ro ∥ its load)), and the resistors that hold a gate or base net of the mirror to
//     a rail (a divider on the base of a bipolar current source sets the base's source
//     resistance);
//   - the reference node fed by an ideal current at its operating value: in small signal,
//     nothing (whatever feeds the reference in the circuit is left out);
//   - every other net it touches held at its operating voltage (AC ground): the rails and
//     any net voltage sources hold to ground, the feet of its bottom devices (the far end
//     of their degeneration resistors), and gate or base nets driven from outside the
//     mirror (a cascode bias line); when one output is measured, the others are held too;
//   - nets joining its devices keep their voltages, even when something outside the mirror
//     also sits there (a folded cascode's fold node carries an input pair: left out, its
//     current brought by the ideal feed).
// Left out: elements that bias a gate through anything but one resistor to a rail.
#include "src/analyse/mirror_alone.hpp"

#include "parsers/common/text.hpp"
#include "src/analyse/small_signal_network.hpp"

namespace mirrorcheck {
namespace {

bool is_transistor(const Device& d) { return d.kind == DeviceKind::mosfet || d.kind == DeviceKind::bjt; }

const std::string* net_of(const Device& d, std::initializer_list<std::string_view> roles) {
    for (std::string_view role : roles)
        if (const Terminal* t = d.terminal(role)) return &t->net;
    return nullptr;
}

class Describer {
public:
    Describer(const Circuit& circuit, const Mirror& mirror, const std::set<std::string>& rails)
        : circuit_(circuit), mirror_(mirror), rails_(rails) {}

    MirrorAlone run() {
        for (std::size_t i : mirror_.reference) add(i);
        for (const auto& r : mirror_.reference_degeneration)
            if (r) add(*r);
        for (const auto& o : mirror_.outputs) {
            for (std::size_t i : o.devices) add(i);
            for (const auto& r : o.degeneration)
                if (r) add(*r);
        }
        for (std::size_t i : mirror_.helpers) add(i);
        for (std::size_t i : mirror_.helper_loads) add(i);
        add_bias_resistors();
        std::set<std::string> feet = {foot(mirror_.reference, mirror_.reference_degeneration)};
        for (const auto& o : mirror_.outputs) feet.insert(foot(o.devices, o.degeneration));

        MirrorAlone alone;
        alone.mirror = mirror_.id;
        alone.devices.assign(members_.begin(), members_.end());
        std::set<std::string> outputs;
        for (const auto& o : mirror_.outputs)
            if (outputs.insert(to_lower(o.node)).second) alone.outputs.push_back(to_lower(o.node));
        std::set<std::string> free_nets;
        for (const std::string& net : touched())
            if (!outputs.count(net) && !rails_.count(net) && !feet.count(net) && net != "0") free_nets.insert(net);
        std::set<std::string> held;
        for (std::size_t i : members_)
            for (const Terminal& t : circuit_.devices()[i].terminals) held.insert(to_lower(t.net));
        for (const std::string& net : free_nets) held.erase(net);
        for (const std::string& net : outputs) held.erase(net);
        held.erase("0");
        alone.held.assign(held.begin(), held.end());
        alone.free_nets.assign(free_nets.begin(), free_nets.end());
        return alone;
    }

private:
    void add(std::size_t device) {
        if (device < circuit_.devices().size()) members_.insert(device);
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

    const Circuit& circuit_;
    const Mirror& mirror_;
    const std::set<std::string>& rails_;
    std::set<std::size_t> members_;
    std::set<std::string> biased_;  // gate or base nets held to a rail by a member resistor
};

}  // namespace

std::vector<MirrorAlone> describe_mirrors_alone(const Circuit& circuit, const std::vector<Mirror>& mirrors,
                                                const std::set<std::string>& rails) {
    std::vector<MirrorAlone> result;
    result.reserve(mirrors.size());
    for (const Mirror& m : mirrors) result.push_back(Describer(circuit, m, rails).run());
    return result;
}

}  // namespace mirrorcheck
