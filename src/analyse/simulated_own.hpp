// ngspice's value of each mirror's own output resistance: the AC run of the testbench of
// the mirror alone that `prepare` and `run` add to the review deck (src/deck/alone_deck.cpp),
// read back from the raw file. simulated_own.cpp says how a run is paired with its output.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "src/analyse/simulated_impedance.hpp"
#include "src/model/simulation_plots.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

// The source that holds output k of a testbench of a mirror alone and that its `.tf`
// names: "vmc_own<k>", k counting from 1 over every output of every mirror, in the order
// find_mirrors gives them.
std::string own_probe_name(std::size_t k);

// An AC plot of such a testbench: the other passes read the circuit's plots only.
bool is_alone_plot(const SimulationPlot& plot);

struct SimulatedOwn {
    std::string mirror;                   // Mirror::id
    std::string node;                     // lower case
    std::optional<SimulatedValue> value;  // |Z| of the mirror alone at DC
    std::string note;                     // why there is none, when alone runs were read
};

// One per output of every mirror, mirror by mirror, output by output.
std::vector<SimulatedOwn> find_simulated_own(const std::vector<SimulationPlot>& plots,
                                             const std::vector<Mirror>& mirrors);

}  // namespace mirrorcheck
