#include "src/cli/sweep_command.hpp"

#include <algorithm>
#include <iostream>
#include <map>
#include <memory>
#include <optional>
#include <thread>
#include <string>
#include <vector>

#include "parsers/common/input_kind.hpp"
#include "parsers/listing/listing.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/cli/exit_status.hpp"
#include "src/cli/netlist_limits_option.hpp"
#include "src/cli/review_command.hpp"
#include "src/cli/simulated_sweep.hpp"
#include "src/cli/terminal.hpp"
#include "src/cli/timeout_option.hpp"
#include "src/cli/usage_errors.hpp"
#include "src/model/circuit_build.hpp"
#include "src/model/op_point_build.hpp"
#include "src/model/simulation_plots_build.hpp"
#include "src/report/sweep_report.hpp"
#include "src/sweep/run_labels.hpp"
#include "src/sweep/sweep_errors.hpp"
#include "src/sweep/sweep_statistics.hpp"

namespace mirrorcheck::cli {

double min_yield_fraction(const std::string& text) {
    const double y = quantity("--min-yield", text, "%");
    if (y > 1.0) throw usage::min_yield_above_one(text);
    return y;
}

namespace {

struct SweepOptions {
    ReviewOptions review;          // NETLIST and the judgement options
    std::vector<std::string> ops;  // raw files (or listings) with the runs' operating points
    std::string min_yield;
    // Simulated for the user when no --op is given.
    std::vector<std::string> corners, temps, supplies, params;
    std::size_t monte_carlo = 0;
    unsigned long seed = 1;
    std::size_t jobs = 0;  // 0: the machine's cores
    double timeout = default_timeout_seconds;  // seconds a local run may take; 0: no limit
    std::string keep, ngspice = "ngspice";
    std::string engine = "local";
    std::vector<std::string> engine_options;
};

// "1.62", "1.62V".
std::optional<double> volts(std::string text) {
    if (!text.empty() && (text.back() == 'V' || text.back() == 'v')) text.pop_back();
    try {
        std::size_t used = 0;
        const double v = std::stod(text, &used);
        if (used == text.size()) return v;
    } catch (const std::exception&) {
    }
    return std::nullopt;
}

sweep::SweepAxes sweep_axes(const SweepOptions& o) {
    sweep::SweepAxes axes;
    axes.corners = o.corners;
    for (const auto& t : o.temps) {
        std::string text = t;
        if (!text.empty() && (text.back() == 'C' || text.back() == 'c')) text.pop_back();
        const auto v = volts(text);  // the same plain number
        if (!v || text.empty() || text.back() == 'V' || text.back() == 'v') throw usage::bad_temperature(t);
        axes.temperatures.push_back(*v);
    }
    for (const auto& s : o.supplies) {
        const auto eq = s.find('=');
        if (eq == std::string::npos || eq == 0) throw usage::bad_supply(s);
        std::vector<double> values;
        std::size_t from = eq + 1;
        while (from <= s.size()) {
            std::size_t comma = s.find(',', from);
            if (comma == std::string::npos) comma = s.size();
            const auto v = volts(s.substr(from, comma - from));
            if (!v) throw usage::bad_supply(s);
            values.push_back(*v);
            from = comma + 1;
        }
        axes.supplies.emplace_back(s.substr(0, eq), values);
    }
    for (const auto& p : o.params) {
        const auto eq = p.find('=');
        if (eq == std::string::npos || eq == 0 || eq + 1 == p.size()) throw usage::bad_param(p);
        axes.params.emplace_back(p.substr(0, eq), p.substr(eq + 1));
    }
    axes.monte_carlo = o.monte_carlo;
    axes.seed = o.seed;
    return axes;
}

std::vector<sweep::RunRecord> simulated_records(const SweepOptions& o) {
    SimulationRequest request;
    request.axes = sweep_axes(o);
    request.jobs = o.jobs > 0 ? o.jobs : std::max(1u, std::thread::hardware_concurrency());
    request.keep = o.keep;
    request.ngspice = o.ngspice;
    request.engine = o.engine;
    request.engine_options = o.engine_options;
    request.timeout = timeout_seconds(o.timeout);
    return simulate_and_review(o.review, request);
}

// The raw files of a sweep, each read once with every kind of plot the sweep takes from it
// (op plots of --op files, AC and .tf plots of --ac and --tf files), however many times it
// is named: one pass over the headers of a file of a thousand runs, not three.
class RawFiles {
public:
    explicit RawFiles(const SweepOptions& o) : o_(o) {}

