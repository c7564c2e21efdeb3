// The DC small-signal network of a whole circuit and the impedance at given nodes.
//
// What it computes: for each asked node, the resistance to ground that a test current
// source sees there, with every device replaced by its small-signal model at the operating
// point: the value ngspice's `.tf` reports as the input impedance of the probe source.
//
// Method: modified nodal analysis (MNA; Ho, Ruehli and Brennan, "The modified nodal
// approach to network analysis", IEEE Trans. Circuits and Systems, 1975): one unknown per
// node voltage (ground, net "0", eliminated) and one per branch current of each element
// that fixes a voltage (voltage sources, inductors, E and H sources). The matrix is built
// once as an Eigen::SparseMatrix, factorised once with Eigen::SparseLU, and solved once per
// asked node with 1 A injected into that node; the node's voltage is the resistance.
//
// Stamps (row = KCL at a node, currents leaving the node positive):
//   R            conductance m/R between its nodes (R = 0: a 0 V branch)
//   MOS          current into the drain i_d = gm·v(g,s) + gmb·v(b,s) + gds·v(d,s), out of the
//                source the same. This holds for PMOS too with op_point.hpp's positive
//                conductances: the PMOS drain current in device polarity, i_p (out of the
//                drain), is a function of vsg, vsd, vsb, so
//                  di_p = gm·d(vsg) + gds·d(vsd) + gmb·d(vsb) = -(gm·v(g,s) + gds·v(d,s) + gmb·v(b,s))
//                and the current into the drain, -di_p, is the NMOS expression.
//                A device with vds < 0 in the op data (drain and source exchanged, which SPICE
//                models handle internally, reporting gm, gmb, gds for the exchanged roles) is
//                stamped with d and s exchanged; without vds in the op data, forward mode is
//                assumed. (Checked against ngspice for level 1 and BSIM4.) Bipolar reverse
//                operation is not treated.
//   BJT          gpi between b and e, gmu between b and c, go between c and e, and
//                gm·v(b,e) from c to e. The same derivation as for MOS makes the PNP stamps
//                those of the NPN. (Matches ngspice's bjtload.c, where go is the collector
//                conductance at constant v(b,e).)
//   V, L         shorts: a branch row v(pos) - v(neg) = 0
//   I, C         opens
//   E            branch row v(pos) - v(neg) = gain·v(cpos, cneg); G: gain·v(cpos, cneg) from pos to neg
//   F, H         through the branch current of the controlling voltage source
//   K            ignored (inductors are shorts at DC)
//
// Assumptions:
//   - The asked nodes are held by probe voltage sources in the deck. Every independent
//     voltage source touching any asked node is removed (left open) in the one matrix that
//     serves all asked nodes; so while one asked node is solved, the others float too,
//     rather than being held as each one's own `.tf` would hold them. Outputs that do not
//     load each other (the usual mirror outputs) are unaffected.
//   - The op data holds gm, gds, gmb (MOS) and gm, gpi, gmu, go (bipolar) per instance,
//     multiplier included, as ngspice reports them; a transistor without them makes every
//     result absent, with a note naming it.
//   - When the matrix is singular (a node with no DC path to ground, e.g. a node only
//     between capacitors), 1e-12 S is added from every node to ground and the matrix is
//     factorised again: the default `gmin` of SPICE, which ngspice places across device
//     junctions and, with `.option rshunt`, from every node to ground. The note says so.
//
// Left out: diodes (no conductance in the op data: left open, with a note); MOS junction
// and gate conductances, bipolar substrate junctions; devices with internal nodes from
// ohmic resistances (level 1-3 rd, rs, rsh with nrd/nrs; BSIM4 rdsmod, rgatemod,
// rbodymod; bipolar rb, re, rc), which make the results absent with a note; resistor
// temperature coefficients; JFETs, behavioural sources, polynomial or expression-valued
// sources and other devices, which make the results absent with a note. Frequency
// dependence is not computed here.
#include "src/analyse/linearise.hpp"

#include <Eigen/Sparse>
#include <Eigen/SparseLU>

