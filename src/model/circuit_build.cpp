// From the netlist reader's FlatNetlist to the Circuit: a one-to-one copy, each model
// built once and shared by the devices that use it.
#include "src/model/circuit_build.hpp"

#include <memory>

namespace mirrorcheck {
namespace {

DeviceKind kind_of(netlist::ElementKind kind) {
    using K = netlist::ElementKind;
    switch (kind) {
        case K::resistor: return DeviceKind::resistor;
        case K::capacitor: return DeviceKind::capacitor;
        case K::inductor: return DeviceKind::inductor;
        case K::coupling: return DeviceKind::coupling;
        case K::vsource: return DeviceKind::vsource;
        case K::isource: return DeviceKind::isource;
        case K::vcvs: return DeviceKind::vcvs;
        case K::cccs: return DeviceKind::cccs;
        case K::vccs: return DeviceKind::vccs;
        case K::ccvs: return DeviceKind::ccvs;
        case K::behavioural: return DeviceKind::behavioural;
        case K::diode: return DeviceKind::diode;
        case K::mosfet: return DeviceKind::mosfet;
        case K::bjt: return DeviceKind::bjt;
        case K::jfet: return DeviceKind::jfet;
        case K::other: return DeviceKind::other;
    }
    return DeviceKind::other;
}

SourceLine source_of(const netlist::FileLine& where) { return {where.file, where.line}; }

std::shared_ptr<const Model> model_of(const netlist::FlatModel& flat) {
    auto model = std::make_shared<Model>();
    model->name = flat.name;
    model->ngspice_name = flat.ngspice_name;
    model->type = flat.type;
    model->level = flat.level;
    model->version = flat.version;
    model->parameters = flat.parameters;
    model->text = flat.text;
    model->source = source_of(flat.source);
    return model;
}

Device device_of(const netlist::FlatNetlist& netlist, const netlist::FlatDevice& flat,
                 const std::vector<std::shared_ptr<const Model>>& models) {
    Device d;
    d.kind = kind_of(flat.kind);
    d.name = flat.name;
    d.local_name = flat.local_name();
    for (const netlist::FlatInstance* level : netlist.hierarchy(flat))
        d.hierarchy.push_back({level->instance, level->subckt, source_of(level->source)});
    for (const auto& t : netlist.terminals(flat)) d.terminals.push_back({netlist.role(t), netlist.net(t)});
    for (const auto& p : netlist.parameters(flat)) d.parameters[netlist.name(p)] = p.value;
    d.value = flat.value;
    for (const auto& t : netlist.texts(flat)) d.text[t.key] = t.text;
    if (flat.model != netlist::no_index) d.model = models.at(flat.model);
    d.source = source_of(netlist.source(flat));
    return d;
}

}  // namespace

Circuit build_circuit(const netlist::FlatNetlist& netlist) {
    std::vector<std::shared_ptr<const Model>> models;
    models.reserve(netlist.models.size());
    for (const auto& m : netlist.models) models.push_back(model_of(m));
    Circuit circuit;
    circuit.title = netlist.title;
    circuit.control_blocks = netlist.control_blocks;
    circuit.reserve(netlist.devices.size());
    for (const auto& d : netlist.devices) circuit.add_device(device_of(netlist, d, models));
    return circuit;
}

Circuit read_circuit(const std::filesystem::path& path, const netlist::ReadLimits& limits) {
    return build_circuit(netlist::read_netlist(path, limits));
}

}  // namespace mirrorcheck
