// Analysis by inspection: for every recognised mirror, each output's resistance (reflection
// rule and family formulas), headroom, each transistor's region and saturation margin, the
// current ratio, and the findings a designer should read first. inspect.cpp describes the
// rules and their sources; the pass never prints.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "src/analyse/finding.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"
#include "src/analyse/designer_names.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

// mu = gm·ro below this: the "1 +" terms the hand formulas drop are 10 % or more, so the
// formula is weak (common practice, no source). Also read by the reconciliation.
inline constexpr double low_intrinsic_gain = 10.0;

// Thresholds of the pass. Both voltages are common practice, no source.
struct InspectOptions {
    double margin = 0.1;            // volts: a saturation margin below this is a warning
    double vce_sat = 0.2;           // volts: bipolar collector-emitter saturation voltage
    double ratio_tolerance = 0.05;  // relative: |measured/design - 1| above this is a warning
};

// Operating region. MOS: saturation, triode, weak_inversion, cutoff. Bipolar:
// forward_active, bipolar_saturation, cutoff.
enum class Region { saturation, triode, weak_inversion, cutoff, forward_active, bipolar_saturation };

// "saturation", "triode", "weak-inversion", "cutoff", "forward-active", "saturation".
std::string_view to_string(Region region);

// The region and saturation margin of one transistor.
struct DeviceRegion {
    std::size_t device = 0;  // index into Circuit::devices()
    std::string name;
    Region region = Region::saturation;
    double saturation_voltage = 0;  // the Vds (Vce) where saturation ends: vdsat, 4·kT/q or vce_sat
    double headroom = 0;            // vds - saturation_voltage (vce - vce_sat)
    bool current_source = true;     // in the region where it acts as a current source
    bool low_margin = false;        // current_source, but headroom below the margin option
};

// Classifies a transistor from its op values (device polarity, op_point.hpp). Throws
// InputError "op.missing-parameters" when a quantity it needs is absent.
DeviceRegion classify_region(const DeviceOp& op, const InspectOptions& options);

// One level of a stack in the reflection rule, bottom first.
struct RoutLevel {
    std::size_t device = 0;
    std::string name;
    double ro = 0, gm = 0, gmb = 0;  // gmb is 0 for bipolar
    double gpi = 0;                  // bipolar only
    double rb = 0;                   // bipolar only: base resistance to AC ground
    double resistor = 0;             // the source (emitter) resistor below it, 0 when none
    double rs = 0;                   // resistance below it: resistor + Rout of the level below
    double rs_no_body = 0;           // the same without body effect
    double rout = 0;                 // looking into its drain (collector)
    double rout_no_body = 0;         // the same with gmb = 0
};

// One estimate of an output's resistance.
struct RoutEstimate {
    std::string method;        // "reflection" or the family ("wilson", "regulated-cascode", ...)
    double value = 0;          // with body effect
    double value_no_body = 0;  // with gmb = 0
    std::string formula;       // with the designer's device names
    bool exact = true;         // exact for the small-signal model, or an approximation
    std::string note;          // what the approximation leaves out
};

struct Headroom {
    bool sink = true;                      // NMOS/NPN sink (limit is a minimum), else source
    std::optional<double> output_voltage;  // V(output node), when the op has node voltages
    std::optional<double> limit;           // min (sink) or max (source) output voltage
    double margin = 0;                     // distance from the limit, positive when saturated
};

struct CurrentRatio {
    std::optional<double> design;     // from the Mirror's geometry
    double measured = 0;              // Iout/Iref, see inspect.cpp for which currents
    std::optional<double> predicted;  // channel-length modulation or base current
    std::optional<double> error;      // measured/design - 1
    std::string basis;                // which currents and which prediction
};

struct OutputInspection {
    std::string node;
    std::vector<RoutLevel> levels;       // the reflection rule, bottom first
    RoutEstimate reflection;             // the plain reflection rule up the stack
    std::optional<RoutEstimate> family;  // the family formula, where it differs
    const RoutEstimate& best() const { return family ? *family : reflection; }
    Headroom headroom;
    std::vector<DeviceRegion> devices;  // bottom first
    std::optional<CurrentRatio> ratio;  // absent for stacks
};

struct MirrorInspection {
    std::string mirror;                   // Mirror::id
    std::vector<DeviceRegion> reference;  // bottom first
    std::vector<OutputInspection> outputs;
};

struct InspectionResult {
    std::vector<MirrorInspection> mirrors;  // in the order of the mirrors given
    std::vector<Finding> findings;          // errors first, then warnings, then info
};

// Inspects every mirror; the formulas name devices as `names` does (the designer's names,
// find_designer_names; without them, by instance path). Throws InputError
// "op.missing-parameters" when the op lacks a quantity of one of the mirrors' transistors.
InspectionResult inspect_mirrors(const Circuit& circuit, const OpPoint& op, const std::vector<Mirror>& mirrors,
                                 const InspectOptions& options, const DesignerNames& names = {});

}  // namespace mirrorcheck