#include <cmath>
#include <map>
#include <set>
#include <unordered_map>

#include "parsers/common/text.hpp"

namespace mirrorcheck {

namespace {

constexpr double shunt_gmin = 1e-12;

// The network under construction: triplets of the MNA matrix, nodes and branches indexed.
class Network {
public:
    explicit Network(const Circuit& circuit) {
        for (const Net& net : circuit.nets())
            if (net.name != "0") node_index_.emplace(to_lower(net.name), node_count_++);
    }

    // Node index, or -1 for ground (or a net the circuit does not have).
    long node(std::string_view net) const {
        auto it = node_index_.find(to_lower(net));
        return it == node_index_.end() ? -1 : it->second;
    }
    long node_count() const { return node_count_; }
    long size() const { return node_count_ + branch_count_; }

    long add_branch() { return node_count_ + branch_count_++; }

    void add(long row, long col, double v) {
        if (row >= 0 && col >= 0 && v != 0.0) triplets_.emplace_back(row, col, v);
    }
    // Conductance g between nodes a and b.
    void conductance(long a, long b, double g) {
        add(a, a, g);
        add(b, b, g);
        add(a, b, -g);
        add(b, a, -g);
    }
    // Current g·v(cp, cn) flowing from node p through the element to node n.
    void vccs(long p, long n, long cp, long cn, double g) {
        add(p, cp, g);
        add(p, cn, -g);
        add(n, cp, -g);
        add(n, cn, g);
    }
    // A branch current k flowing from p through the element to n, and the row
    // v(p) - v(n) (- whatever the caller adds) = 0.
    void voltage_branch(long k, long p, long n) {
        add(p, k, 1.0);
        add(n, k, -1.0);
        add(k, p, 1.0);
        add(k, n, -1.0);
    }

