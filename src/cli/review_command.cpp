#include "src/cli/review_command.hpp"

#include <cmath>
#include <filesystem>
#include <iostream>
#include <memory>

#include "parsers/common/input_kind.hpp"
#include "parsers/common/quantity.hpp"
#include "parsers/listing/listing.hpp"
#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/cli/netlist_limits_option.hpp"
#include "src/cli/usage_errors.hpp"
#include "src/model/op_point_build.hpp"
#include "src/model/simulation_plots_build.hpp"
#include "parsers/waivers/waivers.hpp"
#include "src/cli/exit_status.hpp"
#include "src/cli/terminal.hpp"
#include "src/report/review_report.hpp"

namespace mirrorcheck::cli {

double quantity(const std::string& option, const std::string& text, const char* unit) {
    auto v = parse_quantity(text, unit);
    if (!v) {
        if (lacks_unit(text)) throw usage::quantity_without_unit(option, text, unit);
        throw usage::bad_quantity(option, text, unit);
    }
    if (!std::isfinite(*v)) throw usage::not_finite_quantity(option, text);
    if (*v < 0) throw usage::negative_quantity(option, text);
    return *v;
}

namespace {

InspectOptions inspect_options(const ReviewOptions& o) {
    InspectOptions options;
    options.margin = quantity("--margin", o.margin, "V");
    options.vce_sat = quantity("--vce-sat", o.vce_sat, "V");
    options.ratio_tolerance = quantity("--ratio-tolerance", o.ratio_tolerance, "%");
    return options;
}

// "1Mohm", "500kΩ".
double ohms(const std::string& option, const std::string& text) {
    if (auto v = parse_quantity(text, "Ω"); v && *v >= 0) return *v;
    return quantity(option, text, "ohm");
}

// --min-impedance R (every output) or NODE=R (one output node, before the general one).
void add_min_impedance(ReviewSettings& settings, const std::string& text) {
    const auto eq = text.find('=');
    if (eq == std::string::npos) {
        settings.min_impedance = ohms("--min-impedance", text);
        return;
    }
    if (eq == 0 || eq + 1 == text.size()) throw usage::bad_min_impedance(text);
    settings.min_impedance_by_node.emplace_back(text.substr(0, eq), ohms("--min-impedance", text.substr(eq + 1)));
}

}  // namespace

ReviewSettings review_settings(const ReviewOptions& o) {
    ReviewSettings settings;
    settings.inspect = inspect_options(o);
    settings.tolerance = quantity("--tolerance", o.tolerance, "%");
    for (const auto& m : o.min_impedance) add_min_impedance(settings, m);
    for (const auto& path : o.waive) {
        auto more = waivers::read_waivers(path, finding_code_names());
        settings.waivers.insert(settings.waivers.end(), more.begin(), more.end());
        settings.waiver_files.push_back(path);
    }
    settings.fail_on = parse_severity(o.fail_on).value_or(Severity::error);
    if (!o.at.empty()) settings.simulated.at = quantity("--at", o.at, "Hz");
    for (const auto& p : o.probes) {
        auto eq = p.find('=');
        if (eq == std::string::npos || eq == 0 || eq + 1 == p.size()) throw usage::bad_probe(p);
        settings.simulated.probes.push_back({p.substr(0, eq), p.substr(eq + 1)});
    }
    return settings;
}

namespace {

// What the report calls the --op file: its path, or the name `run` gives the results it
// deletes before the reader could look (a report must not name a file that is gone).
std::string shown_name(const ReviewOptions& o) { return o.op_name.empty() ? o.op : o.op_name; }

// The AC and .tf plots of the op file (when it is a raw file) and of every --ac and --tf file.
std::vector<SimulationPlot> read_simulation_plots(const ReviewOptions& o, std::vector<std::string>& used) {
    std::vector<SimulationPlot> plots;
    auto add = [&](const std::string& path, bool must_have) {
        if (detect_input_kind(path) != InputKind::raw) {
            if (must_have) throw usage::no_small_signal_plot(path);
            return;
        }
        auto more = simulation_plots_from_raw(raw::read_raw(path, raw::Selection{{"ac", "tf"}, false}));
        if (more.empty() && must_have) throw usage::no_small_signal_plot(path);
        if (!more.empty()) used.push_back(path == o.op ? shown_name(o) : path);
        if (path == o.op && !o.op_name.empty()) {
            const std::string file_name = std::filesystem::path(path).filename().string();
            for (auto& p : more)
                if (p.origin.rfind(file_name, 0) == 0) p.origin = o.op_name + p.origin.substr(file_name.size());
        }
        for (auto& p : more) plots.push_back(std::move(p));
    };
    add(o.op, false);
    for (const auto& path : o.ac) add(path, true);
    for (const auto& path : o.tf) add(path, true);
    return plots;
}

// The op plot of a raw file, else its first AC plot (which repeats the device parameters).
OpPoint op_from_raw(const Circuit& circuit, const std::string& path) {
    raw::RawFile file = raw::read_raw(path, raw::Selection{{"op", "ac"}, false});
    for (const char* kind : {"op", "ac"})
        for (const auto& plot : file.plots)
            if (plot.kind() == kind && plot.decoded && plot.point_count > 0) return build_op_point(circuit, file, plot);
    throw usage::no_op_plot(path);
}

OpPoint read_op(const Circuit& circuit, const std::string& path) {
    if (detect_input_kind(path) == InputKind::raw) return op_from_raw(circuit, path);
    if (detect_input_kind(path) == InputKind::listing) return build_op_point(circuit, listing::read_listing(path));
    throw usage::no_op_plot(path);
}

}  // namespace

namespace {

int review_with(const ReviewOptions& o, const ReviewSettings& settings, const Circuit& circuit,
                const std::vector<std::string>& left_out) {
    // A probe that names no node or no source of the circuit would be silently unused.
    for (const auto& probe : settings.simulated.probes) {
        if (!circuit.find_net(probe.node)) throw usage::probe_names_nothing(probe.node + "=" + probe.source, "node", probe.node);
        if (!circuit.find_device(probe.source))
            throw usage::probe_names_nothing(probe.node + "=" + probe.source, "source", probe.source);
    }
    OpPoint op = read_op(circuit, o.op);
    if (!o.op_name.empty() && op.origin.rfind(o.op, 0) == 0) op.origin = o.op_name + op.origin.substr(o.op.size());
    std::vector<std::string> simulation_files;
    std::vector<SimulationPlot> plots = read_simulation_plots(o, simulation_files);
    ReviewInputs inputs{o.netlist, op.origin, simulation_files, left_out};
    const ReviewTree tree = run_review(circuit, std::move(op), std::move(plots), settings, std::move(inputs));
    const Terminal terminal = stdout_terminal();
    report::TableStyle style{terminal.width, terminal.colour, o.summary};
    report::write_review(report::parse_format(o.format).value_or(report::Format::table), tree, std::cout, style);
    return tree.summary.passed ? exit_passed : exit_findings;
}

}  // namespace

int review_and_report(const ReviewOptions& o) {
    const ReviewSettings settings = review_settings(o);
    return review_with(o, settings, read_circuit(o.netlist, o.limits), {});
}

int review_circuit_and_report(const ReviewOptions& o, const Circuit& circuit, const std::vector<std::string>& left_out) {
    return review_with(o, review_settings(o), circuit, left_out);
}

void add_judgement_options(CLI::App& cmd, ReviewOptions& o) {
    cmd.add_option("--margin", o.margin, "saturation margin Vds - Vdsat below which to warn, with its unit (default 100mV)");
    cmd.add_option("--vce-sat", o.vce_sat, "bipolar Vce at which saturation begins, with its unit (default 0.2V)");
    cmd.add_option("--ratio-tolerance", o.ratio_tolerance, "current-ratio error above which to warn (default 5%)");
    cmd.add_option("--at", o.at,
                   "frequency at which to read AC plots, within their sweep (default: each plot's lowest), e.g. 10Hz");
    cmd.add_option("--tolerance", o.tolerance,
                   "relative difference above which two resistance values disagree (default 10%)");
    cmd.add_option("--min-impedance", o.min_impedance,
                   "R or NODE=R: warn when an output node's impedance in the circuit is below R, e.g. 1Mohm or "
                   "out=500kohm (repeatable; without it a loaded node is information only)");
    cmd.add_option("--waive", o.waive, "waiver file: lines `SUBJECT CODE REASON` of findings to accept (repeatable)")
        ->check(CLI::ExistingFile);
    cmd.add_option("--format", o.format, "output format: table, json (schema mirrorcheck-report/1) or junit (XML)")
        ->check(CLI::IsMember({"table", "json", "junit"}));
    cmd.add_option("--fail-on", o.fail_on,
                   "the severity that fails the review: error (default) or warning; sets the exit status and JUnit's "
                   "failures")
        ->check(CLI::IsMember({"error", "warning"}));
    cmd.add_flag("--summary", o.summary, "table: print the verdict and one row per output only");
}

void add_review_command(CLI::App& app, int& status) {
    auto o = std::make_shared<ReviewOptions>();
    CLI::App* cmd = app.add_subcommand("review", "Check every current mirror against an operating point");
    cmd->footer(
        "For each mirror: each transistor's region and saturation margin, the output\n"
        "headroom, the current ratio against the design, and the output resistance: by\n"
        "inspection (reflection rule and family formulas) against the mirror's own (an\n"
        "exact small-signal solve of the mirror alone), and the impedance the node shows in\n"
        "the circuit, linearised (the whole circuit solved) and simulated (read through a\n"
        "probe source from AC or .tf plots), with a finding naming the likely cause wherever\n"
        "two disagree by more than --tolerance; a node loaded by the circuit is reported as\n"
        "information, and checked only against --min-impedance. The operating point comes from an ngspice raw\n"
        "file (op plot, or an AC plot that repeats the device parameters) or from ngspice's\n"
        "`show all` listing; `mirrorcheck prepare` writes a deck that saves all of it.\n\n"
        "Values take their unit (100mV, 10%, 1kHz); a bare number is refused.\n\n"
        "Exit status: 0 no unwaived finding at the failing severity (--fail-on, default\n"
        "error), 1 some, 2 bad usage or input, 3 an internal error.\n\n"
        "Examples:\n"
        "  mirrorcheck review samples/tamarack/bias.cir --op samples/tamarack/bias_op.raw\n"
        "  mirrorcheck review amp.cir --op op.raw --ac probes.raw --probe out=vout --at 10Hz\n"
        "  mirrorcheck review amp.cir --op show.txt --margin 50mV --format json\n"
        "  mirrorcheck review amp.cir --op op.raw --waive accepted.txt --format junit > review.xml\n"
        "  mirrorcheck review amp.cir --op op.raw --summary --fail-on warning");
    cmd->add_option("NETLIST", o->netlist, "ngspice netlist")->required()->check(CLI::ExistingFile);
    cmd->add_option("--op", o->op, "operating point: raw file (binary or ASCII) or `show` listing")
        ->required()
        ->check(CLI::ExistingFile);
    cmd->add_option("--ac", o->ac, "raw file with AC plots probing the outputs (repeatable; the --op raw file is read too)")
        ->check(CLI::ExistingFile);
    cmd->add_option("--tf", o->tf, "raw file with .tf plots naming the probes (repeatable)")->check(CLI::ExistingFile);
    add_netlist_limit_options(*cmd, o->limits);
    cmd->add_option("--probe", o->probes, "NODE=SOURCE: the source that probes output NODE (repeatable)");
    add_judgement_options(*cmd, *o);
    cmd->callback([o, &status] { status = review_and_report(*o); });
}

}  // namespace mirrorcheck::cli
