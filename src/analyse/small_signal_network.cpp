// The small-signal network of a circuit linearised at its operating point.
//
// What it builds: the modified nodal analysis (MNA) matrices G (conductances, gains,
// branch rows) and C (capacitances, and inductances in branch rows), so that the
// network's admittance matrix at complex frequency s is Y(s) = G + s·C (Ho, Ruehli and
// Brennan, "The modified nodal approach to network analysis", IEEE Trans. Circuits and
// Systems, 1975). Unknowns: one voltage per node (ground, net "0", eliminated; in a device
// network, every net held at AC ground too), one current per branch of each element that
// fixes a voltage (voltage sources, inductors, E and H sources, zero-ohm resistors).
//
// Stamps (row = KCL at a node, currents leaving the node positive):
//   R            conductance m/R between its nodes (R = 0: a 0 V branch)
//   C            capacitance m·C between its nodes
//   L            branch row v(pos) - v(neg) - s·(L/m)·i = 0 (a short at DC)
//   K            -s·M, M = k·sqrt(L1·L2), between the rows of the two inductors' branches
//   MOS          current into the drain i_d = gm·v(g,s) + gmb·v(b,s) + gds·v(d,s), out of the
//                source the same. This holds for PMOS too with op_point.hpp's positive
//                conductances: the PMOS drain current in device polarity, i_p (out of the
//                drain), is a function of vsg, vsd, vsb, so
//                  di_p = gm·d(vsg) + gds·d(vsd) + gmb·d(vsb) = -(gm·v(g,s) + gds·v(d,s) + gmb·v(b,s))
//                and the current into the drain, -di_p, is the NMOS expression.
//                A device with vds < 0 in the op data (drain and source exchanged, which SPICE
//                models handle internally, reporting gm, gmb, gds for the exchanged roles) is
//                stamped with d and s exchanged; without vds in the op data, forward mode is
//                assumed. (Checked against ngspice for level 1 and BSIM4.)
//                Capacitances, Meyer models (levels 1, 2, 3, 6, 9): cgs, cgd, cgb, cbd, cbs
//                between the physical terminals, as ngspice's mos1acld.c stamps them.
//                Charge models (BSIM3, BSIM4): the current into terminal x is
//                s·sum_y Cxy·v(y) with Cxy = dQx/dVy from the reported cxyb (x in g, d, b;
//                y in g, d, s); the source row and the bulk column follow from charge
//                conservation (every row and every column of C sums to zero). The matrix is
//                in the forward frame, so it is stamped with d and s exchanged when vds < 0,
//                as BSIM4's b4acld.c does; the junctions cbd, cbs go between the physical
//                drain or source and the bulk. The gate overlaps, which ngspice does not
//                report, are left out, and said so.
//   BJT          gpi between b and e, gmu between b and c, go between c and e, and
//                gm·v(b,e) from c to e. The same derivation as for MOS makes the PNP stamps
//                those of the NPN. (Matches ngspice's bjtload.c, where go is the collector
//                conductance at constant v(b,e).) Capacitances: cpi b-e, cmu and cbx b-c,
//                csub from the collector (vertical, the NPN default or `subs=1`) or the base
//                (lateral, the PNP default or `subs=-1`) to the substrate terminal, ground
//                when the device has none (ngspice's bjtacld.c).
//   V            shorts: a branch row v(pos) - v(neg) = 0; one touching a probed net is that
//                net's probe (Port), through which its impedance is measured
//   I            open
//   E            branch row v(pos) - v(neg) = gain·v(cpos, cneg); G: gain·v(cpos, cneg) from pos to neg
//   F, H         through the branch current of the controlling voltage source
//
// Assumptions: the op data holds gm, gds, gmb (MOS) and gm, gpi, gmu, go (bipolar) per
// instance, multiplier included, as ngspice reports them (capacitances too); a transistor
// without them is a problem that makes the network unusable, named in `problems`.
//
// Left out: diodes (no conductance in the op data: left open, with a note); MOS junction
// and gate conductances, bipolar substrate junction conductance; devices with internal
// nodes from ohmic resistances (level 1-3 rd, rs, rsh with nrd/nrs; BSIM4 rdsmod,
// rgatemod, rbodymod; bipolar rb, re, rc), which are problems; BSIM non-quasi-static AC
// (acnqsmod) and bipolar excess phase (ptf), noted; resistor temperature coefficients;
// JFETs, behavioural sources, polynomial or expression-valued sources and other devices,
// which are problems.
#include "src/analyse/small_signal_network.hpp"

