// The statistics of a sweep: per mirror output and per transistor, over every run, and the
// yield. The pass `compute_sweep_statistics` makes the sweep result that every sweep back end
// reads (src/report/sweep_report.hpp), from `sweep`'s reviews and `merge`'s reports alike.
#pragma once

#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "src/sweep/run_record.hpp"

namespace mirrorcheck::sweep {

// One quantity over the runs that had a value for it.
struct Statistic {
    double mean = 0;
    std::optional<double> sigma;  // the sample standard deviation (n - 1); absent below two values
    double min = 0, max = 0;
    std::string min_run, max_run;  // labels of the first run at the minimum and at the maximum
    std::size_t count = 0;
};

struct OutputStatistics {
    std::string mirror, label, node;
    std::optional<Statistic> values[output_quantity_count];  // as output_quantities; absent when no run had one
    std::map<std::string, std::size_t> findings;             // finding code -> runs that raised it here
    std::size_t runs = 0;    // runs that reviewed this output
    std::size_t passed = 0;  // of those, the runs in which it passed
    double yield = 0;        // passed / every run of the sweep (a failed run counts against it)
    std::vector<std::string> failed_runs;  // labels of the runs in which it did not pass, in run order
};

struct DeviceStatistics {
    std::string name;
    std::optional<Statistic> margin;
    std::map<std::string, std::size_t> regions;  // region -> runs spent in it
};

struct SweepSummary {
    std::size_t runs = 0;
    std::size_t failed_runs = 0;       // gave no review
    std::size_t runs_with_errors = 0;  // reviewed, and did not pass
    std::size_t errors = 0, warnings = 0;  // unwaived findings over every run
    double yield = 0;                  // runs that were reviewed and passed / runs
    std::optional<double> min_yield;   // --min-yield
    bool passed = true;                // the yield is at least min_yield (all runs without it)
};

struct SweepResult {
    std::vector<RunRecord> runs;
    std::vector<OutputStatistics> outputs;  // in the order the runs first name them
    std::vector<DeviceStatistics> devices;
    SweepSummary summary;
};

// Statistics of `runs` in the order given (min and max name the first run to reach them).
SweepResult compute_sweep_statistics(std::vector<RunRecord> runs, std::optional<double> min_yield = std::nullopt);

}  // namespace mirrorcheck::sweep
