// Private to src/recognise: merges the nets joined by the parasitic resistors of one-
// transistor wrapper subcircuits, so that a wrapped transistor is seen as its bare self.
//
// Rule: devices are grouped by their subcircuit instance path. A group with exactly one
// MOS or bipolar transistor, any capacitors and diodes, and resistors of at most
// max_parasitic_ohms (and nothing else) is a wrapper: its resistors become wires. The
// merged net is named after its outermost member (fewest hierarchy dots), so that a mirror
// output keeps the name the designer sees. Union-find over nets, linear in the circuit.
#include "src/recognise/wrapper_nets.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <string>
#include <unordered_map>

namespace mirrorcheck::recognise {

namespace {

struct GroupCount {
    std::size_t transistors = 0;
    std::size_t others = 0;
};

std::string instance_key(const Device& d) {
    std::string key;
    for (const auto& level : d.hierarchy) key += level.instance + ".";
    return key;
}

bool is_transistor(const Device& d) { return d.kind == DeviceKind::mosfet || d.kind == DeviceKind::bjt; }

bool is_parasitic(const Device& d) {
    return d.kind == DeviceKind::resistor && d.terminals.size() == 2 && d.value && std::abs(*d.value) <= max_parasitic_ohms;
}

bool is_passive_extra(const Device& d) { return d.kind == DeviceKind::capacitor || d.kind == DeviceKind::diode; }

std::unordered_map<std::string, GroupCount> count_groups(const Circuit& circuit) {
    std::unordered_map<std::string, GroupCount> groups;
    for (const Device& d : circuit.devices()) {
        if (d.hierarchy.empty() || is_parasitic(d) || is_passive_extra(d)) continue;
        GroupCount& g = groups[instance_key(d)];
        ++(is_transistor(d) ? g.transistors : g.others);
    }
    return groups;
}

std::size_t depth(const std::string& net) { return static_cast<std::size_t>(std::count(net.begin(), net.end(), '.')); }

struct UnionFind {
    std::vector<std::size_t> parent;
    const Circuit& circuit;

    std::size_t find(std::size_t n) {
        while (parent[n] != n) n = parent[n] = parent[parent[n]];
        return n;
    }
    // The outer net (fewer dots, then lower index) becomes the root.
    void join(std::size_t a, std::size_t b) {
        a = find(a);
        b = find(b);
        if (a == b) return;
        auto rank = [&](std::size_t n) { return std::pair{depth(circuit.nets()[n].name), n}; };
        if (rank(b) < rank(a)) std::swap(a, b);
        parent[b] = a;
    }
};

}  // namespace

WrapperMerge merge_wrapper_parasitics(const Circuit& circuit, const std::vector<std::size_t>& first_terminal,
                                      const std::vector<std::size_t>& terminal_net) {
    WrapperMerge merge{std::vector<bool>(circuit.devices().size(), false), {}};
    UnionFind nets{std::vector<std::size_t>(circuit.nets().size()), circuit};
    std::iota(nets.parent.begin(), nets.parent.end(), std::size_t{0});
    auto groups = count_groups(circuit);
    for (std::size_t d = 0; d < circuit.devices().size(); ++d) {
        const Device& device = circuit.devices()[d];
        if (device.hierarchy.empty() || !is_parasitic(device)) continue;
        auto it = groups.find(instance_key(device));
        if (it == groups.end() || it->second.transistors != 1 || it->second.others != 0) continue;
        merge.shorted[d] = true;
        nets.join(terminal_net[first_terminal[d]], terminal_net[first_terminal[d] + 1]);
    }
    merge.representative.resize(circuit.nets().size());
    for (std::size_t n = 0; n < circuit.nets().size(); ++n) merge.representative[n] = nets.find(n);
    return merge;
}

}  // namespace mirrorcheck::recognise