#include <array>
#include <cmath>
#include <map>
#include <numbers>

#include "parsers/common/text.hpp"
#include "src/model/op_point_build.hpp"

namespace mirrorcheck {

SmallSignalNetwork::SmallSignalNetwork(const std::vector<std::string>& nets) {
    for (const auto& net : nets)
        if (net != "0" && !node_index_.count(to_lower(net))) node_index_.emplace(to_lower(net), node_count_++);
}

long SmallSignalNetwork::node(std::string_view net) const {
    auto it = node_index_.find(to_lower(net));
    return it == node_index_.end() ? -1 : it->second;
}

Port SmallSignalNetwork::port(std::string_view net) const {
    auto it = probes_.find(to_lower(net));
    if (it != probes_.end()) return it->second;
    Port p;
    p.node = node(net);
    return p;
}

void SmallSignalNetwork::set_probe(const std::string& net, long branch, double sign, const std::string& source) {
    Port p;
    p.node = node(net);
    p.branch = branch;
    p.sign = sign;
    p.source = source;
    if (p.node >= 0) probes_.emplace(to_lower(net), p);
}

void SmallSignalNetwork::add(long row, long col, double g) {
    if (row >= 0 && col >= 0 && g != 0.0) g_.emplace_back(row, col, g);
}

void SmallSignalNetwork::add_storage(long row, long col, double c) {
    if (row >= 0 && col >= 0 && c != 0.0) {
        c_.emplace_back(row, col, c);
        has_storage = true;
    }
}

void SmallSignalNetwork::conductance(long a, long b, double g) {
    add(a, a, g);
    add(b, b, g);
    add(a, b, -g);
    add(b, a, -g);
}

void SmallSignalNetwork::capacitance(long a, long b, double c) {
    add_storage(a, a, c);
    add_storage(b, b, c);
    add_storage(a, b, -c);
    add_storage(b, a, -c);
}

void SmallSignalNetwork::vccs(long p, long n, long cp, long cn, double g) {
    add(p, cp, g);
    add(p, cn, -g);
    add(n, cp, -g);
    add(n, cn, g);
}

void SmallSignalNetwork::voltage_branch(long k, long p, long n) {
    add(p, k, 1.0);
    add(n, k, -1.0);
    add(k, p, 1.0);
    add(k, n, -1.0);
}

Eigen::SparseMatrix<double> SmallSignalNetwork::conductance_matrix(double gmin) const {
    std::vector<Eigen::Triplet<double>> t = g_;
    if (gmin > 0)
        for (long i = 0; i < node_count_; ++i) t.emplace_back(i, i, gmin);
    Eigen::SparseMatrix<double> a(size(), size());
    a.setFromTriplets(t.begin(), t.end());
    a.makeCompressed();
    return a;
}

Eigen::SparseMatrix<std::complex<double>> SmallSignalNetwork::admittance_matrix(double frequency, double gmin) const {
    using Complex = std::complex<double>;
    const double omega = 2 * std::numbers::pi * frequency;
    std::vector<Eigen::Triplet<Complex>> t;
    t.reserve(g_.size() + c_.size() + static_cast<std::size_t>(node_count_));
    for (const auto& e : g_) t.emplace_back(e.row(), e.col(), Complex(e.value(), 0.0));
    // Stamped even at zero frequency, so that every frequency gives one sparsity pattern.
    for (const auto& e : c_) t.emplace_back(e.row(), e.col(), Complex(0.0, omega * e.value()));
    if (gmin > 0)
        for (long i = 0; i < node_count_; ++i) t.emplace_back(i, i, Complex(gmin, 0.0));
    Eigen::SparseMatrix<Complex> a(size(), size());
    a.setFromTriplets(t.begin(), t.end());
    a.makeCompressed();
    return a;
}

namespace {

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

// Stamps one device after another into a network whose nets are already chosen.
class Stamper {
public:
    Stamper(SmallSignalNetwork& net, const Circuit& circuit, const OpPoint& op) : n_(net), circuit_(circuit), op_(op) {}

