// Private to inspect.cpp: the output resistance of one mirror output by inspection.
#pragma once

#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include "src/analyse/designer_names.hpp"
#include "src/analyse/inspect.hpp"

namespace mirrorcheck::inspect_detail {

// A quantity of a transistor's op; throws InputError "op.missing-parameters" when absent.
double quantity(const OpPoint& op, const Device& device, std::string_view name);

struct StackRout {
    std::vector<RoutLevel> levels;
    RoutEstimate reflection;
    std::optional<RoutEstimate> family;
};

// The reflection rule up the output's stack, and the family formula where it differs.
// Its formulas name devices as `names` does (find_designer_names).
// `held`: the nets the circuit holds in small signal (source_held_nets, circuit.hpp).
StackRout compute_rout(const Circuit& circuit, const OpPoint& op, const Mirror& mirror, const MirrorOutput& output,
                       const DesignerNames& names, const std::set<std::string>& held);

}  // namespace mirrorcheck::inspect_detail
