#include "src/model/op_point_errors.hpp"

#include <fmt/format.h>
#include <fmt/ranges.h>

namespace mirrorcheck::errors {

InputError op_missing_parameters(const std::string& origin, const std::vector<MissingQuantities>& missing) {
    std::string list, saves, optional, solve;
    for (const auto& m : missing) {
        list += fmt::format("\n  {}: {}", m.device, fmt::join(m.quantities, ", "));
        for (const auto& n : m.ngspice_names) saves += fmt::format(" @{}[{}]", m.device, n);
        for (const auto& n : m.optional_names) optional += fmt::format(" @{}[{}]", m.device, n);
        for (const auto& n : m.solve_names) solve += fmt::format(" @{}[{}]", m.device, n);
    }
    if (!optional.empty())
        optional = "\nOptionally, for the impedance against frequency, save the device capacitances too:\n  save" + optional;
    if (!solve.empty())
        optional += "\nand, for the exact solve, the junction and bulk conductances ngspice does not write by "
                    "default:\n  save" + solve;
    return {"op.missing-parameters", Location(origin),
            fmt::format("the operating point lacks what the review needs for {} device{}:{}\n"
                        "Either add to the deck's control block, before `op`:\n  save all{}\n"
                        "or write ngspice's listing after `op` with `show all > show.txt` and pass that file.{}",
                        missing.size(), missing.size() == 1 ? "" : "s", list, saves, optional)};
}

}  // namespace mirrorcheck::errors