    // Voltage sources first, since F and H refer to their branches by name. A source
    // touching a probed net is left out.
    void voltage_sources(const std::vector<std::size_t>& devices, const std::set<std::string>& probed) {
        std::set<std::string> held;
        for (std::size_t i : devices) {
            const Device& d = circuit_.devices()[i];
            if (d.kind != DeviceKind::vsource) continue;
            long k = n_.add_branch();
            source_branch_[to_lower(d.name)] = k;
            n_.voltage_branch(k, at(d, "pos"), at(d, "neg"));
            for (const char* role : {"pos", "neg"}) {
                const Terminal* t = d.terminal(role);
                if (!t || !probed.count(to_lower(t->net))) continue;
                if (!held.insert(to_lower(t->net)).second) {
                    n_.notes.push_back("several voltage sources on " + to_lower(t->net) + "; the first is its probe");
                    continue;
                }
                n_.set_probe(to_lower(t->net), k, std::string(role) == "pos" ? 1.0 : -1.0, to_lower(d.name));
            }
        }
    }

    void others(const std::vector<std::size_t>& devices) {
        for (std::size_t i : devices) stamp(circuit_.devices()[i]);
        for (const auto& k : couplings_) coupling(*k);
        if (!diodes_.empty()) n_.notes.push_back("diode " + join(diodes_, ", ") + " left out (no op conductance)");
        if (!uncharged_.empty())
            n_.storage_left_out.push_back("no capacitances in the op data for " + join(uncharged_, ", ") +
                                          " (save them, e.g. `save" + uncharged_example_ + "`)");
        if (!overlaps_.empty())
            n_.storage_left_out.push_back("gate overlap capacitances of " + join(overlaps_, ", ") +
                                          " (BSIM: not in ngspice's op data)");
    }

private:
    long at(const Device& d, std::string_view role) const {
        const Terminal* t = d.terminal(role);
        return t ? n_.node(t->net) : -1;
    }

    static bool touches(const Device& d, const std::set<std::string>& nets) {
        for (const Terminal& t : d.terminals)
            if (nets.count(to_lower(t.net))) return true;
        return false;
    }

    void problem(const Device& d, const std::string& what) {
        n_.problems.push_back(std::string(to_string(d.kind)) + " " + d.name + " " + what);
    }

    void stamp(const Device& d) {
        switch (d.kind) {
            case DeviceKind::vsource:
            case DeviceKind::isource: break;
            case DeviceKind::coupling: couplings_.push_back(&d); break;
            case DeviceKind::resistor: resistor(d); break;
            case DeviceKind::capacitor: capacitor(d); break;
            case DeviceKind::inductor: inductor(d); break;
            case DeviceKind::vcvs:
            case DeviceKind::vccs: voltage_controlled(d); break;
            case DeviceKind::cccs:
            case DeviceKind::ccvs: current_controlled(d); break;
            case DeviceKind::diode: diodes_.push_back(d.name); break;
            case DeviceKind::mosfet:
            case DeviceKind::bjt: transistor(d); break;
            case DeviceKind::behavioural:
            case DeviceKind::jfet:
            case DeviceKind::other: problem(d, "has no linear model here"); break;
        }
    }

