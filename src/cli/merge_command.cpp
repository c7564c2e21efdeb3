#include "src/cli/merge_command.hpp"

#include <iostream>
#include <memory>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "src/cli/exit_status.hpp"
#include "src/cli/sweep_command.hpp"
#include "src/cli/terminal.hpp"
#include "src/report/sweep_report.hpp"
#include "src/sweep/read_review_report.hpp"
#include "src/sweep/run_labels.hpp"
#include "src/sweep/sweep_errors.hpp"
#include "src/sweep/sweep_statistics.hpp"

namespace mirrorcheck::cli {
namespace {

struct MergeOptions {
    std::vector<std::string> reports;
    std::string format = "table";
    std::string min_yield;
    bool summary = false;
};

int merge_and_report(const MergeOptions& o) {
    const std::optional<double> min_yield =
        o.min_yield.empty() ? std::nullopt : std::optional<double>(min_yield_fraction(o.min_yield));
    std::vector<sweep::RunRecord> records;
    std::set<std::string> labels;
    for (const auto& path : o.reports) {
        const std::string label = sweep::report_label(path);
        if (!labels.insert(label).second) throw sweep::errors::duplicate_run(path, label);
        records.push_back(sweep::read_review_report(path, label));
    }
    const sweep::SweepResult result = sweep::compute_sweep_statistics(std::move(records), min_yield);
    const Terminal terminal = stdout_terminal();
    report::write_sweep(report::parse_format(o.format).value_or(report::Format::table), result,
                        {"merge", "", o.reports}, std::cout, {terminal.width, terminal.colour, o.summary});
    return result.summary.passed ? exit_passed : exit_findings;
}

}  // namespace

void add_merge_command(CLI::App& app, int& status) {
    auto o = std::make_shared<MergeOptions>();
    CLI::App* cmd = app.add_subcommand("merge", "Statistics and yield from per-run `review --format json` reports");
    cmd->footer(
        "Each report is one run, labelled by its path without .json. The statistics, yield\n"
        "and exit status are those `sweep` gives for the same runs (0 the yield is at least\n"
        "--min-yield, or every run passed without it; 1 not; 2 bad usage or input).\n\n"
        "Examples:\n"
        "  mirrorcheck merge runs/*.json\n"
        "  mirrorcheck merge runs/*.json --min-yield 99% --format junit > sweep.xml");
    cmd->add_option("REPORT", o->reports, "JSON reports of `mirrorcheck review --format json`, one per run")
        ->required()
        ->check(CLI::ExistingFile);
    cmd->add_option("--min-yield", o->min_yield, "the share of runs that must pass, e.g. 95% (default: all of them)");
    cmd->add_option("--format", o->format, "output format: table, json (schema mirrorcheck-sweep/1) or junit (XML)")
        ->check(CLI::IsMember({"table", "json", "junit"}));
    cmd->add_flag("--summary", o->summary, "table: print the verdict line only");
    cmd->callback([o, &status] { status = merge_and_report(*o); });
}

}  // namespace mirrorcheck::cli
