// Reconciliation of the three resistance values of each output.
//
// Pairs compared, each against the tolerance (relative, default 10 %, common practice, no
// source):
//   inspection vs linearised   the hand formula's error: what it neglects (a load on the
//                              output, a device out of saturation, an approximation, a gate
//                              or base that is not AC ground)
//   linearised vs simulated    what the op data does not capture: frequency, a parameter
//                              missing or misread, an op that differs from the AC run's, a
//                              probe elsewhere than the mirror output
//   inspection vs simulated    reported only when there is no linearised value (otherwise
//                              the two pairs above already explain it)
// The first cause whose evidence is present is named; the checks run from the most
// specific evidence to the least. Severity: a disagreement with a named, benign cause
// (frequency, a known neglected effect) is a warning; linearised vs simulated without a
// cause is an error, because then the simulation and its own op data tell different stories
// and neither can be signed off.
#include "src/analyse/reconcile.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "parsers/common/text.hpp"
#include "parsers/common/si_format.hpp"

namespace mirrorcheck {
namespace {

// An AC point whose phase exceeds this is not a DC value (tan 10° = 0.18: the reactive part
// is a fifth of the resistive one). Common practice, no source.
constexpr double dc_phase_limit_degrees = 10.0;

std::string ohms(double r) { return format_si(r, "Ω"); }

// How a value stands against a reference: "12 % above", "8 % below", "163 times", "1/40 of".
std::string relation(double difference) {
    if (difference > 1.0) return fmt::format("{:.3g} times", difference + 1.0);
    if (difference < -0.5) return fmt::format("1/{:.3g} of", 1.0 / (difference + 1.0));
    return fmt::format("{:.0f} % {}", 100.0 * std::abs(difference), difference >= 0 ? "above" : "below");
}

std::string join(const std::vector<std::string>& parts) {
    std::string s;
    for (std::size_t k = 0; k < parts.size(); ++k) s += (k == 0 ? "" : k + 1 == parts.size() ? " and " : ", ") + parts[k];
    return s;
}

ResistanceComparison compare(std::string pair, double first, double second, double tolerance) {
    ResistanceComparison c{std::move(pair), first, second, 0.0, true};
    c.difference = second != 0 ? first / second - 1.0 : HUGE_VAL;
    c.agrees = std::isfinite(c.difference) && std::abs(c.difference) <= tolerance;
    return c;
}

// Everything else that draws current from the output node at DC: devices other than the
// stack's top device, its probe sources and capacitors (open at DC), and not through a MOS
// gate or bulk (no DC current).
std::vector<std::string> loads_on(const Circuit& circuit, const MirrorOutput& o) {
    std::vector<std::string> loads;
    const Net* net = circuit.find_net(o.node);
    if (!net) return loads;
    for (const TerminalRef& t : net->terminals) {
        if (!o.devices.empty() && t.device == o.devices.back()) continue;
        const Device& d = circuit.devices()[t.device];
        if (d.kind == DeviceKind::vsource || d.kind == DeviceKind::isource || d.kind == DeviceKind::capacitor) continue;
        const std::string& role = d.terminals[t.terminal].role;
        if (d.kind == DeviceKind::mosfet && (role == "g" || role == "b")) continue;
        if (std::find(loads.begin(), loads.end(), d.name) == loads.end()) loads.push_back(d.name);
    }
    return loads;
}

// The first device of the reference or the output that does not act as a current source.
const DeviceRegion* collapsed_device(const MirrorInspection& mi, const OutputInspection& oi) {
    for (const auto* list : {&oi.devices, &mi.reference})
        for (const DeviceRegion& r : *list)
            if (!r.current_source) return &r;
    return nullptr;
}

std::vector<std::string> without_body(const OutputInspection& oi, const ReconcileOptions& options) {
    std::vector<std::string> names;
    for (const DeviceRegion& r : oi.devices)
        for (const auto& n : options.gmb_assumed_zero)
            if (iequals(n, r.name)) names.push_back(r.name);
    return names;
}

struct Context {
    const Circuit& circuit;
    const Mirror& mirror;
    const MirrorOutput& output;
    const MirrorInspection& mi;
    const OutputInspection& oi;
    const ReconcileOptions& options;
    std::vector<Finding>& findings;

