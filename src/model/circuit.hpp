// The flattened circuit: every device of a netlist after subcircuit expansion, named as
// ngspice names it (`m.x1.m2`, nets `x1.mid`), with its nets, evaluated parameters and
// resolved model, and every net with the device terminals on it.
//
// Names are stored in lower case, as ngspice prints them; lookups ignore case. Ground is
// the net "0" (the netlist's `gnd` is folded into it). Values are plain SI numbers: `.option
// scale` has already been applied to MOS geometry.
#pragma once

#include <cstddef>
#include <map>
#include <memory>
#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "parsers/common/text.hpp"

namespace mirrorcheck {

enum class DeviceKind {
    resistor,      // R
    capacitor,     // C
    inductor,      // L
    coupling,      // K (mutual inductance; no nets, two inductors)
    vsource,       // V
    isource,       // I
    vcvs,          // E
    cccs,          // F
    vccs,          // G
    ccvs,          // H
    behavioural,   // B (nonlinear, recorded)
    diode,         // D
    mosfet,        // M
    bjt,           // Q
    jfet,          // J
    other,         // anything else ngspice accepts (switches, lines, XSPICE A devices), kept with its nets
};

// "resistor", "mosfet", ...
std::string_view to_string(DeviceKind kind);

// A line of a source file.
struct SourceLine {
    std::string file;
    std::size_t line = 0;
};

// One subcircuit instance (an `X` line) on the way from the top level to a device.
struct InstanceLevel {
    std::string instance;  // the X line's name as written, lower case (e.g. "xm1")
    std::string subckt;    // the subcircuit it instantiates
    SourceLine source;     // where the X line is
};

// A `.model` card resolved for one device, with its parameters evaluated for that device.
struct Model {
    std::string name;         // as the device line names it (e.g. "nmos_3p3")
    std::string ngspice_name; // as ngspice prints it: the bin ("nmos_3p3.9"), prefixed by the
                              // instance path for subcircuit-local models ("xm1:nch")
    std::string type;         // nmos, pmos, npn, pnp, d, r, c, njf, ...
    double level = 1;
    std::optional<double> version;
    std::map<std::string, double> parameters;  // every parameter that evaluates to a number
    std::map<std::string, std::string> text;   // the others, as written (`version=4.8.2`, strings)
    SourceLine source;
};

struct Terminal {
    std::string role;  // d g s b, c b e s, pos neg, ...
    std::string net;
};

struct Device {
    DeviceKind kind = DeviceKind::other;
    std::string name;                  // ngspice's flattened name: "m1", "m.x1.m2"
    std::string local_name;            // the name on its own line: "m2"
    std::vector<InstanceLevel> hierarchy;  // the X lines above it, outermost first
    std::vector<Terminal> terminals;   // in the order of the element line
    std::map<std::string, double> parameters;  // instance parameters, evaluated (w, l, m, dc, ...)
    std::optional<double> value;       // the main value: R ohms, C farads, L henries, source dc, gain
    std::map<std::string, std::string> text;   // what is not a number: "transient", "expression", "control", ...
    std::shared_ptr<const Model> model;        // null for devices without a model
    SourceLine source;

    // The designer's name for it: the instance path as written, "xm1.m0" or "m1".
    std::string instance_path() const;
    // The outermost instance it came from (the designer's line), or the device itself.
    std::string designer_instance() const;
    const Terminal* terminal(std::string_view role) const;
    std::optional<double> parameter(std::string_view name) const;
};

struct TerminalRef {
    std::size_t device = 0;    // index into Circuit::devices()
    std::size_t terminal = 0;  // index into Device::terminals
};

struct Net {
    std::string name;
    std::vector<TerminalRef> terminals;
};

class Circuit {
public:
    std::string title;
    std::vector<std::string> control_blocks;  // `.control` ... `.endc` text, not interpreted

    // Appends a device and connects its terminals; returns its index. A device whose name
    // is already taken is not added: add_device returns the existing one's index,
    // try_add_device returns false.
    std::size_t add_device(Device device);
    bool try_add_device(Device device);
    // Makes room for this many devices in all (an optimisation only).
    void reserve(std::size_t devices);

    const std::vector<Device>& devices() const { return devices_; }
    const std::vector<Net>& nets() const { return nets_; }

    // Case-insensitive lookups by ngspice name; null when absent.
    const Device* find_device(std::string_view name) const;
    const Net* find_net(std::string_view name) const;

private:
    std::vector<Device> devices_;
    std::vector<Net> nets_;
    std::unordered_map<std::string, std::size_t> device_index_;
    std::unordered_map<std::string, std::size_t> net_index_;
};


// Ground and every net a chain of voltage sources joins to it, lower case: the nets the
// circuit holds in small signal (a source's value is zero there). A 0 V ammeter in series
// elsewhere holds nothing.
std::set<std::string> source_held_nets(const Circuit& circuit);

}  // namespace mirrorcheck
