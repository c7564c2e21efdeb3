// Renders the recognised mirrors. Devices are named as ngspice names them; where that
// differs from the designer's instance (transistors wrapped in subcircuits), the
// designer's instance follows in parentheses.
#include "src/report/mirror_list.hpp"

#include <fmt/format.h>

#include "src/report/device_names.hpp"

namespace mirrorcheck::report {
namespace {

std::string device_list(const Circuit& circuit, const std::vector<std::size_t>& devices) {
    std::string out;
    for (std::size_t i : devices) out += (out.empty() ? "" : ", ") + device_label(circuit, i);
    return out.empty() ? "-" : out;
}

nlohmann::json optional_names(const Circuit& circuit, const std::vector<std::optional<std::size_t>>& devices) {
    nlohmann::json out = nlohmann::json::array();
    for (const auto& i : devices) out.push_back(i ? nlohmann::json(circuit.devices()[*i].name) : nlohmann::json());
    return out;
}

std::string ratio_text(const std::optional<double>& ratio) {
    return ratio ? fmt::format("{:.4g}", *ratio) : std::string("-");
}

}  // namespace

std::string write_mirror_table(const Circuit& circuit, const std::vector<Mirror>& mirrors) {
    std::size_t sources = 0;
    for (const auto& m : mirrors) sources += m.family == Family::current_source;
    std::string out = fmt::format("{} mirror{} and {} current source{} found\n", mirrors.size() - sources,
                                  mirrors.size() - sources == 1 ? "" : "s", sources, sources == 1 ? "" : "s");
    auto it = std::back_inserter(out);
    for (const auto& m : mirrors) {
        fmt::format_to(it, "\n{}\n", m.id);
        if (!m.reference.empty())
            fmt::format_to(it, "  reference  {}  at node {}\n", device_list(circuit, m.reference), m.reference_node);
        if (!m.helpers.empty()) fmt::format_to(it, "  helpers    {}\n", device_list(circuit, m.helpers));
        if (!m.helper_loads.empty()) fmt::format_to(it, "  helper load {}\n", device_list(circuit, m.helper_loads));
        for (const auto& o : m.outputs)
            fmt::format_to(it, "  output     {:<12} {}  (bottom to top)  design ratio {}\n", o.node,
                           device_list(circuit, o.devices), ratio_text(o.design_ratio));
    }
    return out;
}

nlohmann::json mirrors_to_json(const Circuit& circuit, const std::vector<Mirror>& mirrors) {
    nlohmann::json list = nlohmann::json::array();
    for (const auto& m : mirrors) {
        nlohmann::json outputs = nlohmann::json::array();
        for (const auto& o : m.outputs)
            outputs.push_back({{"node", o.node},
                               {"devices", device_names(circuit, o.devices)},
                               {"degeneration", optional_names(circuit, o.degeneration)},
                               {"design_ratio", o.design_ratio ? nlohmann::json(*o.design_ratio) : nlohmann::json()}});
        nlohmann::json designer = nlohmann::json::object();
        for (const auto* group : {&m.reference, &m.helpers, &m.helper_loads})
            for (std::size_t i : *group) designer[circuit.devices()[i].name] = circuit.devices()[i].instance_path();
        for (const auto& o : m.outputs)
            for (std::size_t i : o.devices) designer[circuit.devices()[i].name] = circuit.devices()[i].instance_path();
        list.push_back({{"id", m.id},
                        {"family", mirror_family_label(m)},
                        {"reference", device_names(circuit, m.reference)},
                        {"reference_node", m.reference_node},
                        {"outputs", outputs},
                        {"helpers", device_names(circuit, m.helpers)},
                        {"helper_loads", device_names(circuit, m.helper_loads)},
                        {"designer", designer}});
    }
    return {{"schema", "mirrorcheck-list/1"}, {"title", circuit.title}, {"mirrors", list}};
}

}  // namespace mirrorcheck::report
