// Renders a flattened circuit for `peek`. The table shows values with SI prefixes and units
// (never SPICE suffixes, where `M` would read as mega); JSON carries plain SI numbers.
#include "src/report/circuit_dump.hpp"

#include <algorithm>
#include <array>
#include <cmath>

#include <fmt/format.h>

namespace mirrorcheck::report {
namespace {

std::string si(double x, std::string_view unit) {
    if (!std::isfinite(x)) return fmt::format("{} {}", x, unit);
    static constexpr std::array<std::pair<double, std::string_view>, 11> prefixes{{
        {1e12, "T"}, {1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1, ""}, {1e-3, "m"},
        {1e-6, "µ"}, {1e-9, "n"}, {1e-12, "p"}, {1e-15, "f"}, {1e-18, "a"},
    }};
    double magnitude = std::fabs(x);
    if (magnitude == 0) return fmt::format("0 {}", unit);
    for (const auto& [scale, prefix] : prefixes)
        if (magnitude >= scale * 0.9999995) return fmt::format("{:.4g} {}{}", x / scale, prefix, unit);
    return fmt::format("{:.4g} {}", x, unit);
}

std::string_view value_unit(DeviceKind kind) {
    switch (kind) {
        case DeviceKind::resistor: return "Ω";
        case DeviceKind::capacitor: return "F";
        case DeviceKind::inductor: return "H";
        case DeviceKind::vsource: return "V";
        case DeviceKind::isource: return "A";
        case DeviceKind::vccs: return "S";
        case DeviceKind::ccvs: return "Ω";
        default: return "";
    }
}

std::string key_parameters(const Device& d) {
    std::vector<std::string> parts;
    if (d.value) {
        std::string_view unit = value_unit(d.kind);
        parts.push_back(unit.empty() ? fmt::format("{:g}", *d.value) : si(*d.value, unit));
    }
    for (const char* key : {"w", "l"})
        if (auto v = d.parameter(key); v && (d.kind == DeviceKind::mosfet || d.kind == DeviceKind::resistor))
            parts.push_back(fmt::format("{}={}", key, si(*v, "m")));
    for (const char* key : {"nf", "m", "area"})
        if (auto v = d.parameter(key)) parts.push_back(fmt::format("{}={:g}", key, *v));
    if (auto v = d.parameter("acmag")) parts.push_back(fmt::format("ac={:g}", *v));
    for (const auto& [key, text] : d.text) parts.push_back(fmt::format("{}: {}", key, text));
    std::string out;
    for (const auto& p : parts) out += (out.empty() ? "" : "  ") + p;
    return out;
}

std::string terminals(const Device& d) {
    std::string out;
    for (const auto& t : d.terminals) out += fmt::format("{}{}={}", out.empty() ? "" : " ", t.role, t.net);
    return out;
}

std::string model_text(const Device& d) {
    if (!d.model) return "-";
    return fmt::format("{} ({} level {:g})", d.model->ngspice_name, d.model->type, d.model->level);
}

nlohmann::json number(double x) {
    if (std::isfinite(x)) return x;
    return std::isnan(x) ? "nan" : (x > 0 ? "inf" : "-inf");
}

nlohmann::json numbers(const std::map<std::string, double>& values) {
    nlohmann::json out = nlohmann::json::object();
    for (const auto& [k, v] : values) out[k] = number(v);
    return out;
}

}  // namespace

std::string write_circuit_table(const Circuit& circuit) {
    struct Row {
        std::array<std::string, 7> cells;
    };
    std::vector<Row> rows;
    rows.push_back({{"device", "kind", "terminals", "model", "parameters", "instance", "source"}});
    for (const auto& d : circuit.devices())
        rows.push_back({{d.name, std::string(to_string(d.kind)), terminals(d), model_text(d), key_parameters(d),
                         d.instance_path(), fmt::format("{}:{}", d.source.file, d.source.line)}});
    std::array<std::size_t, 7> width{};
    for (const auto& r : rows)
        for (std::size_t c = 0; c < 7; ++c) width[c] = std::max(width[c], r.cells[c].size());
    std::string out = fmt::format("{}\n", circuit.title);
    for (const auto& r : rows) {
        std::string line;
        for (std::size_t c = 0; c < 7; ++c)
            line += c + 1 == 7 ? r.cells[c] : fmt::format("{:<{}}  ", r.cells[c], width[c]);
        while (!line.empty() && line.back() == ' ') line.pop_back();
        out += line + "\n";
    }
    out += fmt::format("{} device{}, {} net{}\n", circuit.devices().size(), circuit.devices().size() == 1 ? "" : "s",
                       circuit.nets().size(), circuit.nets().size() == 1 ? "" : "s");
    return out;
}

nlohmann::json circuit_to_json(const Circuit& circuit) {
    nlohmann::json devices = nlohmann::json::array();
    nlohmann::json models = nlohmann::json::object();
    for (const auto& d : circuit.devices()) {
        nlohmann::json terms = nlohmann::json::array();
        for (const auto& t : d.terminals) terms.push_back({{"role", t.role}, {"net", t.net}});
        nlohmann::json hierarchy = nlohmann::json::array();
        for (const auto& h : d.hierarchy)
            hierarchy.push_back({{"instance", h.instance}, {"subckt", h.subckt},
                                 {"source", {{"file", h.source.file}, {"line", h.source.line}}}});
        nlohmann::json device = {
            {"name", d.name},
            {"kind", std::string(to_string(d.kind))},
            {"instance", d.instance_path()},
            {"hierarchy", hierarchy},
            {"terminals", terms},
            {"parameters", numbers(d.parameters)},
            {"value", d.value ? number(*d.value) : nlohmann::json(nullptr)},
            {"text", d.text},
            {"model", d.model ? nlohmann::json(d.model->ngspice_name) : nlohmann::json(nullptr)},
            {"source", {{"file", d.source.file}, {"line", d.source.line}}},
        };
        devices.push_back(std::move(device));
        if (d.model && !models.contains(d.model->ngspice_name)) {
            const Model& m = *d.model;
            models[m.ngspice_name] = {
                {"name", m.name},
                {"type", m.type},
                {"level", number(m.level)},
                {"version", m.version ? number(*m.version) : nlohmann::json(nullptr)},
                {"parameters", numbers(m.parameters)},
                {"source", {{"file", m.source.file}, {"line", m.source.line}}},
            };
        }
    }
    nlohmann::json nets = nlohmann::json::array();
    for (const auto& n : circuit.nets()) {
        nlohmann::json terms = nlohmann::json::array();
        for (const auto& t : n.terminals)
            terms.push_back({{"device", circuit.devices()[t.device].name},
                             {"terminal", circuit.devices()[t.device].terminals[t.terminal].role}});
        nets.push_back({{"name", n.name}, {"terminals", terms}});
    }
    return {{"schema", "mirrorcheck-circuit/1"}, {"title", circuit.title}, {"devices", devices}, {"models", models},
            {"nets", nets}};
}

}  // namespace mirrorcheck::report
