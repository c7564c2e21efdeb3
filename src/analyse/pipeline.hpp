// The one place that decides the order of the passes for a review.
#pragma once

#include <vector>

#include "src/analyse/inspect.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

struct Review {
    std::vector<Mirror> mirrors;
    InspectionResult inspection;
};

// Recognises the mirrors, checks that the operating point has what they need, and
// inspects them. Throws InputError "op.missing-parameters" naming what is missing.
Review run_review(const Circuit& circuit, const OpPoint& op, const InspectOptions& options);

}  // namespace mirrorcheck
