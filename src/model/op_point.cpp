#include "src/model/op_point.hpp"

#include "src/model/circuit.hpp"

namespace mirrorcheck {

const std::vector<std::string_view>& mos_quantities() {
    static const std::vector<std::string_view> q = {"id", "vgs", "vds", "vbs", "vth", "vdsat", "gm", "gds", "gmb"};
    return q;
}

const std::vector<std::string_view>& bjt_quantities() {
    static const std::vector<std::string_view> q = {"ic", "ib", "vbe", "vbc", "vce", "gm", "gpi", "gmu", "go"};
    return q;
}

std::optional<double> DeviceOp::get(std::string_view quantity) const {
    auto it = values.find(quantity);
    if (it == values.end()) return std::nullopt;
    return it->second;
}

std::optional<double> OpPoint::voltage(std::string_view net) const {
    std::string key = to_lower(net);
    if (key == "0" || key == "gnd") return 0.0;
    auto it = node_voltages.find(key);
    if (it == node_voltages.end()) return std::nullopt;
    return it->second;
}

const DeviceOp* OpPoint::device(std::string_view name) const {
    auto it = devices.find(to_lower(name));
    return it == devices.end() ? nullptr : &it->second;
}

}  // namespace mirrorcheck
