// Per-quantity statistics over the runs of a sweep: the mean, the sample standard deviation
// with n - 1 (Bessel's correction; computed in two passes about the mean, which keeps the
// precision where the spread is small beside the value, as for output resistances of tens of
// MΩ varying by kΩ), the extremes with the run that reached them, and the count; yields as
// shares of all runs, so that a run that failed to simulate or did not review an output
// counts against it.
#include "src/sweep/sweep_statistics.hpp"

#include <cmath>
#include <utility>

namespace mirrorcheck::sweep {
namespace {

struct Sample {
    double value;
    const std::string* run;
};

std::optional<Statistic> statistic_of(const std::vector<Sample>& samples) {
    if (samples.empty()) return std::nullopt;
    Statistic s;
    s.count = samples.size();
    double sum = 0;
    const Sample* low = &samples.front();
    const Sample* high = &samples.front();
    for (const Sample& x : samples) {
        sum += x.value;
        if (x.value < low->value) low = &x;
        if (x.value > high->value) high = &x;
    }
    s.mean = sum / static_cast<double>(s.count);
    s.min = low->value;
    s.max = high->value;
    s.min_run = *low->run;
    s.max_run = *high->run;
    if (s.count >= 2) {
        double squares = 0;
        for (const Sample& x : samples) squares += (x.value - s.mean) * (x.value - s.mean);
        s.sigma = std::sqrt(squares / static_cast<double>(s.count - 1));
    }
    return s;
}

struct OutputSamples {
    OutputStatistics stats;
    std::vector<Sample> values[output_quantity_count];
};

struct DeviceSamples {
    DeviceStatistics stats;
    std::vector<Sample> margin;
};

template <typename T>
T& entry(std::vector<T>& list, std::map<std::string, std::size_t>& index, const std::string& key) {
    const auto [it, added] = index.emplace(key, list.size());
    if (added) list.emplace_back();
    return list[it->second];
}

void add_output(OutputSamples& o, const RunOutput& r, const std::string& run) {
    o.stats.mirror = r.mirror;
    o.stats.label = r.label;
    o.stats.node = r.node;
    ++o.stats.runs;
    if (r.passed) ++o.stats.passed;
    for (std::size_t q = 0; q < output_quantity_count; ++q)
        if (r.values[q]) o.values[q].push_back({*r.values[q], &run});
    for (const std::string& code : r.findings) ++o.stats.findings[code];
}

SweepSummary summary_of(const std::vector<RunRecord>& runs, std::optional<double> min_yield) {
    SweepSummary s;
    s.runs = runs.size();
    s.min_yield = min_yield;
    std::size_t good = 0;
    for (const RunRecord& r : runs) {
        s.errors += r.errors;
        s.warnings += r.warnings;
        if (r.failed) ++s.failed_runs;
        else if (!r.passed) ++s.runs_with_errors;
        else ++good;
    }
    s.yield = runs.empty() ? 0.0 : static_cast<double>(good) / static_cast<double>(runs.size());
    s.passed = !runs.empty() && s.yield >= min_yield.value_or(1.0);
    return s;
}

}  // namespace

SweepResult compute_sweep_statistics(std::vector<RunRecord> runs, std::optional<double> min_yield) {
    std::vector<OutputSamples> outputs;
    std::vector<DeviceSamples> devices;
    std::map<std::string, std::size_t> output_index, device_index;
    for (const RunRecord& run : runs) {
        for (const RunOutput& o : run.outputs)
            add_output(entry(outputs, output_index, o.mirror + '\n' + o.node), o, run.label);
        for (const RunDevice& d : run.devices) {
            DeviceSamples& s = entry(devices, device_index, d.name);
            s.stats.name = d.name;
            if (d.margin) s.margin.push_back({*d.margin, &run.label});
            ++s.stats.regions[d.region];
        }
    }
    SweepResult result;
    const double total = static_cast<double>(runs.size());
    for (OutputSamples& o : outputs) {
        for (std::size_t q = 0; q < output_quantity_count; ++q) o.stats.values[q] = statistic_of(o.values[q]);
        o.stats.yield = total > 0 ? static_cast<double>(o.stats.passed) / total : 0.0;
        for (const RunRecord& run : runs) {
            bool passed = false;
            for (const RunOutput& r : run.outputs)
                passed = passed || (r.mirror == o.stats.mirror && r.node == o.stats.node && r.passed);
            if (!passed) o.stats.failed_runs.push_back(run.label);
        }
        result.outputs.push_back(std::move(o.stats));
    }
    for (DeviceSamples& d : devices) {
        d.stats.margin = statistic_of(d.margin);
        result.devices.push_back(std::move(d.stats));
    }
    result.summary = summary_of(runs, min_yield);
    result.runs = std::move(runs);
    return result;
}

}  // namespace mirrorcheck::sweep
