// Joins the passes' results into the review tree (review_tree.hpp): the pipeline's last
// step, and the one place that decides which findings belong to which output.
#pragma once

#include <string>
#include <vector>

#include "src/analyse/designer_names.hpp"
#include "src/analyse/review_tree.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

// What the passes returned, for one review.
struct ReviewParts {
    const Circuit& circuit;
    const OpPoint& op;
    const std::vector<Mirror>& mirrors;
    const InspectionResult& inspection;  // mirrors in the order of `mirrors`
    const std::vector<OwnResistance>& own;               // by mirror and output
    const std::vector<LinearisedImpedance>& linearised;  // by output node
    const std::vector<SolveNote>& solve_notes;           // the solve's circuit-level notes, once
    const std::vector<SimulatedImpedance>& simulated;    // by output node
    const std::vector<SimulatedOwn>& simulated_own;      // by mirror and output
    const Reconciliation& reconciliation;
    std::vector<Finding> findings;  // of every pass, waivers applied
    std::vector<std::string> assumptions;
    ReviewInputs inputs;
    ReviewThresholds settings;
    DesignerNames names;
};

ReviewTree build_review_tree(const ReviewParts& parts);

// Sorts the tree's findings (severity, then reading order), places each under the outputs it
// concerns, and counts statuses and the summary. build_review_tree ends with it; call it
// again after changing ReviewTree::findings.
//
// Placement: a finding of a mirror whose subject is an output's node or one of its devices
// belongs to that output only; any other finding of the mirror (its reference side, its
// helpers) to every output of the mirror; a finding of no mirror to the circuit.
void join_findings(ReviewTree& tree);

}  // namespace mirrorcheck