    const raw::RawFile& get(const std::string& path) {
        auto it = files_.find(path);
        if (it != files_.end()) return it->second;
        const auto named = [&](const std::vector<std::string>& list) {
            return std::find(list.begin(), list.end(), path) != list.end();
        };
        raw::Selection selection;
        if (named(o_.ops)) selection.plots.push_back("op");
        if (named(o_.review.ac) || named(o_.review.tf)) selection.plots.insert(selection.plots.end(), {"ac", "tf"});
        return files_.emplace(path, raw::read_raw(path, selection)).first->second;
    }

private:
    const SweepOptions& o_;
    std::map<std::string, raw::RawFile> files_;
};

// The AC or .tf plots of the given files, in order, shared out over `runs` by plot order:
// run k gets the k-th group of equal size.
std::vector<std::vector<SimulationPlot>> plots_per_run(const std::vector<std::string>& files, std::size_t runs,
                                                       RawFiles& raws) {
    std::vector<std::vector<SimulationPlot>> per_run(runs);
    if (files.empty()) return per_run;
    std::vector<SimulationPlot> plots;
    for (const auto& path : files) {
        if (detect_input_kind(path) != InputKind::raw) throw usage::no_small_signal_plot(path);
        auto more = simulation_plots_from_raw(raws.get(path));
        if (more.empty()) throw usage::no_small_signal_plot(path);
        for (auto& p : more) plots.push_back(std::move(p));
    }
    if (runs == 0 || plots.size() % runs != 0) throw sweep::errors::plots_not_per_run(files.front(), plots.size(), runs);
    const std::size_t each = plots.size() / runs;
    for (std::size_t k = 0; k < plots.size(); ++k) per_run[k / each].push_back(std::move(plots[k]));
    return per_run;
}

// One run to review: where its op is and what to call it.
struct OpRun {
    std::string path, label;
    std::size_t plot = 0;  // index into the raw file's plots; unused for a listing
};

// The runs of every --op file: each op plot of a raw file, or a listing as one run.
std::vector<OpRun> op_runs(const std::vector<std::string>& files, RawFiles& raws) {
    std::vector<OpRun> runs;
    for (const auto& path : files) {
        const InputKind kind = detect_input_kind(path);
        if (kind == InputKind::listing) {
            runs.push_back({path, sweep::op_plot_label(path, 0, 1)});
            continue;
        }
        if (kind != InputKind::raw) throw usage::no_op_plot(path);
        const raw::RawFile& file = raws.get(path);
        std::vector<std::size_t> ops;
        for (std::size_t k = 0; k < file.plots.size(); ++k)
            if (file.plots[k].kind() == "op" && file.plots[k].decoded && file.plots[k].point_count > 0) ops.push_back(k);
        if (ops.empty()) throw usage::no_op_plot(path);
        for (std::size_t k = 0; k < ops.size(); ++k) runs.push_back({path, sweep::op_plot_label(path, k, ops.size()), ops[k]});
    }
    return runs;
}

class OpSweep {
public:
    OpSweep(const SweepOptions& o, const Circuit& circuit)
        : o_(o), circuit_(circuit), recognition_(recognise_circuit(circuit)), settings_(review_settings(o.review)) {}

