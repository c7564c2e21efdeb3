// The one place that decides the order of the passes for a review, and joins their results
// into the review tree that every back end reads.
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "parsers/waivers/waivers.hpp"
#include "src/analyse/designer_names.hpp"
#include "src/analyse/inspect.hpp"
#include "src/analyse/review_tree.hpp"
#include "src/analyse/simulated_impedance.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"
#include "src/model/simulation_plots.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

struct ReviewSettings {
    InspectOptions inspect;
    SimulatedOptions simulated;             // --probe, --at
    double tolerance = 0.10;                // --tolerance: the resistance values must agree within this
    std::optional<double> min_impedance;    // --min-impedance R: every output node's floor
    std::vector<std::pair<std::string, double>> min_impedance_by_node;  // --min-impedance NODE=R
    waivers::Waivers waivers;               // --waive: findings accepted, shown as waived
    std::vector<std::string> waiver_files;  // where they came from
    Severity fail_on = Severity::error;     // --fail-on: findings at this severity or worse fail the review
};

// Recognises the mirrors, checks that the operating point has what they need, inspects
// them, solves the linearised circuit at their outputs, reads the simulated impedance at
// each output from `plots` (AC and .tf results; may be empty) and ngspice's value of each
// mirror alone from the runs of its testbench among them, reconciles them all, marks
// the findings the waivers accept, and joins it all into one tree.
// Throws InputError "op.missing-parameters" naming what is missing (a MOS device that lacks
// only gmb is reviewed with gmb = 0, and a finding says so).
// `op` and `plots` are taken by value: a caller done with them moves them in (a large
// circuit's op data and AC plots are not held twice).
ReviewTree run_review(const Circuit& circuit, OpPoint op, std::vector<SimulationPlot> plots,
                      const ReviewSettings& settings, const ReviewInputs& inputs = {});

// The mirrors of a circuit and the designer's names of their devices: what every review of
// the circuit starts from, found once when many operating points are reviewed (`sweep`).
struct Recognition {
    std::vector<Mirror> mirrors;
    DesignerNames names;
};
Recognition recognise_circuit(const Circuit& circuit);

// The same review from a recognition made once: run_review(circuit, op, ...) is this with
// recognise_circuit(circuit).
ReviewTree run_review(const Circuit& circuit, const Recognition& recognition, OpPoint op,
                      std::vector<SimulationPlot> plots, const ReviewSettings& settings,
                      const ReviewInputs& inputs = {});

// The same without simulation results.
ReviewTree run_review(const Circuit& circuit, const OpPoint& op, const InspectOptions& options);

}  // namespace mirrorcheck
