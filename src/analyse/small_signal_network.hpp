// The small-signal network of a circuit, or of a few of its devices, linearised at an
// operating point, in modified nodal form: Y(s) = G + s·C. See small_signal_network.cpp
// for the stamps, their sources and what is left out.
#pragma once

#include <array>
#include <complex>
#include <cstddef>
#include <set>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include <Eigen/Sparse>

#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"

namespace mirrorcheck {

// Where an impedance is measured: a node, driven by 1 A injected into it; or, when a
// voltage source of the circuit holds the node (its probe), through that source: its
// voltage set to 1 so that the node rises by 1 V, and Z = 1 / (the current it then
// delivers into the node).
struct Port {
    long node = -1;        // unknown index of the net's voltage
    long branch = -1;      // the probe source's branch current, or -1
    double sign = 1.0;     // +1 when the node is the source's + terminal, -1 when its -
    std::string source;    // the probe source's name, when branch >= 0
};

// One cause and every device it concerns, e.g. "gm, gds, gmb not in the op data" for 36
// transistors. text() says how many and names a few; `devices` holds them all.
struct DeviceNote {
    std::string cause;
    std::vector<std::string> devices;  // empty for a note about the circuit as a whole
    std::string text() const;          // "gm, gds, gmb not in the op data: 36 devices (m1, m2, m3, m4 and 32 more)"
};

// Adds `device` to the note of `cause`, making the note when it is the first.
void add_note(std::vector<DeviceNote>& notes, const std::string& cause, const std::string& device);
// The texts of the notes, joined by "; ".
std::string describe(const std::vector<DeviceNote>& notes);

// A stamp the op data does not fix: its estimate is in G, and `ends` are what G gains at the
// low and the high end of the quantity it depends on.
struct BoundedStamp {
    std::string device;
    std::string quantity;  // what the op data lacks, e.g. "dVdsat/dVgs"
    std::array<std::vector<Eigen::Triplet<double>>, 2> ends;
};

class SmallSignalNetwork {
public:
    // Unknown index of a net's voltage, or -1 for ground, a net held at AC ground, or a net
    // the network does not have.
    long node(std::string_view net) const;
    // The port at a net (node -1 when the network does not have the net).
    Port port(std::string_view net) const;
    void set_probe(const std::string& net, long branch, double sign, const std::string& source);
    long node_count() const { return node_count_; }
    long size() const { return node_count_ + branch_count_; }

    // G, with `gmin` siemens from every node to ground; `ends`, when given, holds for each
    // bounded stamp -1 (its estimate), 0 (its low end) or 1 (its high end).
    Eigen::SparseMatrix<double> conductance_matrix(double gmin, const std::vector<int>* ends = nullptr) const;
    // The change of G when bounded stamp `k` moves from its estimate to end `end` (0 or 1).
    const std::vector<Eigen::Triplet<double>>& bounded_change(std::size_t k, int end) const {
        return bounded[k].ends[static_cast<std::size_t>(end)];
    }
    // G + j·2·pi·frequency·C, with the same gmin, bounded stamps at their estimates.
    Eigen::SparseMatrix<std::complex<double>> admittance_matrix(double frequency, double gmin) const;

    // The parts of the network that no stamp joins to one another (G, C and the bounded
    // stamps), in the order of their first unknown, each with its nets, probes, stamps and
    // bounded stamps, its unknowns renumbered in their order; `part_of` gives each unknown's
    // part. A circuit of independent blocks (held rails between them) has one part per
    // block, and each can be solved alone. The notes stay with this network (they concern
    // the circuit); the transistor counts and has_storage are copied. One pass over the stamps.
    struct Split;
    Split split() const;

    // Why the network cannot be used (each names the cause and the devices); empty when it can.
    std::vector<DeviceNote> problems;
    // Assumptions that hold at every frequency ("left out (no op conductance)": diodes).
    std::vector<DeviceNote> notes;
    // What the frequency-dependent part leaves out ("no capacitances in the op data": m1, m2).
    std::vector<DeviceNote> storage_left_out;
    // Stamps the op data leaves open within a range (see BoundedStamp).
    std::vector<BoundedStamp> bounded;
    bool has_storage = false;                    // any capacitance or inductance stamped
    std::size_t transistors = 0;                 // transistors stamped
    std::size_t transistors_with_capacitances = 0;

    // Construction, for the builders in small_signal_network.cpp.
    explicit SmallSignalNetwork(const std::vector<std::string>& nets);
    long add_node(const std::string& name);  // a device's internal node; before any branch
    long add_branch() { return node_count_ + branch_count_++; }
    void add(long row, long col, double g);             // into G
    void add_storage(long row, long col, double c);     // into C (farads, or -henries in a branch row)
    void conductance(long a, long b, double g);
    void capacitance(long a, long b, double c);
    void vccs(long p, long n, long cp, long cn, double g);  // g·v(cp, cn) from p through the element to n
    void voltage_branch(long k, long p, long n);             // branch current k from p to n, row v(p) - v(n) = 0

private:
    std::unordered_map<std::string, long> node_index_;
    std::unordered_map<std::string, Port> probes_;
    long node_count_ = 0;
    long branch_count_ = 0;
    std::vector<Eigen::Triplet<double>> g_;
    std::vector<Eigen::Triplet<double>> c_;
};

struct SmallSignalNetwork::Split {
    std::vector<SmallSignalNetwork> parts;
    std::vector<std::size_t> part_of;  // by unknown of the network split
};

// True for the terminals that only sense a voltage: MOS gate and bulk, bipolar base and
// substrate, the controlling pair of a controlled source.
bool is_control_terminal(const Device& d, std::string_view role);

// The whole circuit. An independent voltage source touching a net of `probed` (lower case)
// is that net's probe: the net's impedance is measured through it, with every other probe
// in place, holding its own net as the deck does (what `.tf` of each probe reports).
SmallSignalNetwork build_circuit_network(const Circuit& circuit, const OpPoint& op, const std::set<std::string>& probed);

// Only `devices` (indices into circuit.devices()), seen from `target`: the target net and
// every net joining two of the devices through terminals that carry their current (drain,
// source, collector, emitter, either end of a two-terminal element) keep their voltage, as
// do the devices' internal nodes; every other net, gates and bases included, is AC ground.
SmallSignalNetwork build_device_network(const Circuit& circuit, const OpPoint& op,
                                        const std::vector<std::size_t>& devices, const std::string& target);

// Only `devices`, with exactly the nets `kept` keeping their voltage (and the devices'
// internal nodes); every other net is AC ground. A voltage source among the devices that
// touches a kept net is left out.
SmallSignalNetwork build_device_network(const Circuit& circuit, const OpPoint& op,
                                        const std::vector<std::size_t>& devices, const std::vector<std::string>& kept);

}  // namespace mirrorcheck
