// The one place that decides the order of the passes: recognise, check the op data,
// inspect, linearise, read the simulated values, reconcile, waive, then join everything into
// the review tree the back ends read.
#include "src/analyse/pipeline.hpp"

#include <algorithm>
#include <iterator>

#include "src/analyse/apply_waivers.hpp"
#include "src/analyse/build_review_tree.hpp"
#include "src/analyse/designer_names.hpp"
#include "src/analyse/linearise.hpp"
#include "src/analyse/own_resistance.hpp"
#include "src/analyse/reconcile.hpp"
#include "src/analyse/simulated_own.hpp"
#include "src/model/op_point_build.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {
namespace {

std::vector<std::string> output_nodes(const std::vector<Mirror>& mirrors) {
    std::vector<std::string> nodes;
    for (const auto& m : mirrors)
        for (const auto& o : m.outputs)
            if (std::find(nodes.begin(), nodes.end(), o.node) == nodes.end()) nodes.push_back(o.node);
    return nodes;
}

// Each output node with the devices of the first output that drives it: its stack and the
// stack's degeneration resistors, for the linearised pass's fallback.
std::vector<LineariseTarget> linearise_targets(const std::vector<Mirror>& mirrors) {
    std::vector<LineariseTarget> targets;
    for (const auto& m : mirrors)
        for (const auto& o : m.outputs) {
            bool seen = false;
            for (const auto& t : targets) seen = seen || t.node == o.node;
            if (seen) continue;
            LineariseTarget t{o.node, o.devices};
            for (const auto& r : o.degeneration)
                if (r) t.own_devices.push_back(*r);
            targets.push_back(std::move(t));
        }
    return targets;
}

// The frequencies of the AC plots, sorted and without repeats: where the linearised
// spectrum is given, so that it can be read beside the simulated one.
std::vector<double> ac_frequencies(const std::vector<SimulationPlot>& plots) {
    std::vector<double> f;
    for (const auto& p : plots)
        if (p.kind == "ac") f.insert(f.end(), p.frequencies.begin(), p.frequencies.end());
    std::sort(f.begin(), f.end());
    f.erase(std::unique(f.begin(), f.end()), f.end());
    return f;
}

// MOS devices whose op data has gm and gds but no gmb (decks that save only some
// parameters; process kits whose wrappers hide the bulk) get gmb = 0, so that the review
// can go on with body effect neglected. Returns their names.
std::vector<std::string> assume_missing_gmb_zero(OpPoint& op) {
    std::vector<std::string> names;
    for (auto& [name, dev] : op.devices)
        if (dev.is_mos && !dev.get("gmb") && dev.get("gm") && dev.get("gds")) {
            dev.values["gmb"] = 0.0;
            names.push_back(name);
        }
    return names;
}

ReviewThresholds thresholds_of(const ReviewSettings& s) {
    ReviewThresholds t;
    t.margin = s.inspect.margin;
    t.vce_sat = s.inspect.vce_sat;
    t.ratio_tolerance = s.inspect.ratio_tolerance;
    t.tolerance = s.tolerance;
    t.min_impedance = s.min_impedance;
    t.min_impedance_by_node = s.min_impedance_by_node;
    t.at = s.simulated.at;
    t.probes = s.simulated.probes;
    t.waiver_files = s.waiver_files;
    t.fail_on = s.fail_on;
    return t;
}

}  // namespace

Recognition recognise_circuit(const Circuit& circuit) {
    Recognition r;
    r.mirrors = find_mirrors(circuit);
    r.names = find_designer_names(circuit, r.mirrors);
    return r;
}

ReviewTree run_review(const Circuit& circuit, OpPoint op, std::vector<SimulationPlot> plots,
                      const ReviewSettings& settings, const ReviewInputs& inputs) {
    return run_review(circuit, recognise_circuit(circuit), std::move(op), std::move(plots), settings, inputs);
}

ReviewTree run_review(const Circuit& circuit, const Recognition& recognition, OpPoint op,
                      std::vector<SimulationPlot> plots, const ReviewSettings& settings, const ReviewInputs& inputs) {
    // The runs of the mirrors alone are read by their own pass; every other pass reads the circuit's.
    std::vector<SimulationPlot> alone_plots;
    auto alone = std::stable_partition(plots.begin(), plots.end(), [](const SimulationPlot& p) { return !is_alone_plot(p); });
    std::move(alone, plots.end(), std::back_inserter(alone_plots));
    plots.erase(alone, plots.end());
    const std::vector<std::string> no_gmb = assume_missing_gmb_zero(op);
    const std::vector<Mirror>& mirrors = recognition.mirrors;
    require_transistor_quantities(op, circuit, mirror_transistor_names(circuit, mirrors));
    const DesignerNames& names = recognition.names;
    const InspectionResult inspection = inspect_mirrors(circuit, op, mirrors, settings.inspect, names);
    const std::vector<OwnResistance> own = compute_own_resistances(circuit, op, mirrors);
    const LinearisedSolve linearised =
        compute_linearised_impedances(circuit, op, linearise_targets(mirrors), ac_frequencies(plots));
    const std::vector<SimulatedImpedance> simulated =
        find_simulated_impedances(circuit, plots, output_nodes(mirrors), settings.simulated);
    const std::vector<SimulatedOwn> simulated_own = find_simulated_own(alone_plots, mirrors);
    const ReconcileOptions reconcile{settings.tolerance, !plots.empty(), no_gmb, settings.min_impedance,
                                     settings.min_impedance_by_node};
    const Reconciliation reconciliation =
        reconcile_resistances(circuit, mirrors, inspection, own, simulated_own, linearised.outputs, simulated, reconcile);

    ReviewParts parts{circuit, op, mirrors, inspection, own, linearised.outputs, linearised.notes, simulated,
                      simulated_own, reconciliation, inspection.findings, {}, inputs, thresholds_of(settings), names};
    if (!no_gmb.empty()) {
        std::string listed;
        for (std::size_t k = 0; k < no_gmb.size() && k < 6; ++k)
            listed += (k ? ", " : "") + designer_name(parts.names, no_gmb[k]);
        if (no_gmb.size() > 6) listed += " and " + std::to_string(no_gmb.size() - 6) + " more";
        parts.assumptions.push_back("gmb taken as 0 for " + listed + " (not in the op data)");
        parts.findings.push_back(make_finding(FindingCode::gmb_missing, "", no_gmb.front(),
                                              {FindingValue::names("devices", no_gmb),
                                               FindingValue::names("first", {no_gmb.front()})}));
    }
    parts.findings.insert(parts.findings.end(), reconciliation.findings.begin(), reconciliation.findings.end());
    apply_waivers(parts.findings, settings.waivers, parts.names);
    return build_review_tree(parts);
}

ReviewTree run_review(const Circuit& circuit, const OpPoint& op, const InspectOptions& options) {
    ReviewSettings settings;
    settings.inspect = options;
    return run_review(circuit, op, {}, settings);
}

}  // namespace mirrorcheck
