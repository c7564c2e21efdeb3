// Finding the simulated impedance at a node.
//
// Probes. A node's probe is, in order of preference:
//   1. the source named by `--probe NODE=SOURCE`;
//   2. the one voltage or current source on the node whose netlist line has an `ac` value
//      (several such sources make the choice ambiguous: none is taken, and the note asks
//      for --probe);
//   3. the one voltage source on the node without `ac` (it can still serve a `.tf`).
// A source "on the node" may also reach it through one capacitor, its other net touching
// nothing else (an AC-coupled probe, as `mirrorcheck prepare` writes: the capacitor is open
// at DC, so the probe cannot move the bias). A voltage source "holds" the node: the simulator then measures the impedance of
// everything else on the node, the way the linearised solve removes the probe. A current
// source "injects" into the node as it is.
//
// AC plots. ngspice's branch current i(V) flows into V's + node, through V, out of its -
// node; an independent current source drives its value from its + node through itself to
// its - node (ngspice manual, "Independent Sources"). So with N the probed node and T the
// source's other node:
//   held by V:     Z = (v(N) - v(T)) / I,  I = -i(V) when N is V's + node, +i(V) when it is its - node
//   injected by I: Z = (v(N) - v(T)) / I,  I = -A when N is the + node, +A when it is the - node,
//                  A the source's AC value: the plot's `@I[acmag]` (and `@I[acphase]`) when
//                  saved, else the netlist's `ac` value.
// A plot counts for a probe only when the probe is driven in it: its AC value saved in the
// plot (`@S[acmag]`) is not zero; without that vector, its netlist `ac` value is not zero;
// for a voltage source without either, v(N) - v(T) is not zero. This lets one raw file hold one AC run per output,
// each driving one probe (`alter`), and still pair every output with its own run. The
// point read is the lowest frequency, or the one nearest `--at`, which must lie within the
// sweep (usage.at-outside-sweep otherwise).
//
// TF plots (`.tf OUT SRC`): ngspice writes SRC#input_impedance (the impedance seen by the
// input source), V#output_impedance for a current output i(V), and
// output_impedance_at_v(N) for a voltage output. For a probe P, P#input_impedance or
// P#output_impedance is the value; output_impedance_at_v(N) is used only when no voltage
// source sits on N (otherwise it reads the source's zero impedance).
#include "src/analyse/simulated_impedance.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include <fmt/format.h>

#include "parsers/common/input_error.hpp"
#include "src/analyse/review_errors.hpp"
#include "parsers/common/text.hpp"

