// The flattened circuit: device and net bookkeeping, case-insensitive lookup.
#include "src/model/circuit.hpp"

#include <algorithm>

namespace mirrorcheck {

std::string_view to_string(DeviceKind kind) {
    switch (kind) {
        case DeviceKind::resistor: return "resistor";
        case DeviceKind::capacitor: return "capacitor";
        case DeviceKind::inductor: return "inductor";
        case DeviceKind::coupling: return "coupling";
        case DeviceKind::vsource: return "vsource";
        case DeviceKind::isource: return "isource";
        case DeviceKind::vcvs: return "vcvs";
        case DeviceKind::cccs: return "cccs";
        case DeviceKind::vccs: return "vccs";
        case DeviceKind::ccvs: return "ccvs";
        case DeviceKind::behavioural: return "behavioural";
        case DeviceKind::diode: return "diode";
        case DeviceKind::mosfet: return "mosfet";
        case DeviceKind::bjt: return "bjt";
        case DeviceKind::jfet: return "jfet";
        case DeviceKind::other: return "other";
    }
    return "other";
}

std::string Device::instance_path() const {
    std::string path;
    for (const auto& level : hierarchy) path += level.instance + ".";
    return path + local_name;
}

std::string Device::designer_instance() const {
    return hierarchy.empty() ? local_name : hierarchy.front().instance;
}

const Terminal* Device::terminal(std::string_view role) const {
    auto it = std::find_if(terminals.begin(), terminals.end(), [&](const Terminal& t) { return t.role == role; });
    return it == terminals.end() ? nullptr : &*it;
}

std::optional<double> Device::parameter(std::string_view name) const {
    auto it = parameters.find(to_lower(name));
    if (it == parameters.end()) return std::nullopt;
    return it->second;
}

std::size_t Circuit::add_device(Device device) {
    auto existing = device_index_.find(device.name);
    if (existing != device_index_.end()) return existing->second;
    std::size_t index = devices_.size();
    try_add_device(std::move(device));
    return index;
}

bool Circuit::try_add_device(Device device) {
    std::size_t index = devices_.size();
    if (!device_index_.try_emplace(device.name, index).second) return false;
    for (std::size_t t = 0; t < device.terminals.size(); ++t) {
        auto [it, inserted] = net_index_.try_emplace(device.terminals[t].net, nets_.size());
        if (inserted) nets_.push_back(Net{device.terminals[t].net, {}});
        nets_[it->second].terminals.push_back({index, t});
    }
    devices_.push_back(std::move(device));
    return true;
}

void Circuit::reserve(std::size_t devices) {
    devices_.reserve(devices);
    device_index_.reserve(devices);
    nets_.reserve(devices / 2);
    net_index_.reserve(devices / 2);
}

const Device* Circuit::find_device(std::string_view name) const {
    auto it = device_index_.find(to_lower(name));
    return it == device_index_.end() ? nullptr : &devices_[it->second];
}

const Net* Circuit::find_net(std::string_view name) const {
    auto it = net_index_.find(to_lower(name));
    return it == net_index_.end() ? nullptr : &nets_[it->second];
}

std::set<std::string> source_held_nets(const Circuit& circuit) {
    std::set<std::string> held = {"0"};
    for (bool grew = true; grew;) {
        grew = false;
        for (const Device& d : circuit.devices()) {
            if (d.kind != DeviceKind::vsource || d.terminals.size() < 2) continue;
            const std::string a = to_lower(d.terminals[0].net), b = to_lower(d.terminals[1].net);
            if (held.count(a) != held.count(b)) {
                held.insert(held.count(a) ? b : a);
                grew = true;
            }
        }
    }
    return held;
}

}  // namespace mirrorcheck
