#include "src/analyse/pipeline.hpp"

#include <algorithm>

#include <fmt/format.h>

#include "src/analyse/apply_waivers.hpp"
#include "src/model/op_point_build.hpp"

namespace mirrorcheck {
namespace {

std::vector<std::string> transistors_of(const Circuit& circuit, const std::vector<Mirror>& mirrors) {
    std::vector<std::string> names;
    auto add = [&](std::size_t i) {  // a reference shared by two mirrors is listed once
        const std::string& name = circuit.devices()[i].name;
        if (std::find(names.begin(), names.end(), name) == names.end()) names.push_back(name);
    };
    for (const auto& m : mirrors) {
        for (std::size_t i : m.reference) add(i);
        for (std::size_t i : m.helpers) add(i);
        for (const auto& o : m.outputs)
            for (std::size_t i : o.devices) add(i);
    }
    return names;
}

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

std::string listed(const std::vector<std::string>& names) {
    std::string s;
    for (std::size_t k = 0; k < names.size() && k < 6; ++k) s += (k ? ", " : "") + names[k];
    if (names.size() > 6) s += fmt::format(" and {} more", names.size() - 6);
    return s;
}

// Device regions and margins, then currents and gains, then resistances.
int reading_group(const Finding& f) {
    if (f.code == "cutoff" || f.code == "out-of-saturation" || f.code == "low-margin" || f.code == "gmb-missing")
        return 0;
    if (f.code == "ratio-error" || f.code == "low-intrinsic-gain" || f.code == "body-effect") return 1;
    return 2;
}

}  // namespace

const LinearisedImpedance* Review::linearised_at(const std::string& node) const {
    for (const auto& l : linearised.outputs)
        if (l.node == to_lower(node)) return &l;
    return nullptr;
}

const SimulatedImpedance* Review::simulated_at(const std::string& node) const {
    for (const auto& s : simulated)
        if (s.node == to_lower(node)) return &s;
    return nullptr;
}

const OutputReconciliation* Review::reconciliation_at(const std::string& mirror, const std::string& node) const {
    for (const auto& r : reconciliation.outputs)
        if (r.mirror == mirror && r.node == node) return &r;
    return nullptr;
}

Review run_review(const Circuit& circuit, const OpPoint& given_op, const std::vector<SimulationPlot>& plots,
                  const ReviewSettings& settings) {
    Review review;
    OpPoint op = given_op;
    const std::vector<std::string> no_gmb = assume_missing_gmb_zero(op);
    review.mirrors = find_mirrors(circuit);
    require_transistor_quantities(op, circuit, transistors_of(circuit, review.mirrors));
    review.inspection = inspect_mirrors(circuit, op, review.mirrors, settings.inspect);
    const std::vector<std::string> nodes = output_nodes(review.mirrors);
    review.linearised = compute_linearised_impedances(circuit, op, linearise_targets(review.mirrors), ac_frequencies(plots));
    review.simulated = find_simulated_impedances(circuit, plots, nodes, settings.simulated);

    ReconcileOptions reconcile{settings.tolerance, !plots.empty(), no_gmb};
    review.reconciliation =
        reconcile_resistances(circuit, review.mirrors, review.inspection, review.linearised.outputs, review.simulated,
                              reconcile);

    review.findings = review.inspection.findings;
    // What the op data's reader derived or matched (vbs from node voltages, cut listing names).
    review.assumptions.insert(review.assumptions.end(), given_op.notes.begin(), given_op.notes.end());
    if (!no_gmb.empty()) {
        review.assumptions.push_back(fmt::format("gmb taken as 0 for {} (not in the op data)", listed(no_gmb)));
        review.findings.push_back(make_finding(
            Severity::warning, "gmb-missing", "", listed(no_gmb),
            fmt::format("The op data has no gmb for {}, so every resistance here neglects body effect; save "
                        "@{}[gmbs] (or write the `show all` listing) to include it.",
                        listed(no_gmb), no_gmb.front())));
    }
    review.findings.insert(review.findings.end(), review.reconciliation.findings.begin(),
                           review.reconciliation.findings.end());
    apply_waivers(review.findings, settings.waivers);
    std::stable_sort(review.findings.begin(), review.findings.end(), [](const Finding& a, const Finding& b) {
        if (reading_group(a) != reading_group(b)) return reading_group(a) < reading_group(b);
        return a.severity < b.severity;
    });
    return review;
}

Review run_review(const Circuit& circuit, const OpPoint& op, const InspectOptions& options) {
    ReviewSettings settings;
    settings.inspect = options;
    return run_review(circuit, op, {}, settings);
}

}  // namespace mirrorcheck
