// The ohmic parasitics ngspice puts inside a transistor: its internal nodes, where
// ngspice's output names them, and the conductance of each resistor between them, from
// the model card and the instance geometry. See device_parasitics.cpp for the rules and
// their sources in ngspice.
//
// This is model knowledge (what one device is, inside ngspice), so it lives beside the
// Circuit: the op-point builder uses it to find the internal node voltages that ngspice's
// terminal voltages refer to, and the small-signal network stamps it.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"

namespace mirrorcheck {

// The internal nodes a transistor may have. The suffix is ngspice's: node `m1#body`.
enum class InternalNode {
    drain,        // MOS d' ("#drain"; not written by `save all`)
    source,       // MOS s' ("#source"; not written by `save all`)
    gate,         // BSIM4 rgatemod > 0: g' ("#gate")
    mid_gate,     // BSIM4 rgatemod = 3: gm ("#midgate")
    body,         // BSIM4 rbodymod > 0: b' ("#body")
    drain_body,   // BSIM4 rbodymod > 0: db ("#dbody")
    source_body,  // BSIM4 rbodymod > 0: sb ("#sbody")
    base,         // bipolar b' ("#base"; not written by `save all`)
    collector,    // bipolar c' ("#collCX": ngspice 39 names the node behind rc so; not written by `save all`)
    emitter,      // bipolar e' ("#emitter"; not written by `save all`)
};
std::string_view suffix(InternalNode node);
// The name of a device's internal node in ngspice's output, e.g. "m.xm1.m0#body".
std::string internal_node_name(const Device& device, InternalNode node);

// The five resistors of the BSIM4 body network (rbodymod 1 and 2), as conductances with
// gbmin and the multiplier m included: b'–db (rbpd), b'–sb (rbps), b'–b (rbpb), db–b (rbdb),
// sb–b (rbsb).
struct BodyNetwork {
    double rbpd = 0, rbps = 0, rbpb = 0, rbdb = 0, rbsb = 0;
};

// How the gate reaches the channel (BSIM4 rgatemod).
struct GateNetwork {
    int mode = 0;                 // 0: no gate node; 1: electrode resistance g–g'; 2: g–g' through the
                                  // electrode and the intrinsic input resistance in series (gcrg, in the
                                  // op data); 3: electrode g–gm, intrinsic gm–g'
    double electrode = 0;         // the electrode conductance (grgeltd · m), siemens
};

struct DeviceParasitics {
    // MOS series conductances between the terminal and its internal node (m included);
    // absent when the model puts no resistor there.
    std::optional<double> drain, source;
    bool series_bias_dependent = false;  // BSIM4 rdsmod = 1: Rs(V), Rd(V) (see the .cpp)
    GateNetwork gate;
    std::optional<BodyNetwork> body;

    // Bipolar: collector (rc) and emitter (re) conductances, area and m included; the base
    // resistance is bias dependent in general and is taken from the op data (gx) when it
    // has it, else from the model: `base_linear` when rb does not depend on the bias.
    std::optional<double> collector, emitter;
    bool has_base_resistance = false;
    std::optional<double> base_linear;   // area·m / rb, when irb is not given and rbm = rb
    bool base_from_current = false;      // irb given: from the base current (see the .cpp)

    std::vector<std::string> notes;      // assumptions made (e.g. "temperature coefficients of rc taken at tnom")
    std::vector<std::string> problems;   // what cannot be modelled, each a phrase ("rgeomod = 1 ...")

    bool has_internal_nodes() const;
};

// The parasitics of a MOS or bipolar transistor with a model; empty for other devices.
DeviceParasitics find_device_parasitics(const Device& transistor);

// BSIM4 rdsmod = 1: the series resistances Rd(Vgd, Vbd), Rs(Vgs, Vbs) at an operating point
// and their slopes. The current from the terminal through its resistor into the internal
// node x' is  conductance·v(x, x') + by_gate·v(g', x') + by_body·v(b', x')  (device polarity,
// m included).
struct SeriesSlopes {
    double conductance = 0, by_gate = 0, by_body = 0;
};
struct BiasDependentSeries {
    std::optional<SeriesSlopes> drain, source;
    std::vector<std::string> notes;
};
// `vgs`, `vds`, `vbs` and `id` in device polarity at the internal nodes, as ngspice reports them.
BiasDependentSeries bsim4_bias_dependent_series(const Device& transistor, const DeviceParasitics& parasitics,
                                                double vgs, double vds, double vbs, double id);

// The bias-dependent base conductance of a bipolar device with irb given, from its base
// current `ib` (amperes, device polarity, the instance's total), as ngspice's bjtload.c:
// rbb = rbm + 3 (rb - rbm) (tan z - z) / (z tan^2 z), z from ib/irb. Area and m included.
double bipolar_base_conductance(const Device& transistor, double ib);

}  // namespace mirrorcheck