    std::vector<sweep::RunRecord> review_all() {
        RawFiles raws(o_);
        const std::vector<OpRun> runs = op_runs(o_.ops, raws);
        auto ac = plots_per_run(o_.review.ac, runs.size(), raws);
        auto tf = plots_per_run(o_.review.tf, runs.size(), raws);
        std::vector<sweep::RunRecord> records;
        for (std::size_t k = 0; k < runs.size(); ++k) {
            const OpRun& run = runs[k];
            std::vector<SimulationPlot> plots = std::move(ac[k]);
            for (auto& p : tf[k]) plots.push_back(std::move(p));
            try {
                OpPoint op = op_of(run, raws);
                const std::string source = op.origin;
                ReviewInputs inputs{o_.review.netlist, source, simulation_files(), {}};
                const ReviewTree tree = run_review(circuit_, recognition_, std::move(op), std::move(plots), settings_, inputs);
                records.push_back(sweep::record_from_review(tree, run.label, source));
            } catch (const InputError& e) {
                if (e.code().rfind("op.", 0) != 0) throw;
                throw sweep::errors::run_does_not_fit(run.path, run.label, e.message());
            }
        }
        return records;
    }

private:
    const SweepOptions& o_;
    const Circuit& circuit_;
    const Recognition recognition_;
    const ReviewSettings settings_;

    std::vector<std::string> simulation_files() const {
        std::vector<std::string> files = o_.review.ac;
        files.insert(files.end(), o_.review.tf.begin(), o_.review.tf.end());
        return files;
    }

