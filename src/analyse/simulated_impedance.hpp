// The impedance the simulator reports at each mirror output: the "simulated" value that
// inspection and the linearised solve are checked against. simulated_impedance.cpp
// describes how probes are found and which vectors are read.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"
#include "src/model/simulation_plots.hpp"

namespace mirrorcheck {

// A probe named by the user (`--probe NODE=SOURCE`) where the netlist alone cannot tell.
struct ProbeChoice {
    std::string node;
    std::string source;
};

struct SimulatedOptions {
    std::optional<double> at;          // Hz: read AC plots at the point nearest this; else the lowest
    std::vector<ProbeChoice> probes;   // override the probes found in the netlist
};

// One measurement of the impedance at a node.
struct SimulatedValue {
    double magnitude = 0;                // |Z|, ohms
    double phase_degrees = 0;            // arg Z; 0 for .tf
    std::optional<double> frequency;     // Hz for AC, absent for .tf (DC)
    std::string source;                  // "ac.raw: AC Analysis (plot 2), -v(out)/i(vout) at 1 Hz"
};

struct SimulatedImpedance {
    std::string node;                    // as asked, lower case
    std::string probe;                   // the probe source's name, empty when none was found
    std::string probe_mode;              // "held" (a voltage source holds the node) or "injected" (a current source)
    std::vector<SimulatedValue> values;  // AC first, then .tf; empty when not simulated
    std::string note;                    // why not simulated, or what to keep in mind
    const SimulatedValue* best() const { return values.empty() ? nullptr : &values.front(); }
};

// The source the netlist itself probes `node` with, as find_simulated_impedances would
// choose it without --probe: null when there is none or the choice is ambiguous.
const Device* netlist_probe(const Circuit& circuit, const std::string& node);

// For each node: its probe and the impedance the plots report through it. Throws
// InputError "usage.probe-source" when a ProbeChoice names no source, "usage.probe-node"
// for a source not on its node, and "usage.at-outside-sweep" when `at` lies outside an AC
// plot's sweep.
std::vector<SimulatedImpedance> find_simulated_impedances(const Circuit& circuit,
                                                          const std::vector<SimulationPlot>& plots,
                                                          const std::vector<std::string>& nodes,
                                                          const SimulatedOptions& options);

}  // namespace mirrorcheck
