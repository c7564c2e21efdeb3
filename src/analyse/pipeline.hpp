// The one place that decides the order of the passes for a review.
#pragma once

#include <vector>

#include "src/analyse/inspect.hpp"
#include "src/analyse/linearise.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

struct Review {
    std::vector<Mirror> mirrors;
    InspectionResult inspection;
    // The impedance at each mirror output node in the whole linearised circuit, with the
    // voltage sources on those nodes (the probes) removed.
    std::vector<LinearisedImpedance> linearised;
    const LinearisedImpedance* linearised_at(const std::string& node) const;
    // Every finding of every pass, in the order a designer should read them.
    std::vector<Finding> findings;
};

// Recognises the mirrors, checks that the operating point has what they need, inspects
// them, and solves the linearised circuit at their outputs. Throws InputError "op.missing-parameters" naming what is missing.
Review run_review(const Circuit& circuit, const OpPoint& op, const InspectOptions& options);

}  // namespace mirrorcheck
