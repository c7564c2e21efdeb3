// The values of each output's resistance side by side (by inspection; the mirror's own by
// the exact solve of the mirror alone; the node's in the circuit, linearised and simulated;
// HANDCALC.md section 5), and a finding with its likely cause for every pair that disagrees
// by more than the tolerance (a node loaded or fed back is information).
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "src/analyse/finding.hpp"
#include "src/analyse/inspect.hpp"
#include "src/analyse/linearise.hpp"
#include "src/analyse/own_resistance.hpp"
#include "src/analyse/simulated_impedance.hpp"
#include "src/analyse/simulated_own.hpp"
#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

struct ReconcileOptions {
    double tolerance = 0.10;                 // relative
    bool simulation_given = false;           // AC or .tf results were read at all
    std::vector<std::string> gmb_assumed_zero;  // MOS devices whose op data had no gmb
    std::optional<double> min_impedance;     // ohms: a node below this is a warning (all outputs)
    std::vector<std::pair<std::string, double>> min_impedance_by_node;  // the same for one node, first
    std::optional<double> min_impedance_at(const std::string& node) const;
};

// One pair of values. `difference` is first/second - 1: the second is the reference
// (own for inspection, linearised for own, simulated for the others).
struct ResistanceComparison {
    std::string pair;  // "inspection-vs-own", "own-vs-simulated-alone", "own-vs-linearised",
                       // "linearised-vs-simulated", "inspection-vs-simulated",
                       // "inspection-vs-simulated-alone"
    double first = 0, second = 0;
    double difference = 0;
    bool agrees = true;
};

struct OutputReconciliation {
    std::string mirror;  // Mirror::id
    std::string node;
    std::vector<ResistanceComparison> comparisons;  // only the pairs whose two values exist
};

struct Reconciliation {
    std::vector<OutputReconciliation> outputs;  // mirror by mirror, output by output
    std::vector<Finding> findings;
};

// Compares the values of every output of `mirrors` (inspection.mirrors in the same order);
// own and simulated_own by mirror and output, linearised and simulated by output node.
Reconciliation reconcile_resistances(const Circuit& circuit, const std::vector<Mirror>& mirrors,
                                     const InspectionResult& inspection, const std::vector<OwnResistance>& own,
                                     const std::vector<SimulatedOwn>& simulated_own,
                                     const std::vector<LinearisedImpedance>& linearised,
                                     const std::vector<SimulatedImpedance>& simulated,
                                     const ReconcileOptions& options);

}  // namespace mirrorcheck