    void add(Severity severity, const std::string& code, const std::string& message) const {
        findings.push_back(make_finding(severity, code, mirror.id, output.node, message));
    }
};

// Why inspection and the linearised solve differ, as the end of a sentence.
std::pair<Severity, std::string> formula_cause(const Context& c, const ResistanceComparison& cmp) {
    const RoutEstimate& best = c.oi.best();
    if (!std::isfinite(cmp.first))
        return {Severity::warning,
                "the formula is unbounded because a device reports gds = 0 (no channel-length modulation in its "
                "model), while the solve is bounded by the rest of the circuit or by gmin; use a model with it"};
    if (const DeviceRegion* d = collapsed_device(c.mi, c.oi))
        return {Severity::warning,
                fmt::format("{} is in {}, so the small-signal values the formula combines no longer describe a "
                            "current source; fix its margin first",
                            d->name, to_string(d->region))};
    if (auto loads = loads_on(c.circuit, c.output); !loads.empty() && cmp.first > cmp.second)
        return {Severity::warning,
                fmt::format("the output is loaded: {} also connect{} to {}, and the solve sees {} in parallel with "
                            "the mirror while the formula does not",
                            join(loads), loads.size() == 1 ? "s" : "", c.output.node,
                            loads.size() == 1 ? "it" : "them")};
    if (!best.exact)
        return {Severity::warning, fmt::format("the {} formula is an approximation ({})", best.method, best.note)};
    for (std::size_t k = 1; k < c.oi.levels.size(); ++k) {
        const RoutLevel& l = c.oi.levels[k];
        if (l.gm * l.ro < low_intrinsic_gain)
            return {Severity::warning,
                    fmt::format("{} has an intrinsic gain gm·ro of only {:.3g}, where the formula's neglected terms "
                                "matter",
                                l.name, l.gm * l.ro)};
    }
    return {Severity::warning,
            "a gate or base the formula takes as AC ground is not (a bias fed through a resistor or from a "
            "high-impedance node), or a device the recognition did not count sits in the path"};
}

// Why a computed value (inspection or linearised) and the simulated one differ.
std::pair<Severity, std::string> simulation_cause(const Context& c, const SimulatedValue& sim, double computed,
                                                  const LinearisedImpedance* lin) {
    if (sim.frequency && std::abs(sim.phase_degrees) > dc_phase_limit_degrees)
        return {Severity::warning,
                fmt::format("the AC value at {:g} Hz is not a DC value (phase {:.0f}°): capacitances already "
                            "shunt the output; read the AC plot at a lower frequency (--at)",
                            *sim.frequency, sim.phase_degrees)};
    if (auto names = without_body(c.oi, c.options); !names.empty() && sim.magnitude > computed)
        return {Severity::warning,
                fmt::format("body effect is neglected: the op data has no gmb for {} (taken as 0) while the "
                            "simulator includes it; save @{}[gmbs] to include it",
                            join(names), names.front())};
    if (const DeviceRegion* d = collapsed_device(c.mi, c.oi))
        return {Severity::warning,
                fmt::format("{} is in {}, where a small change of bias (the AC run's op against the op file's) "
                            "moves its ro a lot",
                            d->name, to_string(d->region))};
    if (lin && lin->scope == "mirror devices only")
        return {Severity::warning,
                "the linearised value covers only the mirror's own devices (the op data lacks parameters elsewhere), "
                "while the simulation has the whole circuit: loads and a reference that is not AC ground count there"};
    return {Severity::error,
            "the op data does not describe the simulated circuit: a parameter missing or misread, an operating "
            "point that differs between the op run and the AC run, or a probe on another node than the mirror "
            "output"};
}

void reconcile_output(const Context& c, const LinearisedImpedance* lin, const SimulatedImpedance* sim,
                      OutputReconciliation& out) {
    const double tol = c.options.tolerance;
    const RoutEstimate& best = c.oi.best();
    const std::optional<double> inspection = best.value > 0 ? std::optional<double>(best.value) : std::nullopt;
    const std::optional<double> linearised = lin ? lin->resistance : std::nullopt;
    const SimulatedValue* simulated = sim ? sim->best() : nullptr;

    if (!linearised && lin)
        c.add(Severity::warning, "not-linearised",
              fmt::format("The output at {} was not solved exactly: {}.", c.output.node, lin->note));
    if (linearised && lin->scope == "mirror devices only")
        c.add(Severity::info, "not-linearised",
              fmt::format("The output at {} was solved on the mirror's own devices only, not the whole circuit: {}.",
                          c.output.node, lin->note));
    if (!simulated && sim && c.options.simulation_given)
        c.add(Severity::warning, "not-simulated", fmt::format("The output at {} is {}.", c.output.node, sim->note));

    if (inspection && linearised) {
        auto cmp = compare("inspection-vs-linearised", *inspection, *linearised, tol);
        out.comparisons.push_back(cmp);
        if (!cmp.agrees) {
            auto [severity, cause] = formula_cause(c, cmp);
            c.add(severity, cmp.pair,
                  fmt::format("Rout at {} by inspection ({}) is {} the linearised solve's {}, beyond the {:.0f} % "
                              "tolerance: {}.",
                              c.output.node, ohms(cmp.first), relation(cmp.difference), ohms(cmp.second), 100 * tol,
                              cause));
        }
    }
    if (linearised && simulated) {
        auto cmp = compare("linearised-vs-simulated", *linearised, simulated->magnitude, tol);
        out.comparisons.push_back(cmp);
        if (!cmp.agrees) {
            auto [severity, cause] = simulation_cause(c, *simulated, *linearised, lin);
            c.add(severity, cmp.pair,
                  fmt::format("Rout at {} from the linearised solve ({}) is {} the simulated {} ({}): {}.",
                              c.output.node, ohms(cmp.first), relation(cmp.difference), ohms(cmp.second),
                              simulated->source, cause));
        }
    }
    if (inspection && simulated) {
        auto cmp = compare("inspection-vs-simulated", *inspection, simulated->magnitude, tol);
        out.comparisons.push_back(cmp);
        if (!cmp.agrees && !linearised) {
            auto [severity, cause] = simulation_cause(c, *simulated, *inspection, nullptr);
            if (severity == Severity::error) severity = Severity::warning;  // the formula may be the one at fault
            c.add(severity, cmp.pair,
                  fmt::format("Rout at {} by inspection ({}) is {} the simulated {} ({}), and no linearised "
                              "value can tell which is off: {}.",
                              c.output.node, ohms(cmp.first), relation(cmp.difference), ohms(cmp.second),
                              simulated->source, cause));
        }
    }
}

template <typename T>
const T* at_node(const std::vector<T>& values, const std::string& node) {
    for (const auto& v : values)
        if (v.node == to_lower(node)) return &v;
    return nullptr;
}

}  // namespace

Reconciliation reconcile_resistances(const Circuit& circuit, const std::vector<Mirror>& mirrors,
                                     const InspectionResult& inspection,
                                     const std::vector<LinearisedImpedance>& linearised,
                                     const std::vector<SimulatedImpedance>& simulated,
                                     const ReconcileOptions& options) {
    Reconciliation result;
    for (std::size_t k = 0; k < mirrors.size() && k < inspection.mirrors.size(); ++k) {
        const Mirror& m = mirrors[k];
        const MirrorInspection& mi = inspection.mirrors[k];
        for (std::size_t j = 0; j < m.outputs.size() && j < mi.outputs.size(); ++j) {
            OutputReconciliation out{m.id, m.outputs[j].node, {}};
            Context c{circuit, m, m.outputs[j], mi, mi.outputs[j], options, result.findings};
            reconcile_output(c, at_node(linearised, out.node), at_node(simulated, out.node), out);
            result.outputs.push_back(std::move(out));
        }
    }
    return result;
}

}  // namespace mirrorcheck
