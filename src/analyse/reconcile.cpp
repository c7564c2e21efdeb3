// Reconciliation of the resistance values of each output.
//
// Two quantities are told apart (own_resistance.cpp, linearise.cpp): the mirror's own
// output resistance (the mirror alone, solved exactly: what the hand formula describes)
// and the impedance of the node in the circuit (linearised whole circuit; simulated).
// Pairs compared, each against the tolerance (relative, default 10 %, common practice, no
// source):
//   inspection vs own          the hand formula's error: what it neglects (a device out of
//                              saturation, an approximation, a gate or base that is not AC
//                              ground); a warning
//   own vs simulated alone     the exact solve of the mirror alone against ngspice's run of
//                              the testbench of the mirror alone (alone_deck.cpp): the same
//                              network at the same op, so a disagreement is one of the
//                              causes of linearised vs simulated below
//   inspection vs simulated    only when there is no exact solve of the mirror alone: as
//     alone                    inspection vs own
//   own vs linearised          what the circuit adds at the node: a load (the node's
//                              impedance below the mirror's own) or feedback (above it, or
//                              negative); information, not a defect. A warning only against
//                              a floor the user sets (--min-impedance)
//   linearised vs simulated    what the op data does not capture: frequency, a parameter
//                              missing or misread, an op that differs from the AC run's, a
//                              probe elsewhere than the mirror output
//   inspection vs simulated    reported only when there is no linearised value (otherwise
//                              the pairs above already explain it); a node the netlist shows
//                              loaded is then information too
// The first cause whose evidence is present is named; the checks run from the most
// specific evidence to the least. A finding carries its cause as a record (CauseCode and
// values); the sentences are in the catalogue (finding.cpp). Severity: a disagreement with a
// named, benign cause (frequency, a known neglected effect) is a warning; linearised vs
// simulated without a cause is an error, because then the simulation and its own op data
// tell different stories and neither can be signed off.
#include "src/analyse/reconcile.hpp"

#include <algorithm>
#include <cmath>

#include "parsers/common/text.hpp"
#include "src/analyse/by_output.hpp"

namespace mirrorcheck {
namespace {

// An AC point whose phase exceeds this is not a DC value (tan 10° = 0.18: the reactive part
// is a fifth of the resistive one). Common practice, no source.
constexpr double dc_phase_limit_degrees = 10.0;

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