    Eigen::SparseMatrix<double> matrix(double gmin) const {
        std::vector<Eigen::Triplet<double>> t = triplets_;
        if (gmin > 0)
            for (long i = 0; i < node_count_; ++i) t.emplace_back(i, i, gmin);
        Eigen::SparseMatrix<double> a(size(), size());
        a.setFromTriplets(t.begin(), t.end());
        a.makeCompressed();
        return a;
    }

private:
    std::unordered_map<std::string, long> node_index_;
    long node_count_ = 0;
    long branch_count_ = 0;
    std::vector<Eigen::Triplet<double>> triplets_;
};

double model_parameter(const Device& d, const char* name) {
    if (!d.model) return 0.0;
    auto it = d.model->parameters.find(name);
    return it == d.model->parameters.end() ? 0.0 : it->second;
}

// Why a transistor has internal nodes this network does not model; empty when it has none.
std::string internal_nodes_reason(const Device& d) {
    if (!d.model) return {};
    if (d.kind == DeviceKind::bjt) {
        for (const char* p : {"rb", "re", "rc"})
            if (model_parameter(d, p) > 0) return std::string("model ") + p;
        return {};
    }
    double level = d.model->level;
    if (level == 14 || level == 54) {
        for (const char* p : {"rdsmod", "rgatemod", "rbodymod"})
            if (model_parameter(d, p) != 0) return std::string("model ") + p;
        return {};
    }
    if (level <= 3) {
        for (const char* p : {"rd", "rs"})
            if (model_parameter(d, p) > 0) return std::string("model ") + p;
    }
    if (model_parameter(d, "rsh") > 0 && (d.parameter("nrd").value_or(0) > 0 || d.parameter("nrs").value_or(0) > 0))
        return "rsh with nrd/nrs";
    return {};
}

std::string join(const std::vector<std::string>& parts, std::string_view sep) {
    std::string s;
    for (const auto& p : parts) {
        if (!s.empty()) s += sep;
        s += p;
    }
    return s;
}

struct Built {
    Network net;
    std::vector<std::string> problems;  // each makes every result absent
    std::vector<std::string> notes;     // assumptions made
};

void build(Built& b, const Circuit& circuit, const OpPoint& op, const std::set<std::string>& asked) {
    Network& n = b.net;
    auto at = [&](const Device& d, std::string_view role) -> long {
        const Terminal* t = d.terminal(role);
        return t ? n.node(t->net) : -1;
    };
    auto touches_asked = [&](const Device& d) {
        for (const Terminal& t : d.terminals)
            if (asked.count(to_lower(t.net))) return true;
        return false;
    };

    // Branches of the voltage sources first: F and H refer to them by name.
    std::map<std::string, long> source_branch;
    std::vector<std::string> probes;
    for (const Device& d : circuit.devices()) {
        if (d.kind != DeviceKind::vsource) continue;
        if (touches_asked(d)) {
            probes.push_back(d.name);
            continue;
        }
        long k = n.add_branch();
        source_branch[to_lower(d.name)] = k;
        n.voltage_branch(k, at(d, "pos"), at(d, "neg"));
    }
    if (!probes.empty()) b.notes.push_back("probe " + join(probes, ", ") + " removed");

    std::vector<std::string> diodes;
    for (const Device& d : circuit.devices()) {
        switch (d.kind) {
            case DeviceKind::vsource:
            case DeviceKind::isource:
            case DeviceKind::capacitor:
            case DeviceKind::coupling: break;
            case DeviceKind::inductor: n.voltage_branch(n.add_branch(), at(d, "pos"), at(d, "neg")); break;
            case DeviceKind::resistor: {
                if (!d.value || d.text.count("expression")) {
                    b.problems.push_back("resistor " + d.name + " has no fixed value");
                    break;
                }
                if (*d.value == 0.0) {
                    n.voltage_branch(n.add_branch(), at(d, "pos"), at(d, "neg"));
                    break;
                }
                n.conductance(at(d, "pos"), at(d, "neg"), d.parameter("m").value_or(1.0) / *d.value);
                break;
            }
            case DeviceKind::vcvs:
            case DeviceKind::vccs: {
                if (!d.value || !d.terminal("cpos") || !d.terminal("cneg")) {
                    b.problems.push_back(std::string(to_string(d.kind)) + " " + d.name + " is not a linear gain");
                    break;
                }
                double gain = *d.value;
                if (d.kind == DeviceKind::vccs) {
                    n.vccs(at(d, "pos"), at(d, "neg"), at(d, "cpos"), at(d, "cneg"), gain);
                } else {
                    long k = n.add_branch();
                    n.voltage_branch(k, at(d, "pos"), at(d, "neg"));
                    n.add(k, at(d, "cpos"), -gain);
                    n.add(k, at(d, "cneg"), gain);
                }
                break;
            }
            case DeviceKind::cccs:
            case DeviceKind::ccvs: {
                auto control = d.text.find("control");
                if (!d.value || control == d.text.end()) {
                    b.problems.push_back(std::string(to_string(d.kind)) + " " + d.name + " is not a linear gain");
                    break;
                }
                auto src = source_branch.find(to_lower(control->second));
                if (src == source_branch.end()) {
                    b.problems.push_back(std::string(to_string(d.kind)) + " " + d.name + " senses " + control->second +
                                         ", which is a probe or not a voltage source");
                    break;
                }
                double gain = *d.value;
                if (d.kind == DeviceKind::cccs) {
                    n.add(at(d, "pos"), src->second, gain);
                    n.add(at(d, "neg"), src->second, -gain);
                } else {
                    long k = n.add_branch();
                    n.voltage_branch(k, at(d, "pos"), at(d, "neg"));
                    n.add(k, src->second, -gain);
                }
                break;
            }
            case DeviceKind::diode: diodes.push_back(d.name); break;
            case DeviceKind::mosfet:
            case DeviceKind::bjt: {
                const bool mos = d.kind == DeviceKind::mosfet;
                if (auto why = internal_nodes_reason(d); !why.empty()) {
                    b.problems.push_back(d.name + " has internal nodes (" + why + ")");
                    break;
                }
                const DeviceOp* o = op.device(d.name);
                std::vector<std::string> lacking;
                auto get = [&](const char* q) {
                    std::optional<double> v = o ? o->get(q) : std::nullopt;
                    if (!v) lacking.push_back(q);
                    return v.value_or(0.0);
                };
                if (mos) {
                    double gm = get("gm"), gds = get("gds"), gmb = get("gmb");
                    if (!lacking.empty()) {
                        b.problems.push_back(d.name + " lacks " + join(lacking, ", ") + " in the op data");
                        break;
                    }
                    long dn = at(d, "d"), g = at(d, "g"), s = at(d, "s"), bn = at(d, "b");
                    if (o->get("vds").value_or(0.0) < 0) std::swap(dn, s);  // reverse mode
                    n.conductance(dn, s, gds);
                    n.vccs(dn, s, g, s, gm);
                    if (d.terminal("b")) n.vccs(dn, s, bn, s, gmb);
                } else {
                    double gm = get("gm"), gpi = get("gpi"), gmu = get("gmu"), go = get("go");
                    if (!lacking.empty()) {
                        b.problems.push_back(d.name + " lacks " + join(lacking, ", ") + " in the op data");
                        break;
                    }
                    long c = at(d, "c"), bn = at(d, "b"), e = at(d, "e");
                    n.conductance(bn, e, gpi);
                    n.conductance(bn, c, gmu);
                    n.conductance(c, e, go);
                    n.vccs(c, e, bn, e, gm);
                }
                break;
            }
            case DeviceKind::behavioural:
            case DeviceKind::jfet:
            case DeviceKind::other:
                b.problems.push_back(std::string(to_string(d.kind)) + " " + d.name + " has no linear model here");
                break;
        }
    }
    if (!diodes.empty()) b.notes.push_back("diode " + join(diodes, ", ") + " left out (no op conductance)");
}

}  // namespace

std::vector<LinearisedImpedance> compute_linearised_impedances(const Circuit& circuit, const OpPoint& op,
                                                               const std::vector<std::string>& nodes) {
    std::vector<LinearisedImpedance> out;
    std::set<std::string> asked;
    for (const auto& node : nodes) {
        out.push_back({to_lower(node), std::nullopt, {}});
        asked.insert(to_lower(node));
    }
    if (nodes.empty()) return out;

    Built b{Network(circuit), {}, {}};
    build(b, circuit, op, asked);
    auto fail_all = [&](const std::string& why) {
        for (auto& r : out)
            if (r.note.empty()) r.note = why;
        return out;
    };
    if (!b.problems.empty()) return fail_all("not linearised: " + join(b.problems, "; "));
    if (b.net.size() == 0) return fail_all("not linearised: the circuit has no nodes besides ground");

    Eigen::SparseLU<Eigen::SparseMatrix<double>, Eigen::COLAMDOrdering<int>> lu;
    Eigen::SparseMatrix<double> a = b.net.matrix(0.0);
    lu.analyzePattern(a);
    lu.factorize(a);
    if (lu.info() != Eigen::Success) {
        // Singular: a node without a DC path to ground. Shunt every node with SPICE's gmin.
        a = b.net.matrix(shunt_gmin);
        lu.analyzePattern(a);
        lu.factorize(a);
        if (lu.info() != Eigen::Success)
            return fail_all("not linearised: the network is singular (a loop of voltage sources or shorts?)");
        b.notes.push_back("singular network: 1e-12 S added from every node to ground");
    }
    const std::string common = join(b.notes, "; ");

    for (auto& r : out) {
        long k = r.node == "0" ? -1 : b.net.node(r.node);
        if (k < 0) {
            r.note = r.node == "0" ? "the ground node has no impedance" : "no net " + r.node + " in the circuit";
            continue;
        }
        Eigen::VectorXd j = Eigen::VectorXd::Zero(b.net.size());
        j[k] = 1.0;
        Eigen::VectorXd v = lu.solve(j);
        if (lu.info() != Eigen::Success || !std::isfinite(v[k])) {
            r.note = "the solve failed";
            continue;
        }
        r.resistance = v[k];
        r.note = common;
    }
    return out;
}

}  // namespace mirrorcheck
