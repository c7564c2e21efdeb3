// The review tree: everything one review found, joined once by the pipeline, and the only
// thing the back ends (src/report/) read. Plain data: the inputs and settings, each mirror
// with its outputs, each output with its resistance values, comparisons, headroom, ratio,
// status and its own findings, each transistor once with its region and typed operating
// point, the findings of the whole circuit, what the review assumed and what the readers
// noted, and the summary. Devices are named twice: as ngspice names them and as the
// designer does (designer_names.hpp).
#pragma once

#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "src/analyse/finding.hpp"
#include "src/analyse/inspect.hpp"
#include "src/analyse/linearise.hpp"
#include "src/analyse/reconcile.hpp"
#include "src/analyse/simulated_impedance.hpp"
#include "src/analyse/simulated_own.hpp"

namespace mirrorcheck {

// The program that made the review.
struct ToolInfo {
    std::string name = "mirrorcheck";
    std::string version;   // the project's version (CMake's project version)
    std::string revision;  // the source revision it was built from; empty when unknown
};
// This build's.
ToolInfo this_tool();

// The files a review read.
struct ReviewInputs {
    std::string netlist;
    std::string op_source;                      // file and plot (or listing) the operating point came from
    std::vector<std::string> simulation_files;  // raw files whose AC or .tf plots were read
    std::vector<std::string> left_out = {};     // `run`: cards of the netlist its deck left out ("file:line: card")
};

// The thresholds and choices a review was made with, as numbers (SI; fractions for
// tolerances).
struct ReviewThresholds {
    double margin = 0.1;
    double vce_sat = 0.2;
    double ratio_tolerance = 0.05;
    double tolerance = 0.10;
    std::optional<double> min_impedance;  // ohms: every output node's floor, when set
    std::vector<std::pair<std::string, double>> min_impedance_by_node;
    std::optional<double> at;             // Hz
    std::vector<ProbeChoice> probes;
    std::vector<std::string> waiver_files;
    Severity fail_on = Severity::error;   // findings at this severity or worse fail the review
};

// A transistor's operating point in the convention of src/model/op_point.hpp; a value the
// op data did not hold is absent.
struct MosValues {
    std::optional<double> id, vgs, vds, vbs, vth, vdsat, gm, gds, gmb;
};
struct BipolarValues {
    std::optional<double> ic, ib, vbe, vbc, vce, gm, gpi, gmu, go;
};

struct ReviewDevice {
    std::string name;           // ngspice's: "m.xm2.msky130_fd_pr__nfet_01v8"
    std::string designer_name;  // the schematic's: "xm2"
    std::string instance;       // the instance path as written: "xm2.msky130_fd_pr__nfet_01v8"
    std::string type;           // the model's: nmos, pmos, npn, pnp
    bool mos = true;
    Region region = Region::saturation;
    bool healthy = true;        // in the region where it acts as a current source
    double saturation_voltage = 0;
    double margin = 0;          // Vds - Vdsat (Vce - Vce,sat)
    bool low_margin = false;
    MosValues mos_values;       // when mos
    BipolarValues bipolar_values;  // when not
    std::map<std::string, double> capacitances;  // those the op data held (op_point.hpp names)
};

// One level of the reflection rule, bottom first.
struct ReviewLevel {
    std::size_t device = 0;  // index into ReviewTree::devices
    double ro = 0, gm = 0, gmb = 0, rs = 0, rout = 0;
};

struct ReviewResistance {
    RoutEstimate inspection;       // the family formula where there is one, else the reflection rule
    double reflection = 0;         // the plain reflection rule's value
    std::vector<ReviewLevel> levels;
    // The mirror's own (the mirror alone, exact solve; scope "mirror alone"): what inspection
    // is compared with; the devices it covered and the nets it held, ngspice names.
    LinearisedImpedance own;
    std::vector<std::string> own_devices, own_held;
    SimulatedOwn own_simulated;      // ngspice's run of the testbench of the mirror alone
    LinearisedImpedance linearised;  // the node in the circuit
    SimulatedImpedance simulated;
    std::vector<ResistanceComparison> comparisons;
};

enum class OutputStatus { pass, fail };
std::string_view to_string(OutputStatus status);

struct ReviewOutput {
    std::string node;
    std::vector<std::size_t> devices;  // indices into ReviewTree::devices, bottom to top
    std::optional<double> reference_current, output_current;  // A, device polarity
    std::optional<CurrentRatio> ratio;
    ReviewResistance rout;
    Headroom headroom;
    // Its own findings and those of its mirror's reference side: indices into
    // ReviewTree::findings, in reading order.
    std::vector<std::size_t> findings;
    std::optional<std::size_t> worst_device;  // the lowest margin of the output's and reference's devices
    std::optional<Severity> worst_severity;   // of its unwaived findings
    OutputStatus status = OutputStatus::pass;
};

struct ReviewMirror {
    std::string id;     // stable (find_mirrors.hpp)
    std::string label;  // the same with the designer's device name: "nmos-simple:xm2"
    std::string family; // "nmos-cascode"
    std::string reference_node;
    std::vector<std::size_t> reference;  // indices into ReviewTree::devices, bottom to top
    std::vector<ReviewOutput> outputs;
};

struct ReviewSummary {
    std::size_t mirrors = 0, outputs = 0, failed_outputs = 0;
    std::size_t errors = 0, warnings = 0, infos = 0, waived = 0;  // unwaived findings by severity; waived ones
    bool passed = true;  // no unwaived finding at ReviewThresholds::fail_on or worse
};

struct ReviewTree {
    ToolInfo tool;
    ReviewInputs inputs;
    ReviewThresholds settings;
    std::vector<ReviewMirror> mirrors;
    std::vector<ReviewDevice> devices;  // every transistor of the mirrors, once
    std::vector<Finding> findings;      // every finding once, severity first, then reading order
    std::vector<std::size_t> circuit_findings;  // those that concern no output (indices into findings)
    std::vector<std::string> assumptions;       // what the review had to assume, in words
    std::vector<std::string> notes;             // what the op data's reader noted (OpPoint::notes)
    std::vector<SolveNote> solve_notes;         // what the exact solve assumed, bounded or left out, once
    ReviewSummary summary;

    // The designer's name of a device by its ngspice name, or of a mirror by its id; the
    // name itself when there is no other.
    const std::string& display_name(const std::string& name) const;
    std::map<std::string, std::string> display_names;  // only the names that differ
};

}  // namespace mirrorcheck
