// Back ends for `sweep` and `merge`: the terminal table, JSON (schema mirrorcheck-sweep/1,
// kept in docs/sweep.schema.json) and JUnit XML. Each renders the sweep result
// (src/sweep/sweep_statistics.hpp) and nothing else.
#pragma once

#include <ostream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "src/report/review_report.hpp"
#include "src/sweep/sweep_statistics.hpp"

namespace mirrorcheck::report {

// What the sweep read: the netlist (empty for `merge`) and the op files or reports.
struct SweepInputs {
    std::string command;  // "sweep" or "merge"
    std::string netlist;
    std::vector<std::string> sources;
};

// Writes the sweep in `format` (the style's width and colour apply to the table only).
void write_sweep(Format format, const sweep::SweepResult& result, const SweepInputs& inputs, std::ostream& out,
                 const TableStyle& style = {});

// The verdict, each output's block (worst first: lowest yield, then lowest headroom margin)
// with its statistics and findings, the transistors by lowest margin, then the runs that
// failed or did not pass.
std::string write_sweep_table(const sweep::SweepResult& result, const SweepInputs& inputs,
                              const TableStyle& style = {});

// {"schema": "mirrorcheck-sweep/1", "tool", "inputs", "runs", "outputs", "devices", "summary"}.
nlohmann::json sweep_to_json(const sweep::SweepResult& result, const SweepInputs& inputs);

// <testsuites> with one <testsuite name="mirrorcheck sweep">: one <testcase
// classname="MIRROR-LABEL" name="output NODE at RUN"> per output per run, failing with the
// codes of the findings that failed that run's review there, or with the run's failure.
std::string sweep_to_junit(const sweep::SweepResult& result, const SweepInputs& inputs);

}  // namespace mirrorcheck::report
