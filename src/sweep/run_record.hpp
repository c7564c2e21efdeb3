// One run of a sweep as the statistics read it: per mirror output the values a designer
// signs off on (the three resistances, the current ratio, the headroom margin) and the
// codes of its findings, per transistor its saturation margin and region, and the run's
// counts. Made from a review tree (`sweep`) or read from a review's JSON report (`merge`),
// so that both commands compute the same statistics from the same records.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "src/analyse/review_tree.hpp"

namespace mirrorcheck::sweep {

// The names of the per-output quantities, in the order reports list them.
inline constexpr const char* output_quantities[] = {"rout.inspection", "rout.linearised", "rout.simulated",
                                                    "current.ratio", "headroom.margin"};
inline constexpr std::size_t output_quantity_count = 5;

struct RunOutput {
    std::string mirror;  // the mirror's stable id
    std::string label;   // the same with the designer's device name
    std::string node;
    // In the order of output_quantities; absent where the review had no value.
    std::optional<double> values[output_quantity_count];
    std::vector<std::string> findings;  // codes of its unwaived findings, each once
    std::vector<std::string> failing;   // those of them that fail the review (at --fail-on or worse)
    bool passed = true;                 // no unwaived finding at the review's --fail-on or worse
};

struct RunDevice {
    std::string name;  // ngspice's
    std::optional<double> margin;  // Vds - Vdsat (Vce - Vce,sat)
    std::string region;            // "saturation", "triode", ...
};

struct RunRecord {
    std::string label;   // "ss/125C/vdd=1.62/mc17", "op.raw/op3"
    std::string source;  // the file (and plot) its operating point came from
    std::size_t errors = 0, warnings = 0;  // unwaived findings by severity
    bool passed = true;                    // the review passed
    bool failed = false;                   // no review: the simulation or the reading failed
    std::string failure;                   // why, with the end of ngspice's log where there is one
    std::vector<RunOutput> outputs;
    std::vector<RunDevice> devices;
};

// The record of one review.
RunRecord record_from_review(const ReviewTree& tree, std::string label, std::string source);

// A run that gave no review.
RunRecord failed_record(std::string label, std::string source, std::string failure);

}  // namespace mirrorcheck::sweep
