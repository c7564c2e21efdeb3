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
//                source the same, between the channel's internal nodes (d', g', s', b') when the
//                model has series, gate or body resistances (src/model/device_parasitics.hpp:
//                level 1-3 rd, rs and rsh·nrd/nrs; BSIM3 rsh·nrd/nrs; BSIM4 rsh·nrd/nrs and
//                rdsmod, rgatemod 1-3, rbodymod 1-2 with its five body resistors, as b4acld.c). This holds for PMOS too with op_point.hpp's positive
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
//                drain or source and the bulk (the drain and source body nodes with rbodymod).
//                The gate overlaps, which ngspice does not report, are left out, and said so.
//                Junction conductances gbd, gbs (d'-b', s'-b', or d'-db, s'-sb with rbodymod;
//                ngspice adds gmin to them) when the op data has them, else left out with a
//                note. BSIM4 impact ionisation and GIDL/GISL (bulk_currents.cpp): the current
//                into b' from the forward-frame drain (GISL from the source), with the slopes
//                the op data leaves open stamped at their estimate and kept as bounded stamps.
//                BSIM4 rdsmod = 1: the bias-dependent series conductances Rd(V), Rs(V) and their
//                slopes, from the model card and the op data (device_parasitics.hpp).
//   BJT          gpi between b and e, gmu between b and c, go between c and e, and
//                gm·v(b,e) from c to e, on the internal nodes b', c', e' when the model has rb,
//                rc, re: gx (the op data's, else area/rb or the irb law of bjtload.c) from b
//                to b', area/rc from c to c', area/re from e to e' (all times m). The same derivation as for MOS makes the PNP stamps
//                those of the NPN. (Matches ngspice's bjtload.c, where go is the collector
//                conductance at constant v(b,e).) Capacitances: cpi b-e, cmu and cbx b-c,
//                csub from the collector (vertical, the NPN default or `subs=1`) or the base
//                (lateral, the PNP default or `subs=-1`) to the substrate terminal, ground
//                when the device has none (ngspice's bjtacld.c); cbx from the external base.
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
// Left out: diodes (no conductance in the op data: left open, with a note); BSIM4 gate
// tunnelling (igcmod, igbmod) and BSIM3 impact ionisation, noted; the bipolar substrate
// junction conductance (ngspice's AC leaves it out too); BSIM non-quasi-static AC (acnqsmod)
// and bipolar excess phase (ptf), noted; resistor temperature coefficients; what
// device_parasitics.cpp cannot model (rgeomod without nrd/nrs, bipolar rco, BSIM3 acmmod),
// JFETs, behavioural sources, polynomial or expression-valued sources and other devices,
// which are problems.
#include "src/analyse/small_signal_network.hpp"

#include <array>
#include <cmath>
#include <map>
#include <numbers>
#include <optional>
#include <tuple>

#include <fmt/format.h>

#include "parsers/common/text.hpp"
#include "src/analyse/bulk_currents.hpp"
#include "src/model/device_parasitics.hpp"
#include "src/model/op_point_build.hpp"