    void add(FindingCode code, Severity severity, std::vector<FindingValue> values,
             std::optional<Cause> cause = std::nullopt) const {
        values.insert(values.begin(), FindingValue::words("node", output.node));
        Finding f = make_finding(code, severity, mirror.id, output.node, std::move(values));
        f.cause = std::move(cause);
        findings.push_back(std::move(f));
    }
};

using V = FindingValue;

Cause cause(CauseCode code, std::vector<FindingValue> values = {}) { return Cause{code, std::move(values)}; }

// Why inspection and the linearised solve differ.
Cause formula_cause(const Context& c, const ResistanceComparison& cmp) {
    const RoutEstimate& best = c.oi.best();
    if (!std::isfinite(cmp.first)) return cause(CauseCode::unbounded_formula);
    if (const DeviceRegion* d = collapsed_device(c.mi, c.oi))
        return cause(CauseCode::collapsed_device,
                     {V::names("device", {d->name}), V::words("region", std::string(to_string(d->region)))});
    if (!best.exact)
        return cause(CauseCode::approximate_formula, {V::words("method", best.method), V::words("note", best.note)});
    for (std::size_t k = 1; k < c.oi.levels.size(); ++k) {
        const RoutLevel& l = c.oi.levels[k];
        if (l.gm * l.ro < low_intrinsic_gain)
            return cause(CauseCode::low_gain_in_stack,
                         {V::names("device", {l.name}), V::of("gain", l.gm * l.ro, Unit::none)});
    }
    return cause(CauseCode::gate_not_ac_ground);
}

// Why a computed value (the linearised one when `lin` is given, else inspection's) and the
// simulated one differ, with the severity the cause deserves: a benign cause is a warning;
// none is an error.
std::pair<Severity, Cause> simulation_cause(const Context& c, const SimulatedValue& sim, double computed,
                                            const LinearisedImpedance* lin) {
    if (sim.frequency && std::abs(sim.phase_degrees) > dc_phase_limit_degrees)
        return {Severity::warning, cause(CauseCode::not_dc_value, {V::of("frequency", *sim.frequency, Unit::hertz),
                                                                   V::of("phase", sim.phase_degrees, Unit::degree)})};
    if (auto names = without_body(c.oi, c.options); !names.empty() && sim.magnitude > computed)
        return {Severity::warning, cause(CauseCode::body_effect_neglected,
                                         {V::names("devices", names), V::names("first", {names.front()})})};
    if (const DeviceRegion* d = collapsed_device(c.mi, c.oi))
        return {Severity::warning,
                cause(CauseCode::collapsed_device,
                      {V::names("device", {d->name}), V::words("region", std::string(to_string(d->region)))})};
    if (lin && lin->scope == "mirror devices only") return {Severity::warning, cause(CauseCode::mirror_devices_only)};
    return {Severity::error, cause(CauseCode::data_mismatch)};
}

// The node's impedance against the mirror's own: loading and feedback are information; a
// floor the user set is checked. True when the node was reported as loaded or fed back.
bool compare_own_and_node(const Context& c, double own, const char* own_from, double node, const char* node_from) {
    const double tol = c.options.tolerance;
    const auto loads = loads_on(c.circuit, c.output);
    std::vector<FindingValue> values = {V::of("in_circuit", node, Unit::ohm), V::of("own", own, Unit::ohm),
                                        V::words("own_from", own_from)};
    const bool loaded = node < own * (1 - tol) && node > 0, fed_back = node > own * (1 + tol) || node <= 0;
    if (loaded) {
        if (!loads.empty()) values.push_back(V::names("loads", loads));
        c.add(FindingCode::loaded_output, Severity::info, std::move(values));
    } else if (fed_back) {
        c.add(FindingCode::feedback_at_output, Severity::info, std::move(values));
    }
    if (auto limit = c.options.min_impedance_at(c.output.node); limit && node < *limit) {
        std::vector<FindingValue> v = {V::of("impedance", node, Unit::ohm), V::words("source", node_from),
                                       V::of("limit", *limit, Unit::ohm)};
        if (!loads.empty()) v.push_back(V::names("loads", loads));
        c.add(FindingCode::low_node_impedance, Severity::warning, std::move(v));
    }
    return loaded || fed_back;
}

void reconcile_output(const Context& c, const OwnResistance* own_solve, const SimulatedOwn* own_sim,
                      const LinearisedImpedance* lin, const SimulatedImpedance* sim, OutputReconciliation& out) {
    const double tol = c.options.tolerance;
    const RoutEstimate& best = c.oi.best();
    const std::optional<double> inspection = best.value > 0 ? std::optional<double>(best.value) : std::nullopt;
    const std::optional<double> own = own_solve ? own_solve->value.resistance : std::nullopt;
    const std::optional<double> linearised = lin ? lin->resistance : std::nullopt;
    const SimulatedValue* simulated = sim ? sim->best() : nullptr;
    const FindingValue tolerance = V::of("tolerance", tol, Unit::percent);

    if (!linearised && lin)
        c.add(FindingCode::not_linearised, Severity::warning,
              {V::words("how", "not solved exactly"), V::words("note", lin->note)});
    if (linearised && lin->scope == "mirror devices only")
        c.add(FindingCode::not_linearised, Severity::info,
              {V::words("how", "solved on the mirror's own devices only, not the whole circuit"),
               V::words("note", lin->note)});
    if (!own && own_solve && !own_solve->value.note.empty())
        c.add(FindingCode::not_linearised, Severity::warning,
              {V::words("how", "not solved as a mirror alone"), V::words("note", own_solve->value.note)});
    if (!simulated && sim && c.options.simulation_given)
        c.add(FindingCode::not_simulated, Severity::info, {V::words("note", sim->note)});

    // The hand formula against the mirror's own resistance: the exact solve's, else ngspice's.
    auto against_own = [&](const char* pair, double own_value) {
        auto cmp = compare(pair, *inspection, own_value, tol);
        out.comparisons.push_back(cmp);
        if (!cmp.agrees)
            c.add(FindingCode::inspection_vs_own, Severity::warning,
                  {V::of("inspection", cmp.first, Unit::ohm), V::of("own", cmp.second, Unit::ohm),
                   V::of("difference", cmp.difference, Unit::relation), tolerance},
                  formula_cause(c, cmp));
    };
    if (inspection && own) against_own("inspection-vs-own", *own);
    const SimulatedValue* alone = own_sim && own_sim->value ? &*own_sim->value : nullptr;
    if (own && alone) {
        auto cmp = compare("own-vs-simulated-alone", *own, alone->magnitude, tol);
        out.comparisons.push_back(cmp);
        if (!cmp.agrees) {
            auto [severity, why] = simulation_cause(c, *alone, *own, nullptr);
            c.add(FindingCode::own_vs_simulated, severity,
                  {V::of("own", cmp.first, Unit::ohm), V::of("simulated", cmp.second, Unit::ohm),
                   V::of("difference", cmp.difference, Unit::relation), V::words("source", alone->source), tolerance},
                  why);
        }
    }
    if (inspection && !own && alone) against_own("inspection-vs-simulated-alone", alone->magnitude);
    if (own_sim && !alone && !own_sim->note.empty() && c.options.simulation_given)
        c.add(FindingCode::not_simulated, Severity::info, {V::words("note", own_sim->note + " (the mirror alone)")});
    if (own && linearised && lin->scope != "mirror devices only") {
        out.comparisons.push_back(compare("own-vs-linearised", *own, *linearised, tol));
        compare_own_and_node(c, *own, "the mirror alone, solved exactly", *linearised, "linearised, in the circuit");
    }
    // Without any solve, the netlist still shows what loads the node (a sky130 mirror whose
    // output also carries a PMOS diode was once blamed on the data): loaded, by inspection.
    const bool told_by_structure = !linearised && inspection && simulated && !loads_on(c.circuit, c.output).empty() &&
                                   compare_own_and_node(c, *inspection, "by inspection", simulated->magnitude, "simulated");
    if (linearised && simulated) {
        auto cmp = compare("linearised-vs-simulated", *linearised, simulated->magnitude, tol);
        out.comparisons.push_back(cmp);
        if (!cmp.agrees) {
            auto [severity, why] = simulation_cause(c, *simulated, *linearised, lin);
            c.add(FindingCode::linearised_vs_simulated, severity,
                  {V::of("linearised", cmp.first, Unit::ohm), V::of("simulated", cmp.second, Unit::ohm),
                   V::of("difference", cmp.difference, Unit::relation), V::words("source", simulated->source),
                   tolerance},
                  why);
        }
    }
    if (inspection && simulated) {
        auto cmp = compare("inspection-vs-simulated", *inspection, simulated->magnitude, tol);
        out.comparisons.push_back(cmp);
        if (!cmp.agrees && !linearised && !told_by_structure) {
            auto [severity, why] = simulation_cause(c, *simulated, *inspection, nullptr);
            if (severity == Severity::error) severity = Severity::warning;  // the formula may be the one at fault
            c.add(FindingCode::inspection_vs_simulated, severity,
                  {V::of("inspection", cmp.first, Unit::ohm), V::of("simulated", cmp.second, Unit::ohm),
                   V::of("difference", cmp.difference, Unit::relation), V::words("source", simulated->source),
                   tolerance},
                  why);
        }
    }
}

}  // namespace

