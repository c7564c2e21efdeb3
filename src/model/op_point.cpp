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

CapacitanceSet capacitance_set(const Model& model) {
    if (model.type == "npn" || model.type == "pnp") return CapacitanceSet::bipolar;
    if (model.type != "nmos" && model.type != "pmos") return CapacitanceSet::none;
    const double level = model.level;
    if (level == 1 || level == 2 || level == 3 || level == 6 || level == 9) return CapacitanceSet::meyer;
    if (level == 8 || level == 49 || level == 14 || level == 54) return CapacitanceSet::charge;
    return CapacitanceSet::none;
}

const std::vector<std::string_view>& capacitance_quantities(CapacitanceSet set) {
    static const std::vector<std::string_view> none;
    static const std::vector<std::string_view> meyer = {"cgs", "cgd", "cgb", "cbd", "cbs"};
    static const std::vector<std::string_view> charge = {"cggb", "cgdb", "cgsb", "cdgb", "cddb", "cdsb",
                                                         "cbgb", "cbdb", "cbsb", "cbd",  "cbs"};
    static const std::vector<std::string_view> bipolar = {"cpi", "cmu", "cbx", "csub"};
    switch (set) {
        case CapacitanceSet::meyer: return meyer;
        case CapacitanceSet::charge: return charge;
        case CapacitanceSet::bipolar: return bipolar;
        case CapacitanceSet::none: break;
    }
    return none;
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