namespace mirrorcheck {
namespace {

using Values = std::vector<std::complex<double>>;

bool is_source(const Device& d) { return d.kind == DeviceKind::vsource || d.kind == DeviceKind::isource; }

// The source's terminal roles on `node`: "pos" or "neg", or empty when it is not on it.
std::string side_on(const Device& d, const std::string& node) {
    for (const char* role : {"pos", "neg"})
        if (const Terminal* t = d.terminal(role); t && to_lower(t->net) == node) return role;
    return {};
}

std::string other_net(const Device& d, const std::string& side) {
    const Terminal* t = d.terminal(side == "pos" ? "neg" : "pos");
    return t ? to_lower(t->net) : std::string("0");
}

struct Probe {
    const Device* device = nullptr;
    std::string side;                 // the source's terminal on the node (or on the coupling net)
    const Device* coupling = nullptr; // the capacitor between the source and the node, if any
    std::string note;                 // why there is none
};

// The sources on `node`: directly, or through one capacitor whose other net holds only
// that capacitor and the source.
std::vector<Probe> sources_on(const Circuit& circuit, const std::string& node) {
    std::vector<Probe> found;
    const Net* net = circuit.find_net(node);
    if (!net) return found;
    for (const TerminalRef& t : net->terminals) {
        const Device& d = circuit.devices()[t.device];
        if (is_source(d)) {
            found.push_back({&d, side_on(d, node), nullptr, {}});
            continue;
        }
        if (d.kind != DeviceKind::capacitor) continue;
        const std::string far = other_net(d, d.terminals[t.terminal].role);
        const Net* coupled = circuit.find_net(far);
        if (!coupled || coupled->terminals.size() != 2 || far == "0") continue;
        for (const TerminalRef& u : coupled->terminals) {
            const Device& s = circuit.devices()[u.device];
            if (&s != &d && is_source(s)) found.push_back({&s, side_on(s, far), &d, {}});
        }
    }
    return found;
}

Probe choose_probe(const Circuit& circuit, const std::string& node, const SimulatedOptions& options) {
    const std::vector<Probe> on_node = sources_on(circuit, node);
    for (const auto& choice : options.probes) {
        if (to_lower(choice.node) != node) continue;
        const Device* d = circuit.find_device(choice.source);
        if (!d || !is_source(*d)) throw errors::probe_not_a_source(choice.node, choice.source);
        for (const Probe& p : on_node)
            if (p.device == d) return p;
        throw errors::probe_not_on_node(choice.node, d->name);
    }
    std::vector<Probe> with_ac, voltage_sources;
    for (const Probe& p : on_node) {
        if (p.device->parameters.count("acmag")) with_ac.push_back(p);
        else if (p.device->kind == DeviceKind::vsource && !p.coupling) voltage_sources.push_back(p);
    }
    auto names = [](const std::vector<Probe>& ps) {
        std::string s;
        for (const Probe& p : ps) s += (s.empty() ? "" : ", ") + p.device->name;
        return s;
    };
    if (with_ac.size() == 1) return with_ac[0];
    if (with_ac.size() > 1)
        return {nullptr, {}, nullptr,
                fmt::format("not simulated: several sources with `ac` on {} ({}); name the probe with --probe {}=SOURCE",
                            node, names(with_ac), node)};
    if (voltage_sources.size() == 1) return voltage_sources[0];
    if (voltage_sources.size() > 1)
        return {nullptr, {}, nullptr,
                fmt::format("not simulated: several voltage sources on {} ({}); name the probe with --probe {}=SOURCE",
                            node, names(voltage_sources), node)};
    return {nullptr, {}, nullptr,
            fmt::format("not simulated: no probe source on {} (a voltage source with `ac 1` holding it, or an "
                        "AC current source into it)",
                        node)};
}

// v(net) at point k; ground is 0; absent when the plot lacks the vector.
std::optional<std::complex<double>> voltage(const SimulationPlot& plot, const std::string& net, std::size_t k) {
    if (net == "0") return std::complex<double>(0.0);
    const Values* v = plot.find(net);
    if (!v || k >= v->size()) return std::nullopt;
    return (*v)[k];
}

std::size_t chosen_point(const SimulationPlot& plot, const SimulatedOptions& options) {
    std::size_t best = 0;
    for (std::size_t k = 1; k < plot.frequencies.size(); ++k) {
        if (options.at && *options.at > 0) {
            auto distance = [&](double f) { return f > 0 ? std::abs(std::log(f / *options.at)) : HUGE_VAL; };
            if (distance(plot.frequencies[k]) < distance(plot.frequencies[best])) best = k;
        } else if (plot.frequencies[k] < plot.frequencies[best]) {
            best = k;
        }
    }
    return best;
}

// The AC current the probe drives into the node, or absent when the plot lacks it.
std::optional<std::complex<double>> injected_current(const SimulationPlot& plot, const Device& probe,
                                                     const std::string& side, std::size_t k) {
    std::complex<double> value;
    if (probe.kind == DeviceKind::vsource) {
        const Values* i = plot.find("i(" + probe.name + ")");
        if (!i || k >= i->size()) return std::nullopt;
        value = (*i)[k];
        return side == "pos" ? -value : value;
    }
    const Values* mag = plot.find("@" + probe.name + "[acmag]");
    const Values* phase = plot.find("@" + probe.name + "[acphase]");
    double m = mag && k < mag->size() ? (*mag)[k].real() : probe.parameter("acmag").value_or(0.0);
    double ph = phase && k < phase->size() ? (*phase)[k].real() : probe.parameter("acphase").value_or(0.0);
    value = std::polar(m, ph * std::numbers::pi / 180.0);
    return side == "pos" ? -value : value;
}

std::string fmt_frequency(double f) { return fmt::format("{:g} Hz", f); }

// Whether the probe drives this plot (see the file comment).
bool driven(const SimulationPlot& plot, const Probe& p, std::size_t k, std::complex<double> across) {
    if (const Values* mag = plot.find("@" + p.device->name + "[acmag]"); mag && k < mag->size())
        return (*mag)[k] != 0.0;
    if (auto netlist = p.device->parameter("acmag")) return *netlist != 0.0;
    return p.device->kind == DeviceKind::vsource && !p.coupling && std::abs(across) > 0;
}

void read_ac(const SimulationPlot& plot, const Probe& p, const std::string& node, const SimulatedOptions& options,
             SimulatedImpedance& out, std::vector<std::string>& skipped) {
    const Device& probe = *p.device;
    const std::string& side = p.side;
    const std::size_t k = chosen_point(plot, options);
    const std::string other = other_net(probe, side);
    auto vn = voltage(plot, node, k), vt = voltage(plot, other, k);
    auto current = injected_current(plot, probe, side, k);
    if (!vn || !vt || !current) {
        skipped.push_back(fmt::format("{} lacks v({}){} or the probe current", plot.origin, node,
                                      other == "0" ? "" : ", v(" + other + ")"));
        return;
    }
    const std::complex<double> across = *vn - *vt;
    if (!driven(plot, p, k, across)) return;  // another output's run
    if (std::abs(*current) == 0) {
        skipped.push_back(fmt::format("{}: no current through {}", plot.origin, probe.name));
        return;
    }
    const std::complex<double> z = across / *current;
    SimulatedValue v;
    v.magnitude = std::abs(z);
    v.phase_degrees = std::arg(z) * 180.0 / std::numbers::pi;
    v.frequency = plot.frequencies.empty() ? 0.0 : plot.frequencies[k];
    const std::string dv = other == "0" ? fmt::format("v({})", node) : fmt::format("(v({}) - v({}))", node, other);
    const std::string di = fmt::format("{}{}({}){}", side == "pos" ? "(-" : "",
                                       probe.kind == DeviceKind::vsource ? "i" : "ac", probe.name,
                                       side == "pos" ? ")" : "");
    v.source = fmt::format("{}, {}/{} at {}", plot.origin, dv, di, fmt_frequency(*v.frequency));
    if (options.at && std::abs(std::log(*v.frequency / *options.at)) > 0.01)
        v.source += fmt::format(" (nearest point to {})", fmt_frequency(*options.at));
    out.values.push_back(v);
}

bool voltage_source_on(const Circuit& circuit, const std::string& node) {
    for (const Probe& p : sources_on(circuit, node))
        if (p.device->kind == DeviceKind::vsource && !p.coupling) return true;
    return false;
}

void read_tf(const Circuit& circuit, const SimulationPlot& plot, const Probe& p, const std::string& node,
             SimulatedImpedance& out) {
    const Device& probe = *p.device;
    std::vector<std::string> names;
    if (!p.coupling) names = {probe.name + "#input_impedance", probe.name + "#output_impedance"};  // open at DC
    if (probe.kind == DeviceKind::isource || !voltage_source_on(circuit, node))
        names.push_back("output_impedance_at_v(" + node + ")");
    for (const auto& name : names) {
        const Values* v = plot.find(name);
        if (!v || v->empty()) continue;
        SimulatedValue value;
        value.magnitude = std::abs((*v)[0].real());
        value.source = fmt::format("{}, {}", plot.origin, name);
        out.values.push_back(value);
        return;
    }
}

// --at must lie within every AC plot's sweep: a point read far outside it would be quietly
// another frequency's value.
void require_within_sweeps(const std::vector<SimulationPlot>& plots, double at) {
    for (const auto& plot : plots) {
        if (plot.kind != "ac" || plot.frequencies.empty()) continue;
        const auto [lo, hi] = std::minmax_element(plot.frequencies.begin(), plot.frequencies.end());
        if (!(at >= *lo * (1 - 1e-9) && at <= *hi * (1 + 1e-9))) throw errors::at_outside_sweep(at, plot.origin, *lo, *hi);
    }
}

}  // namespace

const Device* netlist_probe(const Circuit& circuit, const std::string& node) {
    return choose_probe(circuit, to_lower(node), SimulatedOptions{}).device;
}

std::vector<SimulatedImpedance> find_simulated_impedances(const Circuit& circuit,
                                                          const std::vector<SimulationPlot>& plots,
                                                          const std::vector<std::string>& nodes,
                                                          const SimulatedOptions& options) {
    if (options.at) require_within_sweeps(plots, *options.at);
    std::vector<SimulatedImpedance> out;
    for (const auto& asked : nodes) {
        SimulatedImpedance r;
        r.node = to_lower(asked);
        Probe probe = choose_probe(circuit, r.node, options);
        if (!probe.device) {
            r.note = probe.note;
            out.push_back(std::move(r));
            continue;
        }
        r.probe = probe.device->name;
        r.probe_mode = probe.device->kind == DeviceKind::vsource ? "held" : "injected";
        if (probe.coupling) r.note = fmt::format("AC-coupled through {}", probe.coupling->name);
        std::vector<std::string> skipped;
        std::size_t ac_found = 0;
        for (const auto& plot : plots) {
            if (plot.kind != "ac") continue;
            std::size_t before = r.values.size();
            read_ac(plot, probe, r.node, options, r, skipped);
            ac_found += r.values.size() - before;
        }
        if (ac_found > 1) {
            r.values.resize(1);
            r.note = fmt::format("{} drives {} in more than one AC plot; the first is used", r.probe, r.node);
        }
        for (const auto& plot : plots)
            if (plot.kind == "tf") read_tf(circuit, plot, probe, r.node, r);
        if (r.values.empty()) {
            if (plots.empty()) r.note = "not simulated: no AC or .tf results were given";
            else if (!skipped.empty()) r.note = "not simulated: " + skipped.front();
            else
                r.note = fmt::format("not simulated: probe {} is not driven in any AC plot, and no .tf names it",
                                     r.probe);
        }
        out.push_back(std::move(r));
    }
    return out;
}

}  // namespace mirrorcheck