    void resistor(const Device& d) {
        if (!d.value || d.text.count("expression")) {
            n_.problems.push_back("resistor " + d.name + " has no fixed value");
            return;
        }
        if (*d.value == 0.0) {
            n_.voltage_branch(n_.add_branch(), at(d, "pos"), at(d, "neg"));
            return;
        }
        n_.conductance(at(d, "pos"), at(d, "neg"), d.parameter("m").value_or(1.0) / *d.value);
    }

    void capacitor(const Device& d) {
        // An open at DC whatever its value; at AC it needs one.
        if (!d.value || d.text.count("expression")) {
            n_.storage_left_out.push_back("capacitor " + d.name + " (no fixed value)");
            return;
        }
        n_.capacitance(at(d, "pos"), at(d, "neg"), d.parameter("m").value_or(1.0) * *d.value);
    }

    void inductor(const Device& d) {
        long k = n_.add_branch();
        n_.voltage_branch(k, at(d, "pos"), at(d, "neg"));
        inductor_branch_[to_lower(d.name)] = k;
        if (!d.value || d.text.count("expression")) {
            n_.storage_left_out.push_back("inductor " + d.name + " (no fixed value: a short at every frequency)");
            return;
        }
        double henries = *d.value / d.parameter("m").value_or(1.0);
        inductance_[to_lower(d.name)] = henries;
        n_.add_storage(k, k, -henries);
    }

    void coupling(const Device& k) {
        auto l1 = k.text.find("inductor1"), l2 = k.text.find("inductor2");
        if (!k.value || l1 == k.text.end() || l2 == k.text.end()) {
            n_.storage_left_out.push_back("coupling " + k.name + " (not a fixed coupling factor)");
            return;
        }
        auto b1 = inductor_branch_.find(to_lower(l1->second)), b2 = inductor_branch_.find(to_lower(l2->second));
        auto h1 = inductance_.find(to_lower(l1->second)), h2 = inductance_.find(to_lower(l2->second));
        if (b1 == inductor_branch_.end() || b2 == inductor_branch_.end() || h1 == inductance_.end() ||
            h2 == inductance_.end()) {
            n_.storage_left_out.push_back("coupling " + k.name + " (its inductors are not in the network)");
            return;
        }
        double mutual = *k.value * std::sqrt(h1->second * h2->second);
        n_.add_storage(b1->second, b2->second, -mutual);
        n_.add_storage(b2->second, b1->second, -mutual);
    }

    void voltage_controlled(const Device& d) {
        if (!d.value || !d.terminal("cpos") || !d.terminal("cneg")) {
            problem(d, "is not a linear gain");
            return;
        }
        double gain = *d.value;
        if (d.kind == DeviceKind::vccs) {
            n_.vccs(at(d, "pos"), at(d, "neg"), at(d, "cpos"), at(d, "cneg"), gain);
            return;
        }
        long k = n_.add_branch();
        n_.voltage_branch(k, at(d, "pos"), at(d, "neg"));
        n_.add(k, at(d, "cpos"), -gain);
        n_.add(k, at(d, "cneg"), gain);
    }

    void current_controlled(const Device& d) {
        auto control = d.text.find("control");
        if (!d.value || control == d.text.end()) {
            problem(d, "is not a linear gain");
            return;
        }
        auto src = source_branch_.find(to_lower(control->second));
        if (src == source_branch_.end()) {
            problem(d, "senses " + control->second + ", which is a probe or not a voltage source in the network");
            return;
        }
        double gain = *d.value;
        if (d.kind == DeviceKind::cccs) {
            n_.add(at(d, "pos"), src->second, gain);
            n_.add(at(d, "neg"), src->second, -gain);
            return;
        }
        long k = n_.add_branch();
        n_.voltage_branch(k, at(d, "pos"), at(d, "neg"));
        n_.add(k, src->second, -gain);
    }