std::optional<double> ReconcileOptions::min_impedance_at(const std::string& node) const {
    for (const auto& [n, limit] : min_impedance_by_node)
        if (iequals(n, node)) return limit;
    return min_impedance;
}

Reconciliation reconcile_resistances(const Circuit& circuit, const std::vector<Mirror>& mirrors,
                                     const InspectionResult& inspection, const std::vector<OwnResistance>& own,
                                     const std::vector<SimulatedOwn>& simulated_own,
                                     const std::vector<LinearisedImpedance>& linearised,
                                     const std::vector<SimulatedImpedance>& simulated,
                                     const ReconcileOptions& options) {
    Reconciliation result;
    const ByMirrorNode<OwnResistance> own_at(own);
    const ByMirrorNode<SimulatedOwn> simulated_own_at(simulated_own);
    const ByNode<LinearisedImpedance> linearised_at(linearised);
    const ByNode<SimulatedImpedance> simulated_at(simulated);
    for (std::size_t k = 0; k < mirrors.size() && k < inspection.mirrors.size(); ++k) {
        const Mirror& m = mirrors[k];
        const MirrorInspection& mi = inspection.mirrors[k];
        for (std::size_t j = 0; j < m.outputs.size() && j < mi.outputs.size(); ++j) {
            OutputReconciliation out{m.id, m.outputs[j].node, {}};
            Context c{circuit, m, m.outputs[j], mi, mi.outputs[j], options, result.findings};
            reconcile_output(c, own_at.find(m.id, out.node), simulated_own_at.find(m.id, out.node),
                             linearised_at.find(out.node), simulated_at.find(out.node), out);
            result.outputs.push_back(std::move(out));
        }
    }
    return result;
}

}  // namespace mirrorcheck
