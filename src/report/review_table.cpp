// The review for a person at a terminal: the verdict and a summary row per output first,
// then one block per mirror (its devices, each output's resistance three ways, headroom,
// ratio and that output's findings), then what concerns the whole circuit. Every line fits
// the width (wrapped with a hanging indent); colour, when on, only repeats what a word
// already says.
#include "src/report/review_report.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "parsers/common/si_format.hpp"
#include "src/report/finding_text.hpp"
#include "src/report/text_layout.hpp"

namespace mirrorcheck::report {
namespace {

class TableWriter {
public:
    TableWriter(const ReviewTree& tree, const TableStyle& style) : t_(tree), style_(style) {}

    std::string write() {
        title();
        summary_table();
        if (style_.summary_only) return out_;
        for (const ReviewMirror& m : t_.mirrors) mirror_block(m);
        circuit_block();
        return out_;
    }

private:
    const ReviewTree& t_;
    const TableStyle& style_;
    std::string out_;

    void line(const std::string& text, std::size_t indent) { out_ += wrap(text, style_.width, indent); }
    void blank() { out_ += "\n"; }

    std::string colour(std::string_view text, Colour c) const { return coloured(text, c, style_.colour); }

    static Colour severity_colour(Severity s) {
        return s == Severity::error ? Colour::red : s == Severity::warning ? Colour::yellow : Colour::dim;
    }

    const std::string& name(std::size_t device) const { return t_.devices[device].designer_name; }

    static std::string plural(std::size_t n, std::string_view word) {
        return fmt::format("{} {}{}", n, word, n == 1 ? "" : "s");
    }

    // Title and verdict ------------------------------------------------------------------

    void title() {
        line(fmt::format("{} {} review of {} at {}", t_.tool.name, t_.tool.version, t_.inputs.netlist,
                         t_.inputs.op_source),
             4);
        const ReviewSummary& s = t_.summary;
        const std::string severity(to_string(t_.settings.fail_on));
        std::string verdict;
        if (s.passed)
            verdict = colour("pass", Colour::green) + fmt::format(": no finding at {} severity", severity);
        else if (s.failed_outputs > 0)
            verdict = colour("fail", Colour::red) + fmt::format(": {} of {} {} at {} severity", s.failed_outputs,
                                                                 plural(s.outputs, "output"),
                                                                 s.failed_outputs == 1 ? "fails" : "fail", severity);
        else
            verdict = colour("fail", Colour::red) + fmt::format(": findings of the whole circuit at {} severity", severity);
        std::string counts = fmt::format("{}, {}, {} info", plural(s.errors, "error"), plural(s.warnings, "warning"),
                                         s.infos);
        if (s.waived) counts += fmt::format(", {} waived", s.waived);
        line(fmt::format("{}; {}; {}", verdict, plural(s.mirrors, "mirror"), counts), 4);
    }

    // Summary: one row per output --------------------------------------------------------

    std::string resistance(const ReviewOutput& o, int which) const {
        if (which == 0) return o.rout.inspection.value > 0 ? format_si(o.rout.inspection.value, "Ω") : "-";
        if (which == 1) return o.rout.own.resistance ? format_si(*o.rout.own.resistance, "Ω") : "-";
        if (which == 2) return o.rout.linearised.resistance ? format_si(*o.rout.linearised.resistance, "Ω") : "-";
        const SimulatedValue* sim = o.rout.simulated.best();
        return sim ? format_si(sim->magnitude, "Ω") : "-";
    }

    // "fail", "warning" (passes, with warnings) or "pass".
    std::string status_word(const ReviewOutput& o) const {
        if (o.status == OutputStatus::fail) return "fail";
        if (o.worst_severity && *o.worst_severity < Severity::info) return std::string(to_string(*o.worst_severity));
        return "pass";
    }

    static Colour status_colour(const ReviewOutput& o) {
        if (o.status == OutputStatus::fail) return Colour::red;
        return o.worst_severity == Severity::warning ? Colour::yellow : Colour::green;
    }

    std::string ratio_text(const ReviewOutput& o) const {
        if (!o.ratio) return "-";
        return format_plain(o.ratio->measured, 4) + (o.ratio->design ? "/" + format_plain(*o.ratio->design, 4) : "");
    }