    void transistor(const Device& d) {
        if (auto why = internal_nodes_reason(d); !why.empty()) {
            n_.problems.push_back(d.name + " has internal nodes (" + why + ")");
            return;
        }
        const DeviceOp* o = op_.device(d.name);
        std::vector<std::string> lacking;
        auto get = [&](const char* q) {
            std::optional<double> v = o ? o->get(q) : std::nullopt;
            if (!v) lacking.push_back(q);
            return v.value_or(0.0);
        };
        const bool mos = d.kind == DeviceKind::mosfet;
        if (mos) {
            double gm = get("gm"), gds = get("gds"), gmb = get("gmb");
            if (!lacking.empty()) {
                n_.problems.push_back(d.name + " lacks " + join(lacking, ", ") + " in the op data");
                return;
            }
            long dn = at(d, "d"), g = at(d, "g"), s = at(d, "s"), b = at(d, "b");
            const bool reversed = o->get("vds").value_or(0.0) < 0;
            long fd = reversed ? s : dn, fs = reversed ? dn : s;  // forward frame
            n_.conductance(fd, fs, gds);
            n_.vccs(fd, fs, g, fs, gm);
            if (d.terminal("b")) n_.vccs(fd, fs, b, fs, gmb);
        } else {
            double gm = get("gm"), gpi = get("gpi"), gmu = get("gmu"), go = get("go");
            if (!lacking.empty()) {
                n_.problems.push_back(d.name + " lacks " + join(lacking, ", ") + " in the op data");
                return;
            }
            long c = at(d, "c"), b = at(d, "b"), e = at(d, "e");
            n_.conductance(b, e, gpi);
            n_.conductance(b, c, gmu);
            n_.conductance(c, e, go);
            n_.vccs(c, e, b, e, gm);
        }
        ++n_.transistors;
        transistor_capacitances(d, *o);
    }

    // The capacitances of one transistor, as far as the op data has them.
    void transistor_capacitances(const Device& d, const DeviceOp& o) {
        const CapacitanceSet set = d.model ? capacitance_set(*d.model) : CapacitanceSet::none;
        if (set == CapacitanceSet::none) {
            n_.storage_left_out.push_back(d.name + " (capacitances of its model are not read)");
            return;
        }
        std::vector<std::string> absent;
        std::size_t present = 0;
        for (auto q : capacitance_quantities(set)) {
            if (o.get(q)) ++present;
            else absent.emplace_back(q);
        }
        if (present == 0) {
            if (uncharged_.empty())
                for (const auto& name : ngspice_save_names(d).optional) uncharged_example_ += " @" + d.name + "[" + name + "]";
            uncharged_.push_back(d.name);
            return;
        }
        ++n_.transistors_with_capacitances;
        if (!absent.empty()) n_.storage_left_out.push_back(d.name + " (" + join(absent, ", ") + " not in the op data)");
        auto c = [&](std::string_view q) { return o.get(q).value_or(0.0); };
        switch (set) {
            case CapacitanceSet::meyer: {
                long dn = at(d, "d"), g = at(d, "g"), s = at(d, "s"), b = at(d, "b");
                n_.capacitance(g, s, c("cgs"));
                n_.capacitance(g, dn, c("cgd"));
                n_.capacitance(g, b, c("cgb"));
                n_.capacitance(b, dn, c("cbd"));
                n_.capacitance(b, s, c("cbs"));
                break;
            }
            case CapacitanceSet::charge: charge_matrix(d, o, c); break;
            case CapacitanceSet::bipolar: {
                long col = at(d, "c"), b = at(d, "b"), e = at(d, "e"), sub = at(d, "s");
                n_.capacitance(b, e, c("cpi"));
                n_.capacitance(b, col, c("cmu") + c("cbx"));
                double subs = model_parameter(d, "subs");
                bool vertical = subs != 0 ? subs > 0 : d.model->type == "npn";
                n_.capacitance(vertical ? col : b, sub, c("csub"));
                if (model_parameter(d, "ptf") != 0)
                    n_.storage_left_out.push_back(d.name + " (excess phase ptf not modelled)");
                break;
            }
            case CapacitanceSet::none: break;
        }
    }

