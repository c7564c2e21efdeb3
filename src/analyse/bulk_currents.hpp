// The small-signal conductances of the currents a BSIM4 device sends into its body that
// ngspice stamps in its AC matrix but does not report: impact ionisation (the substrate
// current Isub) and gate-induced drain and source leakage (GIDL, GISL). See bulk_currents.cpp
// for the derivation, its source in ngspice's b4ld.c, and what the op data leaves open.
#pragma once

#include <array>
#include <optional>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"

namespace mirrorcheck {

// A current into the body node b' from terminal x: d·v(x, y) + g·v(gate, y) + b·v(body, y),
// where y is the other channel terminal (for Isub and GIDL the source side, for GISL the drain).
struct BulkSlopes {
    double d = 0, g = 0, b = 0;  // siemens, multiplier included
};

BulkSlopes operator-(const BulkSlopes& a, const BulkSlopes& b);

// Impact ionisation, from the drain of the device's forward frame (the physical source when
// vds < 0) into the body.
struct ImpactIonisation {
    double isub = 0;             // amperes, device polarity, multiplier included
    bool from_op_data = false;   // read from the op data (`@m1[isub]`), else computed from the card
    BulkSlopes estimate;         // at the middle of what the op data leaves open
    // The two slopes of the saturation voltage the op data does not give, dVdsat/dVgs and
    // dVdsat/dVds: the slopes at the low and high end of each, minus the estimate.
    std::array<BulkSlopes, 2> gate_slope_range;
    std::array<BulkSlopes, 2> drain_slope_range;
    double gate_slope_estimate = 0;  // the dVdsat/dVgs taken
};

// GIDL from the physical drain (controls relative to the source), GISL from the physical
// source (controls relative to the drain).
struct GateInducedLeakage {
    double igidl = 0, igisl = 0;  // amperes, device polarity, multiplier included
    BulkSlopes drain, source;
};

struct BulkCurrents {
    std::optional<ImpactIonisation> impact;
    std::optional<GateInducedLeakage> leakage;
    std::vector<std::string> notes;  // what was approximated or left out, each naming the device
};

// The bulk currents of one BSIM4 device at its operating point (empty for other models).
BulkCurrents find_bulk_currents(const Device& device, const DeviceOp& op);

// For checks against ngspice: Isub as the model card gives it at the operating point
// (ignoring the op data's isub), and the impact-ionisation slopes for given slopes of
// Vdsat against Vgs, Vbs and Vds (in the device's forward frame).
std::optional<double> impact_ionisation_current(const Device& device, const DeviceOp& op);
std::optional<BulkSlopes> impact_ionisation_slopes(const Device& device, const DeviceOp& op, double dvdsat_dvgs,
                                                   double dvdsat_dvbs, double dvdsat_dvds);

}  // namespace mirrorcheck
