// The small-signal impedance at given nodes: at DC, against frequency, and its 3 dB corner.
//
// What it computes: for each target node, the impedance to ground that a test current
// source sees there, with every device replaced by its small-signal model at the operating
// point. At DC that is the value ngspice's `.tf` reports as the input impedance of the
// probe source; against frequency, -1/i(probe) of an AC analysis with the probe written
// `dc V ac 1`.
//
// Method: modified nodal analysis of the network built by small_signal_network.cpp
// (Y(s) = G + s·C). At DC, G is factorised once (Eigen::SparseLU) and solved once per
// target with 1 A injected into it; the node's voltage is the resistance. Against
// frequency, Y(jw) is factorised once per frequency and solved for every target
// (impedance_spectrum.cpp), which also finds the corner, |Z| = |Z(0)|/sqrt(2).
//
// Scope: the whole circuit when every device in it can be linearised. Otherwise (a
// transistor lacks gm, gds, gmb or gm, gpi, gmu, go; a behavioural source; internal
// nodes; ...) each target that comes with its own devices (the output stack of the mirror
// driving it and its degeneration resistors) is solved on those devices alone: the target
// and the nets joining two of them through drains, sources, collectors, emitters or
// resistor ends keep their voltages, every other net is AC ground, so gates and bases are
// held. That is exactly the output resistance by inspection assumes (HANDCALC.md, section
// 1: gate at AC ground, the stack below reflected), computed without its approximations;
// what the rest of the circuit adds (the reference's finite impedance at the gates, loads
// on the output) is not in it. The note says why the whole circuit was not solved.
//
// Assumptions:
//   - A target node held by a voltage source of the deck (its probe, e.g. `vout out 0 dc
//     1.2`) is measured through that source: the source's voltage is set to 1 and Z is 1
//     over the current it delivers, every other probe still holding its node. That is
//     what each probe's own `.tf` (and an AC run driving only that probe) reports, even
//     when outputs load each other. A target without such a source gets 1 A injected.
//   - When the DC matrix is singular (a node with no DC path to ground, e.g. a node only
//     between capacitors), 1e-12 S is added from every node to ground and the matrix is
//     factorised again: the default `gmin` of SPICE, which ngspice places across device
//     junctions and, with `.option rshunt`, from every node to ground. The note says so, and
//     the same shunt is kept at every frequency so that Z(0) is the DC value.
//   - The spectrum needs the device capacitances in the op data (saved with
//     `save @m1[cgs] ...`, see ngspice_save_names in op_point_build.hpp): when the network
//     has transistors and none of them has any, the spectrum and corner are absent; when
//     some lack some, they are computed without them and `spectrum_note` names them.
//
//   - Stamps the op data leaves open within a range (BSIM4 impact ionisation, whose slopes
//     depend on dVdsat/dV, see bulk_currents.cpp) are stamped at their estimate; the DC
//     resistance is also given at the two corners of those ranges that move it most, chosen by
//     the first-order sensitivity of the resistance to each (one transposed solve with the
//     same factorisation: dZ = -lambda^T dG x, G^T lambda = the output functional), then solved
//     exactly there: resistance_low, resistance_high.
//   - What concerns the circuit (a device that cannot be linearised, what was assumed or left
//     out, what was bounded) is said once, in LinearisedSolve::notes, with every device it
//     concerns; each output's own note only says how that output was measured.
//
// Left out: see small_signal_network.cpp (diodes, BSIM gate overlaps and tunnelling,
// non-quasi-static effects, excess phase, nonlinear sources).
#include "src/analyse/linearise.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <set>

#include <fmt/format.h>

#include "parsers/common/text.hpp"
#include "src/analyse/dc_solver.hpp"
#include "src/analyse/impedance_spectrum.hpp"
#include "src/analyse/small_signal_network.hpp"