    template <typename Get>
    void charge_matrix(const Device& d, const DeviceOp& o, Get c) {
        long dn = at(d, "d"), g = at(d, "g"), s = at(d, "s"), b = at(d, "b");
        const bool reversed = o.get("vds").value_or(0.0) < 0;
        // Terminals g, d, s, b in the forward frame; rows and columns of C in that order.
        const std::array<long, 4> t = {g, reversed ? s : dn, reversed ? dn : s, b};
        std::array<std::array<double, 4>, 4> m{};
        const std::array<std::array<const char*, 3>, 3> names = {{{"cggb", "cgdb", "cgsb"},
                                                                  {"cdgb", "cddb", "cdsb"},
                                                                  {"cbgb", "cbdb", "cbsb"}}};
        const std::array<int, 3> row_of = {0, 1, 3};  // g, d, b
        for (int r = 0; r < 3; ++r)
            for (int col = 0; col < 3; ++col) m[row_of[r]][col] = c(names[r][col]);
        for (int col = 0; col < 3; ++col) m[2][col] = -(m[0][col] + m[1][col] + m[3][col]);  // source row
        for (int r = 0; r < 4; ++r) m[r][3] = -(m[r][0] + m[r][1] + m[r][2]);                 // bulk column
        for (int r = 0; r < 4; ++r)
            for (int col = 0; col < 4; ++col) n_.add_storage(t[r], t[col], m[r][col]);
        n_.capacitance(dn, b, c("cbd"));
        n_.capacitance(s, b, c("cbs"));
        overlaps_.push_back(d.name);
        if (model_parameter(d, "acnqsmod") != 0 || d.parameter("acnqsmod").value_or(0) != 0)
            n_.storage_left_out.push_back(d.name + " (acnqsmod not modelled)");
    }

    SmallSignalNetwork& n_;
    const Circuit& circuit_;
    const OpPoint& op_;
    std::map<std::string, long> source_branch_;
    std::map<std::string, long> inductor_branch_;
    std::map<std::string, double> inductance_;
    std::vector<const Device*> couplings_;
    std::vector<std::string> diodes_;
    std::vector<std::string> uncharged_;
    std::vector<std::string> overlaps_;
    std::string uncharged_example_;  // the save line for the first of them
};

// True for the terminals that only sense a voltage: MOS gate and bulk, bipolar base and substrate.
bool is_control_terminal(const Device& d, std::string_view role) {
    if (d.kind == DeviceKind::mosfet) return role != "d" && role != "s";
    if (d.kind == DeviceKind::bjt) return role != "c" && role != "e";
    return role.starts_with("cpos") || role.starts_with("cneg");
}

}  // namespace

SmallSignalNetwork build_circuit_network(const Circuit& circuit, const OpPoint& op, const std::set<std::string>& probed) {
    std::vector<std::string> nets;
    nets.reserve(circuit.nets().size());
    for (const Net& net : circuit.nets()) nets.push_back(net.name);
    SmallSignalNetwork network(nets);
    std::vector<std::size_t> all(circuit.devices().size());
    for (std::size_t i = 0; i < all.size(); ++i) all[i] = i;
    Stamper stamper(network, circuit, op);
    stamper.voltage_sources(all, probed);
    stamper.others(all);
    return network;
}

SmallSignalNetwork build_device_network(const Circuit& circuit, const OpPoint& op,
                                        const std::vector<std::size_t>& devices, const std::string& target) {
    // Nets reached by the current-carrying terminals of two or more of the devices.
    std::map<std::string, std::set<std::size_t>> reached;
    for (std::size_t i : devices) {
        const Device& d = circuit.devices()[i];
        for (const Terminal& t : d.terminals)
            if (!is_control_terminal(d, t.role)) reached[to_lower(t.net)].insert(i);
    }
    std::vector<std::string> nets = {to_lower(target)};
    for (const auto& [net, by] : reached)
        if (by.size() >= 2) nets.push_back(net);
    SmallSignalNetwork network(nets);
    Stamper stamper(network, circuit, op);
    stamper.voltage_sources(devices, {to_lower(target)});
    stamper.others(devices);
    return network;
}

}  // namespace mirrorcheck
