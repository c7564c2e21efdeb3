// Renders a review. Values come from the passes; this file only chooses what to show and
// how: SI prefixes and units for people, plain SI numbers in JSON.
#include "src/report/review_report.hpp"

#include <cmath>
#include <set>

#include <fmt/format.h>

#include "src/report/device_names.hpp"
#include "src/report/finding_scope.hpp"
#include "parsers/common/si_format.hpp"

namespace mirrorcheck::report {
namespace {

nlohmann::json optional_number(const std::optional<double>& x) { return x ? nlohmann::json(*x) : nlohmann::json(); }

const Device& device(const Circuit& c, std::size_t i) { return c.devices()[i]; }

// The current of a transistor in device polarity: id for MOS, ic for bipolar.
std::optional<double> current_of(const OpPoint& op, const Device& d) {
    const DeviceOp* dev = op.device(d.name);
    if (!dev) return std::nullopt;
    return dev->get(dev->is_mos ? "id" : "ic");
}

nlohmann::json finding_json(const Finding& f) {
    nlohmann::json j = {
        {"severity", to_string(f.severity)}, {"code", f.code}, {"subject", f.subject}, {"message", f.message}};
    if (f.waived) {
        j["waived"] = true;
        j["waiver"] = f.waiver;
    }
    return j;
}

nlohmann::json comparisons_json(const OutputReconciliation* r) {
    nlohmann::json j = nlohmann::json::array();
    if (r)
        for (const auto& c : r->comparisons)
            j.push_back({{"pair", c.pair}, {"first", c.first}, {"second", c.second}, {"difference", c.difference},
                         {"agrees", c.agrees}});
    return j;
}

nlohmann::json spectrum_json(const LinearisedImpedance* linearised) {
    nlohmann::json j = nlohmann::json::array();
    if (linearised)
        for (const auto& p : linearised->spectrum)
            j.push_back({{"frequency", p.frequency}, {"magnitude", p.magnitude}, {"phase_degrees", p.phase_degrees}});
    return j;
}

nlohmann::json rout_json(const OutputInspection& o, const LinearisedImpedance* linearised,
                         const SimulatedImpedance* simulated, const OutputReconciliation* reconciliation) {
    const RoutEstimate& best = o.best();
    nlohmann::json levels = nlohmann::json::array();
    for (const auto& l : o.levels)
        levels.push_back({{"device", l.name}, {"ro", l.ro}, {"gm", l.gm}, {"gmb", l.gmb}, {"rs", l.rs}, {"rout", l.rout}});
    const SimulatedValue* sim = simulated ? simulated->best() : nullptr;
    nlohmann::json all_simulated = nlohmann::json::array();
    if (simulated)
        for (const auto& v : simulated->values)
            all_simulated.push_back({{"magnitude", v.magnitude},
                                     {"phase_degrees", v.phase_degrees},
                                     {"frequency", optional_number(v.frequency)},
                                     {"source", v.source}});
    return {{"inspection", best.value},
            {"inspection_no_body", best.value_no_body},
            {"formula", best.formula},
            {"method", best.method},
            {"exact", best.exact},
            {"note", best.note},
            {"reflection", o.reflection.value},
            {"levels", levels},
            {"linearised", linearised ? optional_number(linearised->resistance) : nlohmann::json()},
            {"linearised_note", linearised ? linearised->note : std::string()},
            {"linearised_scope", linearised && !linearised->scope.empty() ? nlohmann::json(linearised->scope) : nlohmann::json()},
            {"corner_frequency", linearised ? optional_number(linearised->corner_frequency) : nlohmann::json()},
            {"spectrum", spectrum_json(linearised)},
            {"spectrum_note", linearised ? linearised->spectrum_note : std::string()},
            {"simulated", sim ? nlohmann::json(sim->magnitude) : nlohmann::json()},
            {"simulated_source", sim ? nlohmann::json(sim->source) : nlohmann::json()},
            {"simulated_note", simulated ? simulated->note : std::string()},
            {"probe", simulated && !simulated->probe.empty() ? nlohmann::json(simulated->probe) : nlohmann::json()},
            {"probe_mode",
             simulated && !simulated->probe_mode.empty() ? nlohmann::json(simulated->probe_mode) : nlohmann::json()},
            {"simulated_values", all_simulated},
            {"comparisons", comparisons_json(reconciliation)}};
}

nlohmann::json headroom_json(const Headroom& h) {
    return {{"vout", optional_number(h.output_voltage)},
            {h.sink ? "vout_min" : "vout_max", optional_number(h.limit)},
            {"margin", h.margin}};
}

nlohmann::json current_json(const Circuit& c, const OpPoint& op, const Mirror& m, const MirrorOutput& o,
                            const OutputInspection& inspected) {
    nlohmann::json j = nlohmann::json::object();
    if (!m.reference.empty()) j["ref"] = optional_number(current_of(op, device(c, m.reference.front())));
    j["out"] = optional_number(current_of(op, device(c, o.devices.front())));
    if (inspected.ratio) {
        j["ratio"] = inspected.ratio->measured;
        j["design_ratio"] = optional_number(inspected.ratio->design);
        j["predicted_ratio"] = optional_number(inspected.ratio->predicted);
        j["error"] = optional_number(inspected.ratio->error);
        j["basis"] = inspected.ratio->basis;
    }
    return j;
}

nlohmann::json device_json(const Circuit& c, const OpPoint& op, const DeviceRegion& r) {
    const Device& d = device(c, r.device);
    nlohmann::json j = {{"name", d.name},
                        {"instance", d.instance_path()},
                        {"type", d.model ? d.model->type : ""},
                        {"region", to_string(r.region)},
                        {"saturation_voltage", r.saturation_voltage},
                        {"margin", r.headroom},
                        {"low_margin", r.low_margin}};
    if (const DeviceOp* dev = op.device(d.name))
        for (const auto& [q, v] : dev->values) j[q] = v;
    return j;
}

struct Counts {
    std::size_t errors = 0, warnings = 0, infos = 0, waived = 0;
};

Counts count(const std::vector<Finding>& findings) {
    Counts n;
    for (const auto& f : findings) {
        if (f.waived) ++n.waived;
        else if (f.severity == Severity::error) ++n.errors;
        else if (f.severity == Severity::warning) ++n.warnings;
        else ++n.infos;
    }
    return n;
}

}  // namespace

nlohmann::json review_to_json(const ReviewInputs& inputs, const Circuit& circuit, const OpPoint& op,
                              const Review& review) {
    nlohmann::json mirrors = nlohmann::json::array(), devices = nlohmann::json::array();
    std::set<std::size_t> listed;
    auto add_device = [&](const DeviceRegion& r) {
        if (listed.insert(r.device).second) devices.push_back(device_json(circuit, op, r));
    };
    for (std::size_t k = 0; k < review.mirrors.size(); ++k) {
        const Mirror& m = review.mirrors[k];
        const MirrorInspection& mi = review.inspection.mirrors[k];
        for (const auto& r : mi.reference) add_device(r);
        nlohmann::json outputs = nlohmann::json::array();
        for (std::size_t j = 0; j < m.outputs.size(); ++j) {
            const MirrorOutput& o = m.outputs[j];
            const OutputInspection& oi = mi.outputs[j];
            for (const auto& r : oi.devices) add_device(r);
            nlohmann::json findings = nlohmann::json::array();
            for (const auto& f : review.findings)
                if (finding_concerns_output(f, circuit, m, o)) findings.push_back(finding_json(f));
            outputs.push_back({{"node", o.node},
                               {"devices", device_names(circuit, o.devices)},
                               {"current", current_json(circuit, op, m, o, oi)},
                               {"rout", rout_json(oi, review.linearised_at(o.node), review.simulated_at(o.node),
                                                  review.reconciliation_at(m.id, o.node))},
                               {"headroom", headroom_json(oi.headroom)},
                               {"findings", findings}});
        }
        mirrors.push_back({{"id", m.id},
                           {"family", mirror_family_label(m)},
                           {"reference", device_names(circuit, m.reference)},
                           {"outputs", outputs}});
    }
    nlohmann::json all = nlohmann::json::array();
    for (const auto& f : review.findings) {
        auto j = finding_json(f);
        j["mirror"] = f.mirror;
        all.push_back(j);
    }
    Counts n = count(review.findings);
    nlohmann::json report = {{"schema", "mirrorcheck-report/1"},
            {"inputs", {{"netlist", inputs.netlist}, {"op", inputs.op_source}, {"simulation", inputs.simulation_files}}},
            {"assumptions", review.assumptions},
            {"mirrors", mirrors},
            {"devices", devices},
            {"findings", all},
            {"summary", {{"mirrors", review.mirrors.size()}, {"errors", n.errors}, {"warnings", n.warnings}, {"infos", n.infos}, {"waived", n.waived}}}};
    if (!inputs.left_out.empty()) report["inputs"]["left_out"] = inputs.left_out;  // `run`: what its deck left out
    return report;
}

namespace {

void write_device_line(std::string& out, const Circuit& c, const OpPoint& op, const DeviceRegion& r) {
    const Device& d = device(c, r.device);
    const DeviceOp* dev = op.device(d.name);
    bool mos = !dev || dev->is_mos;
    auto q = [&](const char* name, const char* unit) {
        auto v = dev ? dev->get(name) : std::nullopt;
        return v ? format_si(*v, unit) : std::string("-");
    };
    fmt::format_to(std::back_inserter(out), "    {:<22} {:<15} {} {:>9}  {} {:>9}  margin {:>9}{}  gm {:>9}  {} {:>9}\n",
                   device_label(c, r.device), to_string(r.region), mos ? "Vds" : "Vce", q(mos ? "vds" : "vce", "V"),
                   mos ? "Vdsat" : "Vce,sat", format_si(r.saturation_voltage, "V"), format_si(r.headroom, "V"),
                   r.low_margin ? " (low)" : "", q("gm", "S"), mos ? "gds" : "go", q(mos ? "gds" : "go", "S"));
}

std::string comparison_label(const std::string& pair) {
    if (pair == "inspection-vs-linearised") return "inspection/linearised";
    if (pair == "linearised-vs-simulated") return "linearised/simulated";
    return "inspection/simulated";
}

void write_resistances(std::string& out, const MirrorOutput& o, const OutputInspection& oi,
                       const LinearisedImpedance* linearised, const SimulatedImpedance* simulated,
                       const OutputReconciliation* reconciliation) {
    auto it = std::back_inserter(out);
    const RoutEstimate& best = oi.best();
    fmt::format_to(it, "    Rout  inspection  {:>9}  {}, {}; {} without body effect\n", format_si(best.value, "Ω"),
                   best.method, best.exact ? "exact" : "approximate", format_si(best.value_no_body, "Ω"));
    fmt::format_to(it, "                          = {}\n", best.formula);
    if (!best.note.empty()) fmt::format_to(it, "                          {}\n", best.note);
    if (linearised && linearised->resistance) {
        fmt::format_to(it, "          linearised  {:>9}  {} at {}{}\n", format_si(*linearised->resistance, "Ω"),
                       linearised->scope.empty() ? "the whole circuit" : linearised->scope, o.node,
                       linearised->note.empty() ? "" : "; " + linearised->note);
        if (linearised->corner_frequency)
            fmt::format_to(it, "                      {:>9}  where |Z| falls 3 dB below its DC value\n",
                           format_si(*linearised->corner_frequency, "Hz"));
    }
    else
        fmt::format_to(it, "          linearised  {:>9}  {}\n", "-", linearised ? linearised->note : "not computed");
    if (const SimulatedValue* sim = simulated ? simulated->best() : nullptr) {
        std::string phase = sim->frequency ? fmt::format(", phase {:.1f}°", sim->phase_degrees) : std::string();
        fmt::format_to(it, "          simulated   {:>9}  {} by {}: {}{}\n", format_si(sim->magnitude, "Ω"),
                       simulated->probe_mode, simulated->probe, sim->source, phase);
        for (std::size_t k = 1; k < simulated->values.size(); ++k)
            fmt::format_to(it, "                      {:>9}  also {}\n", format_si(simulated->values[k].magnitude, "Ω"),
                           simulated->values[k].source);
    } else {
        fmt::format_to(it, "          simulated   {:>9}  {}\n", "-", simulated ? simulated->note : "not simulated");
    }
    if (reconciliation && !reconciliation->comparisons.empty()) {
        std::string line;
        for (const auto& c : reconciliation->comparisons)
            line += fmt::format("{}{} {}{}", line.empty() ? "" : ", ", comparison_label(c.pair),
                                std::abs(c.difference) < 1 ? fmt::format("{:+.1f} %", std::abs(c.difference) < 5e-4 ? 0.0 : 100.0 * c.difference)
                                                           : fmt::format("×{:.3g}", c.difference + 1.0),
                                c.agrees ? "" : " (disagree)");
        fmt::format_to(it, "          agreement   {}\n", line);
    }
}

void write_output(std::string& out, const Circuit& c, const OpPoint& op, const Review& review, const Mirror& m,
                  const MirrorOutput& o, const OutputInspection& oi) {
    auto it = std::back_inserter(out);
    std::string stack;
    for (std::size_t i : o.devices) stack += (stack.empty() ? "" : " -> ") + device_label(c, i);
    fmt::format_to(it, "  output {}: {}\n", o.node, stack);
    write_resistances(out, o, oi, review.linearised_at(o.node), review.simulated_at(o.node),
                      review.reconciliation_at(m.id, o.node));
    const Headroom& h = oi.headroom;
    fmt::format_to(it, "    headroom  Vout {}, {} {}, margin {}\n",
                   h.output_voltage ? format_si(*h.output_voltage, "V") : "-", h.sink ? "min" : "max",
                   h.limit ? format_si(*h.limit, "V") : "-", format_si(h.margin, "V"));
    if (oi.ratio)
        fmt::format_to(it, "    ratio     measured {:.4g}, design {}, predicted {}\n", oi.ratio->measured,
                       oi.ratio->design ? fmt::format("{:.4g}", *oi.ratio->design) : "-",
                       oi.ratio->predicted ? fmt::format("{:.4g}", *oi.ratio->predicted) : "-");
    for (const auto& r : oi.devices) write_device_line(out, c, op, r);
}

}  // namespace

std::string write_review_table(const ReviewInputs& inputs, const Circuit& circuit, const OpPoint& op,
                               const Review& review) {
    std::string out = fmt::format("mirrorcheck review of {} at {}\n", inputs.netlist, inputs.op_source);
    auto it = std::back_inserter(out);
    for (std::size_t k = 0; k < review.mirrors.size(); ++k) {
        const Mirror& m = review.mirrors[k];
        const MirrorInspection& mi = review.inspection.mirrors[k];
        fmt::format_to(it, "\n{}\n", m.id);
        if (!m.reference.empty()) {
            fmt::format_to(it, "  reference at {}\n", m.reference_node);
            for (const auto& r : mi.reference) write_device_line(out, circuit, op, r);
        }
        for (std::size_t j = 0; j < m.outputs.size(); ++j)
            write_output(out, circuit, op, review, m, m.outputs[j], mi.outputs[j]);
    }
    if (!review.findings.empty()) out += "\nfindings\n";
    for (const auto& f : review.findings) {
        std::string where = f.mirror.empty() ? f.subject : fmt::format("{} ({})", f.subject, f.mirror);
        fmt::format_to(it, "  {:<8} {:<24} {}: {}\n", f.waived ? "waived" : to_string(f.severity), f.code, where,
                       f.message);
        if (f.waived) fmt::format_to(it, "           {:<24} waived {}: {}\n", "", to_string(f.severity), f.waiver);
    }
    for (const auto& a : review.assumptions) fmt::format_to(it, "\nassumed: {}\n", a);
    Counts n = count(review.findings);
    fmt::format_to(it, "\n{} mirror{} and stack{}: {} error{}, {} warning{}, {} note{}{}\n", review.mirrors.size(),
                   review.mirrors.size() == 1 ? "" : "s", review.mirrors.size() == 1 ? "" : "s", n.errors,
                   n.errors == 1 ? "" : "s", n.warnings, n.warnings == 1 ? "" : "s", n.infos, n.infos == 1 ? "" : "s",
                   n.waived ? fmt::format(", {} waived", n.waived) : std::string());
    return out;
}

}  // namespace mirrorcheck::report