    OpPoint op_of(const OpRun& run, RawFiles& raws) const {
        if (detect_input_kind(run.path) == InputKind::listing)
            return build_op_point(circuit_, listing::read_listing(run.path));
        const raw::RawFile& file = raws.get(run.path);
        return build_op_point(circuit_, file, file.plots[run.plot]);
    }
};

int sweep_and_report(const SweepOptions& o) {
    const std::optional<double> min_yield =
        o.min_yield.empty() ? std::nullopt : std::optional<double>(min_yield_fraction(o.min_yield));
    std::vector<sweep::RunRecord> records;
    if (o.ops.empty()) {
        try {
            records = simulated_records(o);
        } catch (const SweepInterrupted& stop) {
            std::cerr << stop.message;
            return 128 + stop.signal;
        }
    } else {
        const Circuit circuit = read_circuit(o.review.netlist, o.review.limits);
        records = OpSweep(o, circuit).review_all();
    }
    const sweep::SweepResult result = sweep::compute_sweep_statistics(std::move(records), min_yield);
    const Terminal terminal = stdout_terminal();
    report::write_sweep(report::parse_format(o.review.format).value_or(report::Format::table), result,
                        {"sweep", o.review.netlist, o.ops}, std::cout,
                        {terminal.width, terminal.colour, o.review.summary});
    return result.summary.passed ? exit_passed : exit_findings;
}

}  // namespace

void add_sweep_command(CLI::App& app, int& status) {
    auto o = std::make_shared<SweepOptions>();
    CLI::App* cmd = app.add_subcommand("sweep", "Review many operating points of one netlist: statistics and yield");
    cmd->footer(
        "Every op plot of every --op raw file is one run (ngspice writes one plot per `op`,\n"
        "e.g. in a control loop with `alter` or `reset`); a `show` listing is one run. The\n"
        "netlist is read and its mirrors recognised once; each run is reviewed as `review`\n"
        "does. --ac and --tf plots are shared out over the runs by plot order (the same\n"
        "number for every run). For each mirror output: mean, σ, min and max (with the run\n"
        "that reached them) of the three output resistances, the current ratio and the\n"
        "headroom margin, the runs that raised each finding, and the yield (the share of\n"
        "runs whose review passed there); for each transistor its saturation margin and the\n"
        "runs it spent in each region.\n\n"
        "Without --op the runs are simulated: every combination of --corners, --temps and\n"
        "--supply values, each --monte-carlo times with its own seed, in decks derived into a\n"
        "work folder (the netlist's files are never written), ngspice run in the netlist's\n"
        "folder; runs are labelled like ss/125C/vdd=1.62/mc17. A run that fails or does not\n"
        "converge is reported as failed with the end of ngspice's log and counts against the\n"
        "yield.\n\n"
        "Exit status: 0 the yield is at least --min-yield (without it: every run ran and\n"
        "passed), 1 not, 2 bad usage or input, 3 an internal error, 130 stopped by Ctrl-C (the\n"
        "finished runs' reports are kept, and the message says how to merge them).\n\n"
        "Examples:\n"
        "  mirrorcheck sweep bias.cir --op corners.raw\n"
        "  mirrorcheck sweep bias.cir --op tt.raw ss.raw ff.raw --format json > sweep.json\n"
        "  mirrorcheck sweep bias.cir --op mc.raw --min-yield 99% --format junit > sweep.xml\n"
        "  mirrorcheck sweep bias.cir --corners ff,ss --temps=-40,125 --supply vdd=1.62,1.98\n"
        "  mirrorcheck sweep bias.cir --monte-carlo 200 --seed 7 --jobs 2 --keep mc_runs");
    cmd->add_option("NETLIST", o->review.netlist, "ngspice netlist")->required()->check(CLI::ExistingFile);
    cmd->add_option("--op", o->ops, "raw files whose op plots are the runs (or `show` listings, one run each)")
        ->check(CLI::ExistingFile);
    cmd->add_option("--corners", o->corners,
                    "without --op: process corners, sections of the library on the deck's `.lib FILE SECTION` line "
                    "(e.g. ff,ss)")
        ->delimiter(',');
    cmd->add_option("--temps", o->temps, "without --op: temperatures in °C, e.g. --temps=-40,27,125")->delimiter(',');
    cmd->add_option("--supply", o->supplies, "without --op: SOURCE=V[,V...], the DC values of a voltage source (repeatable)");
    cmd->add_option("--monte-carlo", o->monte_carlo, "without --op: draws of the deck's agauss/gauss values per combination");
    cmd->add_option("--seed", o->seed, "the first Monte Carlo draw's seed (default 1; draw k uses seed + k - 1)");
    cmd->add_option("--param", o->params, "NAME=VALUE: a .param for every run, e.g. a PDK's statistical switch (repeatable)");
    cmd->add_option("--jobs", o->jobs, "ngspice processes at once (default: the machine's cores)");
    add_timeout_option(*cmd, o->timeout, "local runs only; the run counts as failed");
    cmd->add_option("--keep", o->keep,
                    "keep every run's deck, ngspice log and results in this folder (a new or empty one, or one an "
                    "earlier sweep --keep wrote)");
    cmd->add_option("--ngspice", o->ngspice, "the ngspice executable (default: ngspice on PATH)");
    cmd->add_option("--engine", o->engine,
                    "where the runs execute: local (default, --jobs processes), parallel (GNU parallel, --jobs at "
                    "once per host) or slurm (a job array, sbatch --array --wait; give --keep a folder every node "
                    "sees)")
        ->check(CLI::IsMember({"local", "parallel", "slurm"}));
    cmd->add_option("--engine-option", o->engine_options,
                    "a word passed to parallel or sbatch as it is, e.g. --engine-option=--sshlogin=2/host1 "
                    "or --engine-option=--partition=short (repeatable)");
    cmd->add_option("--ac", o->review.ac, "raw files with AC plots probing the outputs, by plot order (repeatable)")
        ->check(CLI::ExistingFile);
    cmd->add_option("--tf", o->review.tf, "raw files with .tf plots naming the probes, by plot order (repeatable)")
        ->check(CLI::ExistingFile);
    cmd->add_option("--probe", o->review.probes, "NODE=SOURCE: the source that probes output NODE (repeatable)");
    cmd->add_option("--min-yield", o->min_yield, "the share of runs that must pass, e.g. 95% (default: all of them)");
    add_judgement_options(*cmd, o->review);
    add_netlist_limit_options(*cmd, o->review.limits);
    cmd->get_option("--format")->description("output format: table, json (schema mirrorcheck-sweep/1) or junit (XML)");
    cmd->get_option("--summary")->description("table: print the verdict line only");
    cmd->callback([o, &status] { status = sweep_and_report(*o); });
}

}  // namespace mirrorcheck::cli
