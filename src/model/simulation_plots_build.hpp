// Turns the AC and transfer-function plots of an ngspice raw file into SimulationPlots.
#pragma once

#include <vector>

#include "parsers/raw/raw.hpp"
#include "src/model/simulation_plots.hpp"

namespace mirrorcheck {

// Every decoded AC and TF plot of `file`, in file order; other plots are ignored.
std::vector<SimulationPlot> simulation_plots_from_raw(const raw::RawFile& file);

}  // namespace mirrorcheck
