#include "src/report/device_names.hpp"

#include <fmt/format.h>

namespace mirrorcheck::report {

std::string device_label(const Circuit& circuit, std::size_t index) {
    const Device& d = circuit.devices()[index];
    std::string designer = d.instance_path();
    return designer == d.name ? d.name : fmt::format("{} ({})", d.name, designer);
}

std::vector<std::string> device_names(const Circuit& circuit, const std::vector<std::size_t>& devices) {
    std::vector<std::string> out;
    for (std::size_t i : devices) out.push_back(circuit.devices()[i].name);
    return out;
}

}  // namespace mirrorcheck::report
