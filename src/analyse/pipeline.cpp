#include "src/analyse/pipeline.hpp"

#include <algorithm>

#include "src/model/op_point_build.hpp"

namespace mirrorcheck {
namespace {

std::vector<std::string> transistors_of(const Circuit& circuit, const std::vector<Mirror>& mirrors) {
    std::vector<std::string> names;
    auto add = [&](std::size_t i) { names.push_back(circuit.devices()[i].name); };
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

}  // namespace

const LinearisedImpedance* Review::linearised_at(const std::string& node) const {
    for (const auto& l : linearised)
        if (l.node == to_lower(node)) return &l;
    return nullptr;
}

Review run_review(const Circuit& circuit, const OpPoint& op, const InspectOptions& options) {
    Review review;
    review.mirrors = find_mirrors(circuit);
    require_transistor_quantities(op, circuit, transistors_of(circuit, review.mirrors));
    review.inspection = inspect_mirrors(circuit, op, review.mirrors, options);
    review.linearised = compute_linearised_impedances(circuit, op, output_nodes(review.mirrors));
    review.findings = review.inspection.findings;
    return review;
}

}  // namespace mirrorcheck