namespace mirrorcheck {

namespace {

constexpr const char* whole_circuit = "whole circuit";
constexpr const char* mirror_devices_only = "mirror devices only";

std::string join(const std::vector<std::string>& parts, std::string_view sep) {
    std::string s;
    for (const auto& p : parts) {
        if (p.empty()) continue;
        if (!s.empty()) s += sep;
        s += p;
    }
    return s;
}

// Adds a note once: a note with the same text is not repeated (the fallback networks of
// several outputs may say the same).
void add_solve_note(LinearisedSolve& solve, const std::string& text, const std::string& cause,
                    const std::vector<std::string>& devices) {
    for (const auto& n : solve.notes)
        if (n.text == text) return;
    solve.notes.push_back({text, cause, devices});
}

void add_solve_note(LinearisedSolve& solve, const std::string& text) { add_solve_note(solve, text, text, {}); }

void add_solve_notes(LinearisedSolve& solve, const std::string& prefix, const std::vector<DeviceNote>& notes) {
    for (const auto& n : notes) add_solve_note(solve, prefix + n.text(), prefix + n.cause, n.devices);
}

// The circuit-level notes of a network that could be solved.
void note_network(LinearisedSolve& solve, const SmallSignalNetwork& network, const std::string& dc_note,
                  const std::string& prefix) {
    add_solve_notes(solve, prefix, network.notes);
    if (!dc_note.empty()) add_solve_note(solve, prefix + dc_note);
    std::vector<DeviceNote> bounded;
    std::set<std::string> seen;
    for (const auto& b : network.bounded)
        if (seen.insert(b.device).second)
            add_note(bounded,
                     "impact-ionisation slopes bounded (dVdsat/dVgs and dVdsat/dVds are not in the op data; the DC "
                     "resistance is given with the range they span)",
                     b.device);
    add_solve_notes(solve, prefix, bounded);
}

// Why the spectrum of this network cannot be given; empty when it can.
bool spectrum_unavailable(const SmallSignalNetwork& network) {
    return network.transistors > 0 && network.transistors_with_capacitances == 0;
}

// Fills spectrum, corner and spectrum_note of results solved on `network` at `nodes`.
void add_spectrum(const std::vector<LinearisedImpedance*>& results, const std::vector<Port>& nodes,
                  const SmallSignalNetwork& network, double gmin, const std::vector<double>& frequencies) {
    if (results.empty()) return;
    if (spectrum_unavailable(network)) {
        for (auto* r : results) r->spectrum_note = "no spectrum: the op data has no capacitances of the transistors";
        return;
    }
    std::vector<std::string> notes(results.size());

    auto z = compute_impedance_spectrum(network, nodes, frequencies, gmin);
    for (std::size_t f = 0; f < z.size(); ++f)
        for (std::size_t i = 0; i < results.size(); ++i) {
            const std::complex<double> zi = z[f][i];
            if (!std::isfinite(zi.real()) || !std::isfinite(zi.imag())) {
                notes[i] = join({notes[i], "singular at " + std::to_string(frequencies[f]) + " Hz (point left out)"}, "; ");
                continue;
            }
            results[i]->spectrum.push_back({std::abs(frequencies[f]), std::abs(zi), std::arg(zi) * 180.0 / std::numbers::pi});
        }

    if (!network.has_storage) {
        for (std::size_t i = 0; i < results.size(); ++i) {
            results[i]->spectrum_note = join({notes[i], "no capacitances: |Z| does not depend on frequency"}, "; ");
        }
        return;
    }
    std::vector<double> dc;
    std::vector<Port> corner_nodes;
    std::vector<std::size_t> corner_results;
    for (std::size_t i = 0; i < results.size(); ++i) {
        double m = std::abs(results[i]->resistance.value_or(0.0));
        if (m > 0 && std::isfinite(m)) {
            dc.push_back(m);
            corner_nodes.push_back(nodes[i]);
            corner_results.push_back(i);
        } else {
            notes[i] = join({notes[i], "no corner: zero impedance at DC"}, "; ");
        }
    }
    auto corners = find_corner_frequencies(network, corner_nodes, dc, gmin);
    for (std::size_t k = 0; k < corners.size(); ++k) {
        std::size_t i = corner_results[k];
        results[i]->corner_frequency = corners[k].frequency;
        if (!corners[k].note.empty()) notes[i] = join({notes[i], "no corner: " + corners[k].note}, "; ");
    }
    for (std::size_t i = 0; i < results.size(); ++i) results[i]->spectrum_note = notes[i];
}

// Above this many unknowns the whole-circuit network is solved part by part.
constexpr long split_above = 5000;

// The whole circuit, solved for every target at once. Returns why it could not be (empty
// when it could).
std::vector<DeviceNote> solve_whole_circuit(LinearisedSolve& solve, const Circuit& circuit, const OpPoint& op,
                                            const std::vector<double>& frequencies) {
    std::set<std::string> probed;
    for (const auto& r : solve.outputs) probed.insert(r.node);
    SmallSignalNetwork network = build_circuit_network(circuit, op, probed);
    if (!network.problems.empty()) return network.problems;

    // In a large network, each part that nothing joins to another (blocks between held
    // rails) is factorised and solved alone: one solve per output then costs its part, not
    // the whole circuit (10k transistors in 2,500 blocks: 2,500 solves of 20k unknowns
    // otherwise). A small one is solved whole, as splitting gains nothing there (and the
    // values stay those of one factorisation, to the last digit). One gmin for all: when a
    // part is singular, every part gets the shunt.
    SmallSignalNetwork::Split split;
    if (network.size() > split_above) split = network.split();
    if (split.parts.size() < 2) split = {};
    const std::vector<SmallSignalNetwork>& parts = split.parts;
    std::vector<const SmallSignalNetwork*> networks;
    if (parts.empty()) networks.push_back(&network);
    for (const auto& p : parts) networks.push_back(&p);
    // First every part factorised once, to know whether any needs the shunt, then each part
    // again to be solved: only one part's factorisation is held at a time.
    bool shunt = false;
    for (const SmallSignalNetwork* n : networks) {
        const DcSolver dc(*n);
        if (!dc.failure().empty()) return {{dc.failure(), {}}};
        shunt = shunt || dc.gmin() > 0;
    }

    std::vector<std::vector<LinearisedImpedance*>> targets(networks.size());
    for (auto& r : solve.outputs) {
        const Port whole = r.node == "0" ? Port{} : network.port(r.node);
        if (whole.node < 0) {
            r.note = r.node == "0" ? "the ground node has no impedance" : "no net " + r.node + " in the circuit";
            continue;
        }
        targets[parts.empty() ? 0 : split.part_of[static_cast<std::size_t>(whole.node)]].push_back(&r);
    }
    std::string shunt_note;
    for (std::size_t k = 0; k < networks.size(); ++k) {
        if (targets[k].empty() && !(shunt && shunt_note.empty())) continue;
        DcSolver dc(*networks[k], shunt);
        if (!dc.failure().empty()) return {{dc.failure(), {}}};
        if (shunt_note.empty()) shunt_note = dc.note();
        std::vector<LinearisedImpedance*> solved;
        std::vector<Port> nodes;
        for (LinearisedImpedance* r : targets[k]) {
            const Port port = networks[k]->port(r->node);
            solve_port(*r, dc, port);
            if (!r->resistance) {
                r->note = "the solve failed";
                continue;
            }
            if (port.branch >= 0) r->note = "held by " + port.source + ", the other outputs held by theirs";
            r->scope = whole_circuit;
            solved.push_back(r);
            nodes.push_back(port);
        }
        add_spectrum(solved, nodes, *networks[k], dc.gmin(), frequencies);
    }
    note_network(solve, network, shunt ? shunt_note : std::string(), "");
    add_solve_notes(solve, "against frequency, left out: ", network.storage_left_out);
    return {};
}

std::string device_list(const Circuit& circuit, const std::vector<std::size_t>& devices) {
    std::vector<std::string> names;
    for (std::size_t i : devices) names.push_back(circuit.devices()[i].name);
    return join(names, ", ");
}

// One target on its own devices, after the whole circuit could not be solved (`why`, a
// short summary; the whole reason is in the solve's notes).
void solve_own_devices(LinearisedSolve& solve, LinearisedImpedance& r, const LineariseTarget& target,
                       const Circuit& circuit, const OpPoint& op, const std::vector<double>& frequencies,
                       const std::string& why) {
    const std::string not_whole = "not linearised: " + why;
    if (target.own_devices.empty()) {
        r.note = not_whole;
        return;
    }
    for (std::size_t i : target.own_devices)
        if (i >= circuit.devices().size()) {
            r.note = not_whole + "; the mirror's own devices are not in the circuit";
            return;
        }
    if (r.node == "0" || !circuit.find_net(r.node)) {
        r.note = not_whole + (r.node == "0" ? "; the ground node has no impedance" : "; no net " + r.node + " in the circuit");
        return;
    }
    SmallSignalNetwork network = build_device_network(circuit, op, target.own_devices, r.node);
    if (!network.problems.empty()) {
        r.note = not_whole + "; nor on the mirror's own devices: " + describe(network.problems);
        return;
    }
    DcSolver dc(network);
    const Port k = network.port(r.node);
    if (dc.failure().empty()) solve_port(r, dc, k);
    if (!r.resistance) {
        r.note = not_whole + "; nor on the mirror's own devices: " + (dc.failure().empty() ? "the solve failed" : dc.failure());
        return;
    }
    r.scope = mirror_devices_only;
    r.note = "whole circuit not linearised (" + why + "); solved on the mirror's own devices " +
             device_list(circuit, target.own_devices) + ", every other net at AC ground";
    const std::string prefix = "mirror's own devices: ";
    note_network(solve, network, dc.note(), prefix);
    add_solve_notes(solve, prefix + "against frequency, left out: ", network.storage_left_out);
    add_spectrum({&r}, {k}, network, dc.gmin(), frequencies);
}

// The reasons the whole circuit was refused, short: each cause with a few devices.
std::string summary(const std::vector<DeviceNote>& problems) {
    if (problems.size() <= 2) return describe(problems);
    return fmt::format("{}; and {} more causes", describe({problems.begin(), problems.begin() + 2}), problems.size() - 2);
}

}  // namespace

LinearisedSolve compute_linearised_impedances(const Circuit& circuit, const OpPoint& op,
                                              const std::vector<LineariseTarget>& targets,
                                              const std::vector<double>& frequencies) {
    LinearisedSolve solve;
    for (const auto& t : targets) {
        LinearisedImpedance r;
        r.node = to_lower(t.node);
        solve.outputs.push_back(std::move(r));
    }
    if (targets.empty()) return solve;

    const std::vector<DeviceNote> problems = solve_whole_circuit(solve, circuit, op, frequencies);
    if (problems.empty()) return solve;
    add_solve_notes(solve, "whole circuit not linearised: ", problems);
    const std::string why = summary(problems);
    for (std::size_t i = 0; i < targets.size(); ++i)
        solve_own_devices(solve, solve.outputs[i], targets[i], circuit, op, frequencies, why);
    return solve;
}

LinearisedSolve compute_linearised_impedances(const Circuit& circuit, const OpPoint& op,
                                              const std::vector<std::string>& nodes) {
    std::vector<LineariseTarget> targets;
    for (const auto& node : nodes) targets.push_back({node, {}});
    return compute_linearised_impedances(circuit, op, targets, {});
}

}  // namespace mirrorcheck