namespace mirrorcheck {

std::string DeviceNote::text() const {
    if (devices.empty()) return cause;
    if (devices.size() == 1) return cause + ": " + devices.front();
    std::string few;
    for (std::size_t k = 0; k < devices.size() && k < 4; ++k) few += (k ? ", " : "") + devices[k];
    if (devices.size() > 4) few += fmt::format(" and {} more", devices.size() - 4);
    return fmt::format("{}: {} devices ({})", cause, devices.size(), few);
}

void add_note(std::vector<DeviceNote>& notes, const std::string& cause, const std::string& device) {
    for (auto& n : notes)
        if (n.cause == cause) {
            if (!device.empty()) n.devices.push_back(device);
            return;
        }
    notes.push_back({cause, device.empty() ? std::vector<std::string>{} : std::vector<std::string>{device}});
}

std::string describe(const std::vector<DeviceNote>& notes) {
    std::string s;
    for (const auto& n : notes) s += (s.empty() ? "" : "; ") + n.text();
    return s;
}

SmallSignalNetwork::SmallSignalNetwork(const std::vector<std::string>& nets) {
    for (const auto& net : nets)
        if (net != "0" && !node_index_.count(to_lower(net))) node_index_.emplace(to_lower(net), node_count_++);
}

long SmallSignalNetwork::add_node(const std::string& name) {
    auto [it, inserted] = node_index_.try_emplace(to_lower(name), node_count_);
    if (inserted) ++node_count_;
    return it->second;
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

SmallSignalNetwork::Split SmallSignalNetwork::split() const {
    const std::size_t n = static_cast<std::size_t>(size());
    std::vector<std::size_t> parent(n);
    for (std::size_t i = 0; i < n; ++i) parent[i] = i;
    auto root = [&](std::size_t i) {
        while (parent[i] != i) i = parent[i] = parent[parent[i]];
        return i;
    };
    auto join = [&](const Eigen::Triplet<double>& t) {
        const std::size_t a = root(static_cast<std::size_t>(t.row())), b = root(static_cast<std::size_t>(t.col()));
        if (a != b) parent[std::max(a, b)] = std::min(a, b);
    };
    for (const auto& t : g_) join(t);
    for (const auto& t : c_) join(t);
    for (const auto& b : bounded)
        for (const auto& end : b.ends)
            for (const auto& t : end) join(t);

    Split out;
    out.part_of.resize(n);
    std::vector<long> local(n);
    std::vector<std::size_t> index(n, n);  // a root's part
    for (std::size_t i = 0; i < n; ++i) {
        std::size_t& k = index[root(i)];
        if (k == n) {
            k = out.parts.size();
            out.parts.emplace_back(std::vector<std::string>{});
            out.parts.back().has_storage = has_storage;
            out.parts.back().transistors = transistors;
            out.parts.back().transistors_with_capacitances = transistors_with_capacitances;
        }
        SmallSignalNetwork& p = out.parts[k];
        out.part_of[i] = k;
        local[i] = p.node_count_ + p.branch_count_;
        if (static_cast<long>(i) < node_count_) ++p.node_count_;
        else ++p.branch_count_;
    }
    for (const auto& [net, u] : node_index_)
        out.parts[out.part_of[static_cast<std::size_t>(u)]].node_index_.emplace(net, local[static_cast<std::size_t>(u)]);
    for (const auto& [net, port] : probes_) {
        Port q = port;
        q.node = local[static_cast<std::size_t>(port.node)];
        if (port.branch >= 0) q.branch = local[static_cast<std::size_t>(port.branch)];
        out.parts[out.part_of[static_cast<std::size_t>(port.node)]].probes_.emplace(net, q);
    }
    auto moved = [&](const Eigen::Triplet<double>& t) {
        return Eigen::Triplet<double>(local[static_cast<std::size_t>(t.row())], local[static_cast<std::size_t>(t.col())],
                                      t.value());
    };
    for (const auto& t : g_) out.parts[out.part_of[static_cast<std::size_t>(t.row())]].g_.push_back(moved(t));
    for (const auto& t : c_) out.parts[out.part_of[static_cast<std::size_t>(t.row())]].c_.push_back(moved(t));
    for (const auto& b : bounded) {
        const Eigen::Triplet<double>* first = !b.ends[0].empty() ? &b.ends[0].front() : !b.ends[1].empty() ? &b.ends[1].front() : nullptr;
        if (!first) continue;
        BoundedStamp q{b.device, b.quantity, {}};
        for (std::size_t e = 0; e < 2; ++e)
            for (const auto& t : b.ends[e]) q.ends[e].push_back(moved(t));
        out.parts[out.part_of[static_cast<std::size_t>(first->row())]].bounded.push_back(std::move(q));
    }
    return out;
}

Eigen::SparseMatrix<double> SmallSignalNetwork::conductance_matrix(double gmin, const std::vector<int>* ends) const {
    std::vector<Eigen::Triplet<double>> t = g_;
    if (ends)
        for (std::size_t k = 0; k < bounded.size() && k < ends->size(); ++k)
            if ((*ends)[k] >= 0) {
                const auto& change = bounded_change(k, (*ends)[k]);
                t.insert(t.end(), change.begin(), change.end());
            }
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

bool is_bsim4_device(const Device& d) {
    return d.model && (d.model->level == 14 || d.model->level == 54) &&
           (d.model->type == "nmos" || d.model->type == "pmos");
}

std::string join(const std::vector<std::string>& parts, std::string_view sep) {
    std::string s;
    for (const auto& p : parts) {
        if (!s.empty()) s += sep;
        s += p;
    }
    return s;
}

// The nodes a transistor's stamps go between: its terminals' nets, or the internal nodes
// its parasitics put behind them.
struct MosNodes {
    long d = -1, g = -1, s = -1, b = -1;        // the terminals
    long dp = -1, gp = -1, gm = -1, sp = -1;    // channel side of drain, gate (and mid gate), source
    long bp = -1, db = -1, sb = -1;             // body: the channel's, the drain and source junctions'
};

struct BjtNodes {
    long c = -1, b = -1, e = -1, s = -1;  // terminals (s: substrate)
    long cp = -1, bp = -1, ep = -1;       // internal
};

// Stamps one device after another into a network whose nets are already chosen.
class Stamper {
public:
    Stamper(SmallSignalNetwork& net, const Circuit& circuit, const OpPoint& op) : n_(net), circuit_(circuit), op_(op) {}

    // The internal nodes of every transistor among `devices`, before any branch is made.
    void internal_nodes(const std::vector<std::size_t>& devices) {
        for (std::size_t i : devices) {
            const Device& d = circuit_.devices()[i];
            if (d.kind != DeviceKind::mosfet && d.kind != DeviceKind::bjt) continue;
            DeviceParasitics p = find_device_parasitics(d);
            auto add = [&](InternalNode node) { n_.add_node(internal_node_name(d, node)); };
            if (p.drain) add(InternalNode::drain);
            if (p.source) add(InternalNode::source);
            if (p.gate.mode != 0) add(InternalNode::gate);
            if (p.gate.mode == 3) add(InternalNode::mid_gate);
            if (p.body) {
                add(InternalNode::body);
                add(InternalNode::drain_body);
                add(InternalNode::source_body);
            }
            if (p.collector) add(InternalNode::collector);
            if (p.has_base_resistance) add(InternalNode::base);
            if (p.emitter) add(InternalNode::emitter);
            parasitics_.emplace(d.name, std::move(p));
        }
    }

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
                    add_note(n_.notes, "several voltage sources on " + to_lower(t->net) + "; the first is its probe", "");
                    continue;
                }
                n_.set_probe(to_lower(t->net), k, std::string(role) == "pos" ? 1.0 : -1.0, to_lower(d.name));
            }
        }
    }

    void others(const std::vector<std::size_t>& devices) {
        for (std::size_t i : devices) stamp(circuit_.devices()[i]);
        for (const auto& k : couplings_) coupling(*k);
        for (const auto& [cause, device] : storage_notes_) add_note(n_.storage_left_out, cause, device);
    }

