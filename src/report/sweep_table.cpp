// The sweep as a terminal table: the verdict, then one block per mirror output, worst first
// (lowest yield, then lowest headroom margin), each quantity's mean, σ and extremes with the
// run that reached them, the findings with how many runs raised them; the transistors by
// lowest saturation margin with the regions they spent runs in; and the runs that failed.
#include <algorithm>
#include <limits>

#include <fmt/format.h>

#include "parsers/common/si_format.hpp"
#include "src/report/json_text.hpp"
#include "src/report/sweep_report.hpp"
#include "src/report/text_layout.hpp"

namespace mirrorcheck::report {
namespace {

const char* const quantity_names[] = {"Rout inspection", "Rout linearised", "Rout simulated", "current ratio",
                                      "headroom margin"};
const char* const quantity_units[] = {"Ω", "Ω", "Ω", "", "V"};

std::string value_text(double x, const char* unit) {
    return *unit ? format_si(x, unit) : format_plain(x, 4);
}

double lowest_margin(const sweep::OutputStatistics& o) {
    const auto& s = o.values[4];
    return s ? s->min : std::numeric_limits<double>::infinity();
}

std::string statistic_row(const sweep::Statistic& s, std::size_t q) {
    const char* unit = quantity_units[q];
    return "  " + pad_right(quantity_names[q], 17) + pad_left(value_text(s.mean, unit), 10) + "  " +
           pad_left(s.sigma ? value_text(*s.sigma, unit) : std::string("-"), 10) + "  " +
           pad_right(value_text(s.min, unit) + " (" + s.min_run + ")", 28) + "  " + value_text(s.max, unit) + " (" +
           s.max_run + ")\n";
}

std::string runs_text(std::size_t n) { return fmt::format("{} run{}", n, n == 1 ? "" : "s"); }

std::string output_block(const sweep::OutputStatistics& o, std::size_t runs, const TableStyle& style) {
    const bool full = o.passed == runs;
    std::string out = fmt::format("{} output {}  yield {} ({} of {})\n", o.label, o.node,
                                  coloured(format_percent(o.yield), full ? Colour::green : Colour::red, style.colour),
                                  o.passed, runs_text(runs));
    out += "  " + pad_right("quantity", 17) + pad_left("mean", 10) + "  " + pad_left("σ", 10) + "  " +
           pad_right("min (run)", 28) + "  max (run)\n";
    for (std::size_t q : {4u, 3u, 0u, 1u, 2u})
        if (o.values[q]) out += statistic_row(*o.values[q], q);
    for (const auto& [code, n] : o.findings) out += wrap("  " + code + ": " + runs_text(n), style.width, 4);
    if (!o.failed_runs.empty()) {
        std::string listed;
        for (std::size_t k = 0; k < o.failed_runs.size() && k < 8; ++k) listed += (k ? ", " : "") + o.failed_runs[k];
        if (o.failed_runs.size() > 8) listed += fmt::format(" and {} more", o.failed_runs.size() - 8);
        out += wrap("  did not pass in: " + listed, style.width, 4);
    }
    return out + "\n";
}

std::string devices_block(const sweep::SweepResult& r) {
    std::vector<const sweep::DeviceStatistics*> devices;
    for (const auto& d : r.devices) devices.push_back(&d);
    const auto low = [](const sweep::DeviceStatistics* d) {
        return d->margin ? d->margin->min : std::numeric_limits<double>::infinity();
    };
    std::stable_sort(devices.begin(), devices.end(), [&](auto* a, auto* b) { return low(a) < low(b); });
    std::size_t name_width = 6;
    for (const auto* d : devices) name_width = std::max(name_width, display_width(d->name));
    std::string out = "Transistors, lowest saturation margin first\n";
    out += "  " + pad_right("device", name_width) + "  " + pad_left("margin min", 10) + "  " +
           pad_right("(run)", 24) + pad_left("mean", 10) + "  " + pad_left("σ", 10) + "  regions\n";
    for (const auto* d : devices) {
        std::string regions;
        for (const auto& [region, n] : d->regions) regions += (regions.empty() ? "" : ", ") + region + " " + std::to_string(n);
        const auto& m = d->margin;
        out += "  " + pad_right(d->name, name_width) + "  " + pad_left(m ? format_si(m->min, "V") : "-", 10) + "  " +
               pad_right(m ? "(" + m->min_run + ")" : "", 24) + pad_left(m ? format_si(m->mean, "V") : "-", 10) +
               "  " + pad_left(m && m->sigma ? format_si(*m->sigma, "V") : "-", 10) + "  " + regions + "\n";
    }
    return out;
}

std::string runs_block(const sweep::SweepResult& r, const TableStyle& style) {
    std::string out;
    for (const auto& run : r.runs) {
        if (run.failed) out += wrap("  " + run.label + ": failed: " + run.failure, style.width, 4);
        else if (!run.passed)
            out += wrap(fmt::format("  {}: {} error{}, {} warning{} ({})", run.label, run.errors,
                                    run.errors == 1 ? "" : "s", run.warnings, run.warnings == 1 ? "" : "s", run.source),
                        style.width, 4);
    }
    return out.empty() ? out : "\nRuns that did not pass\n" + out;
}

}  // namespace

std::string write_sweep_table(const sweep::SweepResult& r, const SweepInputs& inputs, const TableStyle& style) {
    const sweep::SweepSummary& s = r.summary;
    std::string out = fmt::format(
        "mirrorcheck {}: {}  {}, yield {} ({} passed, {} with failing findings, {} failed to run){}\n\n",
        inputs.command, coloured(s.passed ? "PASS" : "FAIL", s.passed ? Colour::green : Colour::red, style.colour),
        runs_text(s.runs), format_percent(s.yield), s.runs - s.failed_runs - s.runs_with_errors, s.runs_with_errors,
        s.failed_runs, s.min_yield ? ", minimum yield " + format_percent(*s.min_yield) : std::string());
    if (style.summary_only) return out;
    std::vector<const sweep::OutputStatistics*> outputs;
    for (const auto& o : r.outputs) outputs.push_back(&o);
    std::stable_sort(outputs.begin(), outputs.end(), [](auto* a, auto* b) {
        if (a->yield != b->yield) return a->yield < b->yield;
        return lowest_margin(*a) < lowest_margin(*b);
    });
    for (const auto* o : outputs) out += output_block(*o, s.runs, style);
    if (!r.devices.empty()) out += devices_block(r);
    return out + runs_block(r, style);
}

void write_sweep(Format format, const sweep::SweepResult& result, const SweepInputs& inputs, std::ostream& out,
                 const TableStyle& style) {
    switch (format) {
        case Format::table:
            out << terminal_text(write_sweep_table(result, inputs, style), style.colour);
            break;
        case Format::json:
            out << json_text(sweep_to_json(result, inputs)) << "\n";
            break;
        case Format::junit:
            out << sweep_to_junit(result, inputs);
            break;
    }
}

}  // namespace mirrorcheck::report