    void summary_table() {
        std::vector<std::vector<std::string>> rows = {
            {"output", "status", "inspection", "own", "node", "simulated", "worst margin", "headroom", "ratio", "mirror"}};
        std::vector<const ReviewOutput*> outputs;
        for (const ReviewMirror& m : t_.mirrors)
            for (const ReviewOutput& o : m.outputs) {
                std::string worst = "-";
                if (o.worst_device)
                    worst = name(*o.worst_device) + " " + format_si(t_.devices[*o.worst_device].margin, "V");
                rows.push_back({o.node, status_word(o), resistance(o, 0), resistance(o, 1), resistance(o, 2),
                                resistance(o, 3), worst,
                                format_si(o.headroom.margin, "V"), ratio_text(o), m.label});
                outputs.push_back(&o);
            }
        if (outputs.empty()) return;
        std::vector<std::size_t> widths(rows.front().size(), 0);
        for (const auto& r : rows)
            for (std::size_t c = 0; c < r.size(); ++c) widths[c] = std::max(widths[c], display_width(r[c]));
        blank();
        for (std::size_t k = 0; k < rows.size(); ++k) {
            const auto& r = rows[k];
            std::string text;
            for (std::size_t c = 0; c < r.size(); ++c) {
                const bool numeric = c >= 2 && c <= 7;
                std::string cell = numeric ? pad_left(r[c], widths[c]) : pad_right(r[c], widths[c]);
                if (c == 1 && k > 0) cell = colour(cell, status_colour(*outputs[k - 1]));
                if (c + 1 == r.size()) cell = r[c];  // no trailing spaces
                text += (c == 0 ? "" : "  ") + cell;
            }
            line(text, widths[0] + 2);
        }
    }

    // Mirror blocks ----------------------------------------------------------------------

    std::vector<std::string> device_row(std::size_t index, const std::string& role) const {
        const ReviewDevice& d = t_.devices[index];
        auto v = [](const std::optional<double>& x, const char* unit) { return x ? format_si(*x, unit) : "-"; };
        const std::optional<double> vds = d.mos ? d.mos_values.vds : d.bipolar_values.vce;
        const std::optional<double> gm = d.mos ? d.mos_values.gm : d.bipolar_values.gm;
        const std::optional<double> gds = d.mos ? d.mos_values.gds : d.bipolar_values.go;
        return {name(index), role, std::string(to_string(d.region)), v(vds, "V"), format_si(d.saturation_voltage, "V"),
                format_si(d.margin, "V") + (d.low_margin ? " low" : ""), v(gm, "S"), v(gds, "S")};
    }

    void device_table(const ReviewMirror& m) {
        if (m.outputs.empty() && m.reference.empty()) return;
        const bool mos = !m.reference.empty() ? t_.devices[m.reference.front()].mos
                                               : t_.devices[m.outputs.front().devices.front()].mos;
        std::vector<std::vector<std::string>> rows = {
            {"device", "role", "region", mos ? "Vds" : "Vce", mos ? "Vdsat" : "Vce,sat", "margin", "gm",
             mos ? "gds" : "go"}};
        for (std::size_t d : m.reference) rows.push_back(device_row(d, "reference"));
        for (const ReviewOutput& o : m.outputs)
            for (std::size_t d : o.devices) rows.push_back(device_row(d, "output " + o.node));
        std::vector<std::size_t> widths(rows.front().size(), 0);
        for (const auto& r : rows)
            for (std::size_t c = 0; c < r.size(); ++c) widths[c] = std::max(widths[c], display_width(r[c]));
        for (std::size_t k = 0; k < rows.size(); ++k) {
            std::string text = "  ";
            for (std::size_t c = 0; c < rows[k].size(); ++c) {
                std::string cell = c >= 3 ? pad_left(rows[k][c], widths[c]) : pad_right(rows[k][c], widths[c]);
                if (c == 2 && k > 0 && rows[k][c] != "saturation" && rows[k][c] != "forward-active")
                    cell = colour(cell, Colour::red);
                text += "  " + cell;
            }
            while (!text.empty() && text.back() == ' ') text.pop_back();
            line(text, 8);
        }
    }

