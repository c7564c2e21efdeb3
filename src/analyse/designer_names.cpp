// Designer names: the innermost subcircuit instance above a transistor names it when that
// instance holds no other transistor, counting every level below it (a cell that holds a
// wrapper holds its transistor too).
#include "src/analyse/designer_names.hpp"

#include <map>

namespace mirrorcheck {
namespace {

bool is_transistor(const Device& d) {
    return d.kind == DeviceKind::mosfet || d.kind == DeviceKind::bjt || d.kind == DeviceKind::jfet;
}

// "x1", "x1.xm2", ...: the instance paths of the X lines above a device, outermost first.
std::vector<std::string> instance_prefixes(const Device& d) {
    std::vector<std::string> prefixes;
    std::string path;
    for (const auto& level : d.hierarchy) {
        path += (path.empty() ? "" : ".") + level.instance;
        prefixes.push_back(path);
    }
    return prefixes;
}

}  // namespace

DesignerNames find_designer_names(const Circuit& circuit, const std::vector<Mirror>& mirrors) {
    std::map<std::string, std::size_t> transistors_below;
    for (const Device& d : circuit.devices())
        if (is_transistor(d))
            for (const auto& prefix : instance_prefixes(d)) ++transistors_below[prefix];
    DesignerNames names;
    for (const Device& d : circuit.devices()) {
        if (d.hierarchy.empty()) continue;
        const std::string innermost = instance_prefixes(d).back();
        std::string name = is_transistor(d) && transistors_below[innermost] == 1 ? innermost : d.instance_path();
        if (name != d.name) names[d.name] = std::move(name);
    }
    for (const Mirror& m : mirrors) {
        if (m.outputs.empty() || m.outputs.front().devices.empty()) continue;
        const std::string& top = circuit.devices()[m.outputs.front().devices.back()].name;
        const std::string label = mirror_family_label(m) + ":" + designer_name(names, top);
        if (label != m.id) names[m.id] = label;
    }
    return names;
}

const std::string& designer_name(const DesignerNames& names, const std::string& name) {
    auto it = names.find(name);
    return it == names.end() ? name : it->second;
}

}  // namespace mirrorcheck
