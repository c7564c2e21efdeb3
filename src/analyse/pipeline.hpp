// The one place that decides the order of the passes for a review.
#pragma once

#include <string>
#include <vector>

#include "parsers/waivers/waivers.hpp"
#include "src/analyse/finding.hpp"
#include "src/analyse/inspect.hpp"
#include "src/analyse/linearise.hpp"
#include "src/analyse/reconcile.hpp"
#include "src/analyse/simulated_impedance.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"
#include "src/model/simulation_plots.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

struct ReviewSettings {
    InspectOptions inspect;
    SimulatedOptions simulated;   // --probe, --at
    double tolerance = 0.10;      // --tolerance: the three resistance values must agree within this
    waivers::Waivers waivers;     // --waive: findings accepted, shown as waived
};

struct Review {
    std::vector<Mirror> mirrors;
    InspectionResult inspection;
    // The impedance at each mirror output node in the whole linearised circuit, measured
    // through the node's probe source when it has one, and the solve's circuit-level notes
    // (linearise.hpp).
    LinearisedSolve linearised;
    const LinearisedImpedance* linearised_at(const std::string& node) const;
    // The impedance the simulator reports at each output node, through its probe.
    std::vector<SimulatedImpedance> simulated;
    const SimulatedImpedance* simulated_at(const std::string& node) const;
    Reconciliation reconciliation;
    const OutputReconciliation* reconciliation_at(const std::string& mirror, const std::string& node) const;
    // What the review had to assume about the op data, in words ("gmb taken as 0 for ...").
    std::vector<std::string> assumptions;
    // Every finding of every pass, in the order a designer should read them: device
    // regions and margins first, then currents, then resistances; errors first in each.
    std::vector<Finding> findings;
};

// Recognises the mirrors, checks that the operating point has what they need, inspects
// them, solves the linearised circuit at their outputs, reads the simulated impedance at
// each output from `plots` (AC and .tf results; may be empty), reconciles the three, and
// marks the findings the waivers accept.
// Throws InputError "op.missing-parameters" naming what is missing (a MOS device that lacks
// only gmb is reviewed with gmb = 0, and a finding says so).
Review run_review(const Circuit& circuit, const OpPoint& op, const std::vector<SimulationPlot>& plots,
                  const ReviewSettings& settings);

// The same without simulation results.
Review run_review(const Circuit& circuit, const OpPoint& op, const InspectOptions& options);

}  // namespace mirrorcheck
