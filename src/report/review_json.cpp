// The review as JSON for flows (schema mirrorcheck-report/1, docs/report.schema.json):
// plain SI numbers, null where a value is absent or not finite, every key always present
// where the schema says so. Fields are only ever added.
#include "src/report/review_report.hpp"

#include <algorithm>
#include <cmath>
#include <string_view>

#include "src/report/finding_text.hpp"
#include "src/report/json_text.hpp"

namespace mirrorcheck::report {
namespace {

using nlohmann::json;

json number(double x) { return std::isfinite(x) ? json(x) : json(); }
json number(const std::optional<double>& x) { return x ? number(*x) : json(); }
json text_or_null(const std::string& s) { return s.empty() ? json() : json(s); }

json values_json(const std::vector<FindingValue>& values) {
    json j = json::object();
    for (const auto& v : values) {
        switch (v.kind) {
            case FindingValue::Kind::number:
                j[v.name] = {{"value", number(v.number)}, {"unit", to_string(v.unit)}};
                break;
            case FindingValue::Kind::text:
                j[v.name] = v.text;
                break;
            case FindingValue::Kind::devices:
                j[v.name] = v.devices;
                break;
        }
    }
    return j;
}

json finding_json(const ReviewTree& t, const Finding& f) {
    json j = {{"severity", to_string(f.severity)},
              {"code", to_string(f.code)},
              {"mirror", f.mirror},
              {"subject", f.subject},
              {"message", finding_sentence(f, t.display_names)},
              {"values", values_json(f.values)},
              {"cause", f.cause ? json(to_string(f.cause->code)) : json()}};
    if (f.cause) j["cause_values"] = values_json(f.cause->values);
    if (f.waived) {
        j["waived"] = true;
        j["waiver"] = f.waiver;
    }
    return j;
}

json names_of(const ReviewTree& t, const std::vector<std::size_t>& devices) {
    json j = json::array();
    for (std::size_t d : devices) j.push_back(t.devices[d].name);
    return j;
}

json rout_json(const ReviewTree& t, const ReviewOutput& o) {
    const ReviewResistance& r = o.rout;
    const RoutEstimate& best = r.inspection;
    json levels = json::array();
    for (const auto& l : r.levels)
        levels.push_back({{"device", l.device < t.devices.size() ? json(t.devices[l.device].name) : json()},
                          {"ro", number(l.ro)},
                          {"gm", number(l.gm)},
                          {"gmb", number(l.gmb)},
                          {"rs", number(l.rs)},
                          {"rout", number(l.rout)}});
    json spectrum = json::array();
    for (const auto& p : r.linearised.spectrum)
        spectrum.push_back({{"frequency", number(p.frequency)},
                            {"magnitude", number(p.magnitude)},
                            {"phase_degrees", number(p.phase_degrees)}});
    const SimulatedValue* sim = r.simulated.best();
    json all_simulated = json::array();
    for (const auto& v : r.simulated.values)
        all_simulated.push_back({{"magnitude", number(v.magnitude)},
                                 {"phase_degrees", number(v.phase_degrees)},
                                 {"frequency", number(v.frequency)},
                                 {"source", v.source}});
    json comparisons = json::array();
    for (const auto& c : r.comparisons)
        comparisons.push_back({{"pair", c.pair},
                               {"first", number(c.first)},
                               {"second", number(c.second)},
                               {"difference", number(c.difference)},
                               {"agrees", c.agrees}});
    return {{"inspection", number(best.value)},
            {"inspection_no_body", number(best.value_no_body)},
            {"formula", best.formula},
            {"method", best.method},
            {"exact", best.exact},
            {"note", best.note},
            {"reflection", number(r.reflection)},
            {"levels", levels},
            {"own", number(r.own.resistance)},
            {"own_range", r.own.resistance_low && r.own.resistance_high
                              ? json::array({*r.own.resistance_low, *r.own.resistance_high})
                              : json()},
            {"own_note", r.own.note},
            {"own_devices", r.own_devices},
            {"own_held", r.own_held},
            {"own_simulated", r.own_simulated.value ? number(r.own_simulated.value->magnitude) : json()},
            {"own_simulated_source", r.own_simulated.value ? json(r.own_simulated.value->source) : json()},
            {"own_simulated_note", r.own_simulated.note},
            {"linearised", number(r.linearised.resistance)},
            {"linearised_range", r.linearised.resistance_low && r.linearised.resistance_high
                                     ? json::array({*r.linearised.resistance_low, *r.linearised.resistance_high})
                                     : json()},
            {"linearised_note", r.linearised.note},
            {"linearised_scope", text_or_null(r.linearised.scope)},
            {"corner_frequency", number(r.linearised.corner_frequency)},
            {"spectrum", spectrum},
            {"spectrum_note", r.linearised.spectrum_note},
            {"simulated", sim ? number(sim->magnitude) : json()},
            {"simulated_source", sim ? json(sim->source) : json()},
            {"simulated_note", r.simulated.note},
            {"probe", text_or_null(r.simulated.probe)},
            {"probe_mode", text_or_null(r.simulated.probe_mode)},
            {"simulated_values", all_simulated},
            {"comparisons", comparisons}};
}

json current_json(const ReviewOutput& o) {
    json j = json::object();
    j["ref"] = number(o.reference_current);
    j["out"] = number(o.output_current);
    if (o.ratio) {
        j["ratio"] = number(o.ratio->measured);
        j["design_ratio"] = number(o.ratio->design);
        j["predicted_ratio"] = number(o.ratio->predicted);
        j["error"] = number(o.ratio->error);
        j["basis"] = o.ratio->basis;
    }
    return j;
}

json output_json(const ReviewTree& t, const ReviewOutput& o) {
    json findings = json::array();
    for (std::size_t k : o.findings) {
        json f = finding_json(t, t.findings[k]);
        f.erase("mirror");
        findings.push_back(f);
    }
    const Headroom& h = o.headroom;
    json worst = json();
    if (o.worst_device)
        worst = {{"device", t.devices[*o.worst_device].name}, {"margin", number(t.devices[*o.worst_device].margin)}};
    return {{"node", o.node},
            {"devices", names_of(t, o.devices)},
            {"status", to_string(o.status)},
            {"worst_severity", o.worst_severity ? json(to_string(*o.worst_severity)) : json()},
            {"worst_margin", worst},
            {"current", current_json(o)},
            {"rout", rout_json(t, o)},
            {"headroom",
             {{"vout", number(h.output_voltage)}, {h.sink ? "vout_min" : "vout_max", number(h.limit)}, {"margin", number(h.margin)}}},
            {"findings", findings}};
}

json device_json(const ReviewDevice& d) {
    json j = {{"name", d.name},
              {"designer_name", d.designer_name},
              {"instance", d.instance},
              {"type", d.type},
              {"kind", d.mos ? "mos" : "bipolar"},
              {"region", to_string(d.region)},
              {"healthy", d.healthy},
              {"saturation_voltage", number(d.saturation_voltage)},
              {"margin", number(d.margin)},
              {"low_margin", d.low_margin}};
    if (d.mos) {
        const MosValues& v = d.mos_values;
        for (auto [key, value] : {std::pair{"id", v.id}, {"vgs", v.vgs}, {"vds", v.vds}, {"vbs", v.vbs},
                                  {"vth", v.vth}, {"vdsat", v.vdsat}, {"gm", v.gm}, {"gds", v.gds}, {"gmb", v.gmb}})
            j[key] = number(value);
    } else {
        const BipolarValues& v = d.bipolar_values;
        for (auto [key, value] : {std::pair{"ic", v.ic}, {"ib", v.ib}, {"vbe", v.vbe}, {"vbc", v.vbc},
                                  {"vce", v.vce}, {"gm", v.gm}, {"gpi", v.gpi}, {"gmu", v.gmu}, {"go", v.go}})
            j[key] = number(value);
    }
    json caps = json::object();
    for (const auto& [name, value] : d.capacitances) caps[name] = number(value);
    j["capacitances"] = caps;
    return j;
}

json settings_json(const ReviewThresholds& s) {
    json probes = json::array();
    for (const auto& p : s.probes) probes.push_back({{"node", p.node}, {"source", p.source}});
    json by_node = json::array();
    for (const auto& [node, limit] : s.min_impedance_by_node) by_node.push_back({{"node", node}, {"limit", limit}});
    return {{"margin", s.margin},
            {"vce_sat", s.vce_sat},
            {"ratio_tolerance", s.ratio_tolerance},
            {"tolerance", s.tolerance},
            {"min_impedance", number(s.min_impedance)},
            {"min_impedance_by_node", by_node},
            {"at", number(s.at)},
            {"probes", probes},
            {"waivers", s.waiver_files},
            {"fail_on", to_string(s.fail_on)}};
}

json mirror_json(const ReviewTree& t, const ReviewMirror& m) {
    json outputs = json::array();
    for (const ReviewOutput& o : m.outputs) outputs.push_back(output_json(t, o));
    return {{"id", m.id},
            {"label", m.label},
            {"family", m.family},
            {"reference", names_of(t, m.reference)},
            {"reference_node", text_or_null(m.reference_node)},
            {"outputs", outputs}};
}

// Every top-level member but the three lists that grow with the circuit.
json head_json(const ReviewTree& t) {
    const ReviewSummary& s = t.summary;
    json solve_notes = json::array();
    for (const SolveNote& n : t.solve_notes) solve_notes.push_back({{"note", n.text}, {"devices", n.devices}});
    return {{"schema", "mirrorcheck-report/1"},
            {"tool", {{"name", t.tool.name}, {"version", t.tool.version}, {"revision", text_or_null(t.tool.revision)}}},
            {"inputs",
             {{"netlist", t.inputs.netlist},
              {"op", t.inputs.op_source},
              {"simulation", t.inputs.simulation_files},
              {"left_out", t.inputs.left_out}}},
            {"settings", settings_json(t.settings)},
            {"assumptions", t.assumptions},
            {"notes", t.notes},
            {"linearised_notes", solve_notes},
            {"summary",
             {{"mirrors", s.mirrors},
              {"outputs", s.outputs},
              {"failed_outputs", s.failed_outputs},
              {"passed", s.passed},
              {"errors", s.errors},
              {"warnings", s.warnings},
              {"infos", s.infos},
              {"waived", s.waived}}}};
}

// The three lists, element by element: `each(name, element)` for every element in order.
template <typename Each>
void for_each_listed(const ReviewTree& t, const std::string& name, Each each) {
    if (name == "mirrors")
        for (const ReviewMirror& m : t.mirrors) each(mirror_json(t, m));
    else if (name == "devices")
        for (const ReviewDevice& d : t.devices) each(device_json(d));
    else
        for (const Finding& f : t.findings) each(finding_json(t, f));
}

const char* const listed[] = {"mirrors", "devices", "findings"};

std::string dumped(const json& j) { return json_text(j); }

// `text` with every line after the first indented by `depth` levels of two spaces.
void put(std::ostream& out, const std::string& text, std::size_t depth) {
    const std::string pad(2 * depth, ' ');
    std::size_t from = 0;
    for (std::size_t eol; (eol = text.find('\n', from)) != std::string::npos; from = eol + 1)
        out << std::string_view(text).substr(from, eol + 1 - from) << pad;
    out << std::string_view(text).substr(from);
}

}  // namespace

nlohmann::json review_to_json(const ReviewTree& t) {
    json j = head_json(t);
    for (const char* name : listed) {
        json list = json::array();
        for_each_listed(t, name, [&](json e) { list.push_back(std::move(e)); });
        j[name] = std::move(list);
    }
    return j;
}

void write_review_json(const ReviewTree& t, std::ostream& out) {
    // The members in the order review_to_json(t).dump(2) gives them (its objects keep their
    // keys sorted), the three long lists one element at a time: the same text without the
    // whole document in memory.
    json head = head_json(t);
    std::vector<std::string> names;
    for (const auto& [name, value] : head.items()) names.push_back(name);
    names.insert(names.end(), std::begin(listed), std::end(listed));
    std::sort(names.begin(), names.end());
    out << "{";
    for (std::size_t k = 0; k < names.size(); ++k) {
        out << (k ? ",\n  " : "\n  ") << json(names[k]).dump() << ": ";
        if (head.contains(names[k])) {
            put(out, dumped(head[names[k]]), 1);
            continue;
        }
        bool first = true;
        for_each_listed(t, names[k], [&](const json& e) {
            out << (first ? "[\n    " : ",\n    ");
            put(out, dumped(e), 2);
            first = false;
        });
        out << (first ? "[]" : "\n  ]");
    }
    out << "\n}\n";
}

}  // namespace mirrorcheck::report