    std::string agreement(const ResistanceComparison& c) const {
        std::string label = c.pair == "inspection-vs-own"               ? "inspection/own"
                            : c.pair == "own-vs-simulated-alone"        ? "own/alone simulated"
                            : c.pair == "own-vs-linearised"             ? "own/node"
                            : c.pair == "linearised-vs-simulated"       ? "linearised/simulated"
                            : c.pair == "inspection-vs-simulated-alone" ? "inspection/alone simulated"
                                                                        : "inspection/simulated";
        std::string value;
        if (!std::isfinite(c.difference)) value = "unbounded";
        else if (std::abs(c.difference) < 1.0)
            value = fmt::format("{:+.1f} %", std::abs(c.difference) < 5e-4 ? 0.0 : 100.0 * c.difference);
        else value = "×" + format_plain(c.difference + 1.0, 3);
        return label + " " + value + (c.agrees ? "" : " (" + colour("disagree", Colour::yellow) + ")");
    }

    // The range a solved value spans across what the op data leaves open, when it is not nil.
    void range_line(const LinearisedImpedance& v, std::size_t hang) {
        if (v.resistance_low && v.resistance_high && *v.resistance_high - *v.resistance_low > 1e-6 * std::abs(*v.resistance))
            line(fmt::format("                      {:>9}  within {:+.2g} % to {:+.2g} %: what the op data leaves open",
                             "", 100 * (*v.resistance_low / *v.resistance - 1),
                             100 * (*v.resistance_high / *v.resistance - 1)),
                 hang);
    }

    void resistances(const ReviewOutput& o) {
        const RoutEstimate& best = o.rout.inspection;
        const std::size_t hang = 33;  // where the text after the values starts
        const std::string text_column(hang, ' ');
        line(fmt::format("    Rout  inspection  {:>9}  {}, {}; {} without body effect",
                         best.value > 0 || !std::isfinite(best.value) ? format_si(best.value, "Ω") : "-", best.method,
                         best.exact ? "exact" : "approximate", format_si(best.value_no_body, "Ω")),
             hang);
        line(text_column + "= " + best.formula, hang + 2);
        // The plain reflection rule's note is the same everywhere (README: reading a review).
        if (!best.note.empty() && !(best.method == "reflection" && best.exact)) line(text_column + best.note, hang);
        const LinearisedImpedance& own = o.rout.own;
        if (own.resistance) {
            std::string held;
            for (const auto& n : o.rout.own_held)
                if (n != "0") held += (held.empty() ? "" : ", ") + n;
            line(fmt::format("          own         {:>9}  the mirror alone: {}{}", format_si(*own.resistance, "Ω"),
                             value_text(FindingValue::names("", o.rout.own_devices), t_.display_names),
                             held.empty() ? "" : "; held: " + held),
                 hang);
            range_line(own, hang);
        } else {
            line(fmt::format("          own         {:>9}  {}", "-", own.note.empty() ? "not computed" : own.note), hang);
        }
        if (const auto& alone = o.rout.own_simulated.value)
            line(fmt::format("          alone sim.  {:>9}  ngspice, the testbench of the mirror alone: {}",
                             format_si(alone->magnitude, "Ω"), alone->source),
                 hang);
        const LinearisedImpedance& lin = o.rout.linearised;
        if (lin.resistance) {
            const std::string where = lin.scope.empty() || lin.scope == "whole circuit"
                                          ? "the node " + o.node + " in the whole circuit"
                                          : "the node " + o.node + ", " + lin.scope;
            line(fmt::format("          linearised  {:>9}  {}{}", format_si(*lin.resistance, "Ω"), where,
                             lin.note.empty() ? "" : "; " + lin.note),
                 hang);
            range_line(lin, hang);
            if (lin.corner_frequency)
                line(fmt::format("                      {:>9}  where |Z| falls 3 dB below its DC value",
                                 format_si(*lin.corner_frequency, "Hz")),
                     hang);
        } else {
            line(fmt::format("          linearised  {:>9}  {}", "-", lin.note.empty() ? "not computed" : lin.note), hang);
        }
        const SimulatedImpedance& sim = o.rout.simulated;
        if (const SimulatedValue* best_sim = sim.best()) {
            // A phase that rounds to 0° prints as 0°, not as the "-0°" of a tiny negative one.
            const double degrees = std::abs(best_sim->phase_degrees) < 0.5 ? 0.0 : best_sim->phase_degrees;
            const std::string phase = best_sim->frequency ? fmt::format(", phase {:.0f}°", degrees) : std::string();
            line(fmt::format("          simulated   {:>9}  {} by {}: {}{}", format_si(best_sim->magnitude, "Ω"),
                             sim.probe_mode, sim.probe, best_sim->source, phase),
                 hang);
            for (std::size_t k = 1; k < sim.values.size(); ++k)
                line(fmt::format("                      {:>9}  also {}", format_si(sim.values[k].magnitude, "Ω"),
                                 sim.values[k].source),
                     hang);
        } else {
            line(fmt::format("          simulated   {:>9}  {}", "-", sim.note.empty() ? "not simulated" : sim.note),
                 hang);
        }
        if (!o.rout.comparisons.empty()) {
            std::string text;
            for (const auto& c : o.rout.comparisons) text += (text.empty() ? "" : ", ") + agreement(c);
            line("          agreement   " + text, 22);
        }
    }