private:
    long at(const Device& d, std::string_view role) const {
        const Terminal* t = d.terminal(role);
        return t ? n_.node(t->net) : -1;
    }

    long internal(const Device& d, InternalNode node) const { return n_.node(internal_node_name(d, node)); }

    void problem(const Device& d, const std::string& cause) { add_note(n_.problems, cause, d.name); }

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
            case DeviceKind::diode: add_note(n_.notes, "diodes left out (no op conductance)", d.name); break;
            case DeviceKind::mosfet:
            case DeviceKind::bjt: transistor(d); break;
            case DeviceKind::behavioural: problem(d, "behavioural sources have no linear model here"); break;
            case DeviceKind::jfet: problem(d, "JFETs have no linear model here"); break;
            case DeviceKind::other: problem(d, "devices of this kind have no linear model here"); break;
        }
    }

    void resistor(const Device& d) {
        if (!d.value || d.text.count("expression")) {
            problem(d, "resistors without a fixed value");
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
            storage_notes_.emplace_back("capacitors without a fixed value", d.name);
            return;
        }
        n_.capacitance(at(d, "pos"), at(d, "neg"), d.parameter("m").value_or(1.0) * *d.value);
    }

    void inductor(const Device& d) {
        long k = n_.add_branch();
        n_.voltage_branch(k, at(d, "pos"), at(d, "neg"));
        inductor_branch_[to_lower(d.name)] = k;
        if (!d.value || d.text.count("expression")) {
            storage_notes_.emplace_back("inductors without a fixed value (a short at every frequency)", d.name);
            return;
        }
        double henries = *d.value / d.parameter("m").value_or(1.0);
        inductance_[to_lower(d.name)] = henries;
        n_.add_storage(k, k, -henries);
    }

    void coupling(const Device& k) {
        auto l1 = k.text.find("inductor1"), l2 = k.text.find("inductor2");
        if (!k.value || l1 == k.text.end() || l2 == k.text.end()) {
            add_note(n_.storage_left_out, "couplings without a fixed coupling factor", k.name);
            return;
        }
        auto b1 = inductor_branch_.find(to_lower(l1->second)), b2 = inductor_branch_.find(to_lower(l2->second));
        auto h1 = inductance_.find(to_lower(l1->second)), h2 = inductance_.find(to_lower(l2->second));
        if (b1 == inductor_branch_.end() || b2 == inductor_branch_.end() || h1 == inductance_.end() ||
            h2 == inductance_.end()) {
            add_note(n_.storage_left_out, "couplings whose inductors are not in the network", k.name);
            return;
        }
        double mutual = *k.value * std::sqrt(h1->second * h2->second);
        n_.add_storage(b1->second, b2->second, -mutual);
        n_.add_storage(b2->second, b1->second, -mutual);
    }

    void voltage_controlled(const Device& d) {
        if (!d.value || !d.terminal("cpos") || !d.terminal("cneg")) {
            problem(d, "controlled sources that are not a linear gain");
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
            problem(d, "controlled sources that are not a linear gain");
            return;
        }
        auto src = source_branch_.find(to_lower(control->second));
        if (src == source_branch_.end()) {
            problem(d, "current-controlled sources that sense a probe or something that is not a voltage source in "
                       "the network");
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
        auto found = parasitics_.find(d.name);
        const DeviceParasitics par = found != parasitics_.end() ? found->second : find_device_parasitics(d);
        if (!par.problems.empty()) {
            for (const auto& p : par.problems) problem(d, "internal nodes not modelled: " + p);
            return;
        }
        const DeviceOp* o = op_.device(d.name);
        std::vector<std::string> lacking;
        auto get = [&](const char* q) {
            std::optional<double> v = o ? o->get(q) : std::nullopt;
            if (!v) lacking.push_back(q);
            return v.value_or(0.0);
        };
        if (d.kind == DeviceKind::mosfet) {
            const double gm = get("gm"), gds = get("gds"), gmb = get("gmb");
            if (!lacking.empty()) {
                problem(d, join(lacking, ", ") + " not in the op data");
                return;
            }
            if (!mos(d, *o, par, gm, gds, gmb)) return;
        } else {
            const double gm = get("gm"), gpi = get("gpi"), gmu = get("gmu"), go = get("go");
            if (!lacking.empty()) {
                problem(d, join(lacking, ", ") + " not in the op data");
                return;
            }
            if (!bipolar(d, *o, par, gm, gpi, gmu, go)) return;
        }
        for (const auto& note : par.notes) add_note(n_.notes, note, "");
        ++n_.transistors;
        transistor_capacitances(d, *o);
    }

    MosNodes mos_nodes(const Device& d, const DeviceParasitics& par) const {
        MosNodes k;
        k.d = at(d, "d");
        k.g = at(d, "g");
        k.s = at(d, "s");
        k.b = at(d, "b");
        k.dp = par.drain ? internal(d, InternalNode::drain) : k.d;
        k.sp = par.source ? internal(d, InternalNode::source) : k.s;
        k.gp = par.gate.mode != 0 ? internal(d, InternalNode::gate) : k.g;
        k.gm = par.gate.mode == 3 ? internal(d, InternalNode::mid_gate) : k.gp;
        k.bp = par.body ? internal(d, InternalNode::body) : k.b;
        k.db = par.body ? internal(d, InternalNode::drain_body) : k.bp;
        k.sb = par.body ? internal(d, InternalNode::source_body) : k.bp;
        return k;
    }

    bool mos(const Device& d, const DeviceOp& o, const DeviceParasitics& par, double gm, double gds, double gmb) {
        const MosNodes k = mos_nodes(d, par);
        // Series resistances.
        if (par.series_bias_dependent) {
            auto vgs = o.get("vgs"), vds = o.get("vds"), vbs = o.get("vbs"), id = o.get("id");
            if (!vgs || !vds || !vbs || !id) {
                problem(d, "rdsmod = 1 (bias-dependent Rd, Rs) without vgs, vds, vbs, id in the op data");
                return false;
            }
            const BiasDependentSeries series = bsim4_bias_dependent_series(d, par, *vgs, *vds, *vbs, *id);
            for (const auto& note : series.notes) add_note(n_.notes, note, "");
            for (auto [slopes, outside, inside] : {std::tuple{&series.drain, k.d, k.dp}, std::tuple{&series.source, k.s, k.sp}})
                if (*slopes) {
                    n_.conductance(outside, inside, (*slopes)->conductance);
                    n_.vccs(outside, inside, k.gp, inside, (*slopes)->by_gate);
                    n_.vccs(outside, inside, k.bp, inside, (*slopes)->by_body);
                }
        } else {
            if (par.drain) n_.conductance(k.d, k.dp, *par.drain);
            if (par.source) n_.conductance(k.s, k.sp, *par.source);
        }
        gate(d, o, par, k);
        if (par.body) {
            const BodyNetwork& b = *par.body;
            n_.conductance(k.bp, k.db, b.rbpd);
            n_.conductance(k.bp, k.sb, b.rbps);
            n_.conductance(k.bp, k.b, b.rbpb);
            n_.conductance(k.db, k.b, b.rbdb);
            n_.conductance(k.sb, k.b, b.rbsb);
        }
        // The channel, in the forward frame.
        const bool reversed = o.get("vds").value_or(0.0) < 0;
        const long fd = reversed ? k.sp : k.dp, fs = reversed ? k.dp : k.sp;
        n_.conductance(fd, fs, gds);
        n_.vccs(fd, fs, k.gp, fs, gm);
        if (d.terminal("b")) n_.vccs(fd, fs, k.bp, fs, gmb);
        junctions(d, o, k);
        if (d.terminal("b") && is_bsim4_device(d)) bulk_currents(d, o, k, fd, fs);
        if (is_bsim4_device(d) && (model_parameter(d, "igcmod") != 0 || model_parameter(d, "igbmod") != 0))
            add_note(n_.notes, "gate tunnelling conductances left out (igcmod, igbmod)", d.name);
        if ((d.model && (d.model->level == 8 || d.model->level == 49)) &&
            (model_parameter(d, "alpha0") != 0 || model_parameter(d, "alpha1") != 0))
            add_note(n_.notes, "BSIM3 impact-ionisation conductances left out", d.name);
        return true;
    }

    void gate(const Device& d, const DeviceOp& o, const DeviceParasitics& par, const MosNodes& k) {
        if (par.gate.mode == 0) return;
        // Without gate current (no tunnelling) no DC current flows through the gate resistance, so
        // at DC its value does not matter; against frequency it does.
        std::optional<double> gcrg = o.get("gcrg");
        if (par.gate.mode >= 2 && !gcrg) {
            gcrg = par.gate.electrode;
            storage_notes_.emplace_back("intrinsic gate resistance not in the op data, taken as the electrode's (save "
                                        "@<device>[gcrg])",
                                        d.name);
        }
        switch (par.gate.mode) {
            case 1: n_.conductance(k.g, k.gp, par.gate.electrode); break;
            case 2: n_.conductance(k.g, k.gp, *gcrg); break;
            case 3:
                n_.conductance(k.g, k.gm, par.gate.electrode);
                n_.conductance(k.gm, k.gp, *gcrg);
                break;
            default: break;
        }
    }

    void junctions(const Device& d, const DeviceOp& o, const MosNodes& k) {
        if (!d.terminal("b")) return;
        auto gbd = o.get("gbd"), gbs = o.get("gbs");
        if (gbd) n_.conductance(k.dp, k.db, *gbd);
        if (gbs) n_.conductance(k.sp, k.sb, *gbs);
        if (!gbd || !gbs)
            add_note(n_.notes,
                     "junction conductances gbd, gbs left out, not in the op data (ngspice puts at least gmin "
                     "there; save @<device>[gbd] @<device>[gbs])",
                     d.name);
    }

    void stamp_bulk(long from, long to, long gate, long body, long reference, const BulkSlopes& s) {
        n_.vccs(from, to, from, reference, s.d);
        n_.vccs(from, to, gate, reference, s.g);
        n_.vccs(from, to, body, reference, s.b);
    }

    static void stamp_bulk_into(std::vector<Eigen::Triplet<double>>& t, long from, long to, long gate, long body,
                                long reference, const BulkSlopes& s) {
        auto vccs = [&](long cp, long cn, double g) {
            auto add = [&](long r, long c, double v) {
                if (r >= 0 && c >= 0 && v != 0.0) t.emplace_back(r, c, v);
            };
            add(from, cp, g);
            add(from, cn, -g);
            add(to, cp, -g);
            add(to, cn, g);
        };
        vccs(from, reference, s.d);
        vccs(gate, reference, s.g);
        vccs(body, reference, s.b);
    }

    void bulk_currents(const Device& d, const DeviceOp& o, const MosNodes& k, long fd, long fs) {
        BulkCurrents bulk = find_bulk_currents(d, o);
        for (const auto& note : bulk.notes) add_note(n_.notes, note, "");
        if (bulk.impact) {
            const ImpactIonisation& i = *bulk.impact;
            stamp_bulk(fd, k.bp, k.gp, k.bp, fs, i.estimate);
            for (auto [quantity, range] : {std::pair{"dVdsat/dVgs", &i.gate_slope_range},
                                           std::pair{"dVdsat/dVds", &i.drain_slope_range}}) {
                BoundedStamp b{d.name, quantity, {}};
                for (std::size_t end = 0; end < 2; ++end)
                    stamp_bulk_into(b.ends[end], fd, k.bp, k.gp, k.bp, fs, (*range)[end]);
                n_.bounded.push_back(std::move(b));
            }
            add_note(n_.notes,
                     i.from_op_data ? "impact-ionisation conductances from the op data's isub"
                                    : "impact-ionisation conductances from isub computed from the model card (save "
                                      "@<device>[isub] to use ngspice's)",
                     d.name);
        }
        if (bulk.leakage) {
            stamp_bulk(k.dp, k.bp, k.gp, k.bp, k.sp, bulk.leakage->drain);
            stamp_bulk(k.sp, k.bp, k.gp, k.bp, k.dp, bulk.leakage->source);
        }
    }

    std::optional<double> base_conductance(const Device& d, const DeviceOp& o, const DeviceParasitics& par) {
        if (auto gx = o.get("gx")) return gx;
        if (par.base_linear) return par.base_linear;
        if (par.base_from_current)
            if (auto ib = o.get("ib")) return bipolar_base_conductance(d, *ib);
        return std::nullopt;
    }

    bool bipolar(const Device& d, const DeviceOp& o, const DeviceParasitics& par, double gm, double gpi, double gmu,
                 double go) {
        BjtNodes k;
        k.c = at(d, "c");
        k.b = at(d, "b");
        k.e = at(d, "e");
        k.cp = par.collector ? internal(d, InternalNode::collector) : k.c;
        k.bp = par.has_base_resistance ? internal(d, InternalNode::base) : k.b;
        k.ep = par.emitter ? internal(d, InternalNode::emitter) : k.e;
        if (par.has_base_resistance) {
            auto gx = base_conductance(d, o, par);
            if (!gx) {
                problem(d, "bias-dependent base resistances (rbm != rb) without gx in the op data (save "
                           "@<device>[gx])");
                return false;
            }
            n_.conductance(k.b, k.bp, *gx);
        }
        if (par.collector) n_.conductance(k.c, k.cp, *par.collector);
        if (par.emitter) n_.conductance(k.e, k.ep, *par.emitter);
        n_.conductance(k.bp, k.ep, gpi);
        n_.conductance(k.bp, k.cp, gmu);
        n_.conductance(k.cp, k.ep, go);
        n_.vccs(k.cp, k.ep, k.bp, k.ep, gm);
        return true;
    }

    // The capacitances of one transistor, as far as the op data has them.
    void transistor_capacitances(const Device& d, const DeviceOp& o) {
        const CapacitanceSet set = d.model ? capacitance_set(*d.model) : CapacitanceSet::none;
        if (set == CapacitanceSet::none) {
            storage_notes_.emplace_back("capacitances of their models are not read", d.name);
            return;
        }
        std::vector<std::string> absent;
        std::size_t present = 0;
        for (auto q : capacitance_quantities(set)) {
            if (o.get(q)) ++present;
            else absent.emplace_back(q);
        }
        if (present == 0) {
            if (uncharged_example_.empty())
                for (const auto& name : ngspice_save_names(d).capacitances) uncharged_example_ += " @" + d.name + "[" + name + "]";
            storage_notes_.emplace_back("no capacitances in the op data (save them, e.g. `save" + uncharged_example_ + "`)",
                                        d.name);
            return;
        }
        ++n_.transistors_with_capacitances;
        if (!absent.empty()) storage_notes_.emplace_back(join(absent, ", ") + " not in the op data", d.name);
        auto c = [&](std::string_view q) { return o.get(q).value_or(0.0); };
        const auto found = parasitics_.find(d.name);
        const DeviceParasitics par = found != parasitics_.end() ? found->second : DeviceParasitics{};
        switch (set) {
            case CapacitanceSet::meyer: {
                const MosNodes k = mos_nodes(d, par);
                n_.capacitance(k.gp, k.sp, c("cgs"));
                n_.capacitance(k.gp, k.dp, c("cgd"));
                n_.capacitance(k.gp, k.bp, c("cgb"));
                n_.capacitance(k.bp, k.dp, c("cbd"));
                n_.capacitance(k.bp, k.sp, c("cbs"));
                break;
            }
            case CapacitanceSet::charge: charge_matrix(d, o, mos_nodes(d, par), c); break;
            case CapacitanceSet::bipolar: {
                const long col = par.collector ? internal(d, InternalNode::collector) : at(d, "c");
                const long b = par.has_base_resistance ? internal(d, InternalNode::base) : at(d, "b");
                const long e = par.emitter ? internal(d, InternalNode::emitter) : at(d, "e");
                const long sub = at(d, "s");
                n_.capacitance(b, e, c("cpi"));
                n_.capacitance(b, col, c("cmu"));
                n_.capacitance(at(d, "b"), col, c("cbx"));
                double subs = model_parameter(d, "subs");
                bool vertical = subs != 0 ? subs > 0 : d.model->type == "npn";
                n_.capacitance(vertical ? col : b, sub, c("csub"));
                if (model_parameter(d, "ptf") != 0) storage_notes_.emplace_back("excess phase ptf not modelled", d.name);
                break;
            }
            case CapacitanceSet::none: break;
        }
    }

    template <typename Get>
    void charge_matrix(const Device& d, const DeviceOp& o, const MosNodes& k, Get c) {
        const bool reversed = o.get("vds").value_or(0.0) < 0;
        // Terminals g, d, s, b in the forward frame; rows and columns of C in that order.
        const std::array<long, 4> t = {k.gp, reversed ? k.sp : k.dp, reversed ? k.dp : k.sp, k.bp};
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
        n_.capacitance(k.dp, k.db, c("cbd"));
        n_.capacitance(k.sp, k.sb, c("cbs"));
        storage_notes_.emplace_back("gate overlap capacitances (BSIM: not in ngspice's op data)", d.name);
        if (model_parameter(d, "acnqsmod") != 0 || d.parameter("acnqsmod").value_or(0) != 0)
            storage_notes_.emplace_back("acnqsmod not modelled", d.name);
    }

    SmallSignalNetwork& n_;
    const Circuit& circuit_;
    const OpPoint& op_;
    std::map<std::string, DeviceParasitics> parasitics_;
    std::map<std::string, long> source_branch_;
    std::map<std::string, long> inductor_branch_;
    std::map<std::string, double> inductance_;
    std::vector<const Device*> couplings_;
    std::vector<std::pair<std::string, std::string>> storage_notes_;  // cause, device, in order
    std::string uncharged_example_;  // the save line for the first device without capacitances
};

}  // namespace

