// Back ends for `review`: the terminal table and the JSON report (DESIGN.md, version 1).
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "src/analyse/pipeline.hpp"

namespace mirrorcheck::report {

struct ReviewInputs {
    std::string netlist;
    std::string op_source;  // file and plot (or listing) the operating point came from
    std::vector<std::string> simulation_files;  // raw files whose AC or .tf plots were read
    std::vector<std::string> left_out = {};  // `run`: cards of the netlist its deck left out ("file:line: card")
};

// {"schema": "mirrorcheck-report/1", "inputs", "mirrors", "devices", "findings", "summary"}.
// `linearised` and `simulated` resistances are null until those passes exist.
nlohmann::json review_to_json(const ReviewInputs& inputs, const Circuit& circuit, const OpPoint& op,
                              const Review& review);

// The same for a person: one block per mirror, findings first when there are errors.
std::string write_review_table(const ReviewInputs& inputs, const Circuit& circuit, const OpPoint& op,
                               const Review& review);

}  // namespace mirrorcheck::report