    void finding_lines(const std::vector<std::size_t>& findings, std::size_t indent) {
        std::size_t code_width = 0;
        for (std::size_t k : findings) code_width = std::max(code_width, to_string(t_.findings[k].code).size());
        for (std::size_t k : findings) {
            const Finding& f = t_.findings[k];
            const std::string severity = f.waived ? "waived" : std::string(to_string(f.severity));
            const std::string word = colour(pad_right(severity, 7), f.waived ? Colour::dim : severity_colour(f.severity));
            const std::string lead(indent, ' ');
            line(fmt::format("{}{} {} {}", lead, word, pad_right(to_string(f.code), code_width),
                             finding_sentence(f, t_.display_names)),
                 indent + 8 + code_width + 1);
            if (f.waived)
                line(fmt::format("{}{} waived {}: {}", lead, std::string(8 + code_width, ' '), to_string(f.severity),
                                 f.waiver),
                     indent + 8 + code_width + 1);
        }
    }

    void output_block(const ReviewOutput& o) {
        std::string stack;
        for (std::size_t d : o.devices) stack += (stack.empty() ? "" : " -> ") + name(d);
        line(fmt::format("  output {}: {}, {}", o.node, stack, colour(status_word(o), status_colour(o))), 4);
        resistances(o);
        const Headroom& h = o.headroom;
        std::string text = fmt::format("    headroom  Vout {}, {} {}, margin {}",
                                       h.output_voltage ? format_si(*h.output_voltage, "V") : "-",
                                       h.sink ? "min" : "max", h.limit ? format_si(*h.limit, "V") : "-",
                                       format_si(h.margin, "V"));
        if (o.ratio)
            text += fmt::format("; ratio {}, design {}, predicted {}", format_plain(o.ratio->measured, 4),
                                o.ratio->design ? format_plain(*o.ratio->design, 4) : "-",
                                o.ratio->predicted ? format_plain(*o.ratio->predicted, 4) : "-");
        line(text, 14);
        finding_lines(o.findings, 4);
    }

    void mirror_block(const ReviewMirror& m) {
        blank();
        line(m.reference_node.empty() ? m.label : fmt::format("{}, reference at {}", m.label, m.reference_node), 4);
        device_table(m);
        for (const ReviewOutput& o : m.outputs) output_block(o);
    }

    void circuit_block() {
        if (!t_.circuit_findings.empty()) {
            blank();
            line("the whole circuit", 2);
            finding_lines(t_.circuit_findings, 2);
        }
        if (!t_.assumptions.empty() || !t_.notes.empty()) blank();
        for (const auto& a : t_.assumptions) line("assumed: " + a, 9);
        for (const auto& n : t_.notes) line("note: " + n, 6);
        if (!t_.solve_notes.empty()) {
            blank();
            line("linearised solve", 2);
            for (const auto& n : t_.solve_notes) {
                if (n.devices.empty()) line("  " + n.cause, 4);
                else if (n.devices.size() == 1)
                    line("  " + n.cause + ": " + value_text(FindingValue::names("", n.devices), t_.display_names), 4);
                else
                    line(fmt::format("  {}: {} devices ({})", n.cause, n.devices.size(),
                                     value_text(FindingValue::names("", n.devices), t_.display_names)),
                         4);
            }
        }
    }
};

}  // namespace

std::string write_review_table(const ReviewTree& tree, const TableStyle& style) {
    return TableWriter(tree, style).write();
}

}  // namespace mirrorcheck::report