bool is_control_terminal(const Device& d, std::string_view role) {
    if (d.kind == DeviceKind::mosfet) return role != "d" && role != "s";
    if (d.kind == DeviceKind::bjt) return role != "c" && role != "e";
    return role.starts_with("cpos") || role.starts_with("cneg");
}

SmallSignalNetwork build_circuit_network(const Circuit& circuit, const OpPoint& op, const std::set<std::string>& probed) {
    std::vector<std::string> nets;
    nets.reserve(circuit.nets().size());
    for (const Net& net : circuit.nets()) nets.push_back(net.name);
    SmallSignalNetwork network(nets);
    std::vector<std::size_t> all(circuit.devices().size());
    for (std::size_t i = 0; i < all.size(); ++i) all[i] = i;
    Stamper stamper(network, circuit, op);
    stamper.internal_nodes(all);
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
        if (by.size() >= 2 && net != nets.front()) nets.push_back(net);
    return build_device_network(circuit, op, devices, nets);
}

SmallSignalNetwork build_device_network(const Circuit& circuit, const OpPoint& op,
                                        const std::vector<std::size_t>& devices,
                                        const std::vector<std::string>& kept) {
    std::vector<std::string> nets;
    for (const auto& n : kept) nets.push_back(to_lower(n));
    SmallSignalNetwork network(nets);
    Stamper stamper(network, circuit, op);
    stamper.internal_nodes(devices);
    stamper.voltage_sources(devices, {nets.begin(), nets.end()});
    stamper.others(devices);
    return network;
}

}  // namespace mirrorcheck
