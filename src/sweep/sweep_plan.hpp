// The runs a simulated sweep asks for: every combination of corner, temperature and supply
// values, each repeated for every Monte Carlo draw, with the label that names it everywhere
// ("ss/125C/vdd=1.62/mc17": the parts that are swept, in that order).
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "src/deck/run_variant.hpp"

namespace mirrorcheck::sweep {

struct SweepAxes {
    std::vector<std::string> corners;
    std::vector<double> temperatures;  // °C
    std::vector<std::pair<std::string, std::vector<double>>> supplies;  // source, its values
    std::vector<std::pair<std::string, std::string>> params;            // the same in every run
    std::size_t monte_carlo = 0;       // draws per combination; 0: none
    unsigned long seed = 1;            // draw k of every combination uses seed + k - 1
};

struct PlannedRun {
    std::string label;
    RunVariant variant;
};

// At least one run (the deck as it is, with the parameters, when nothing is swept).
std::vector<PlannedRun> plan_runs(const SweepAxes& axes);

}  // namespace mirrorcheck::sweep
