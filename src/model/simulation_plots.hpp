// Small-signal results of a simulation run, as the passes need them: AC sweeps and
// transfer-function (.tf) results, each with its vectors by name. Filled from ngspice
// raw files by simulation_plots_build.hpp; the passes never see the file format.
#pragma once

#include <complex>
#include <map>
#include <string>
#include <string_view>
#include <vector>

namespace mirrorcheck {

struct SimulationPlot {
    std::string origin;                // "ac.raw: AC Analysis (plot 2)"
    std::string kind;                  // "ac" or "tf"
    std::vector<double> frequencies;   // AC: Hz, one per point; TF: empty (one point at DC)
    // Values per point by canonical vector name (raw::canonical_vector_name): `out` for
    // v(out), `vout#branch` for i(vout), `@m1[gm]`, `vout#input_impedance`. TF values are
    // real and stored with a zero imaginary part.
    std::map<std::string, std::vector<std::complex<double>>, std::less<>> vectors;

    std::size_t point_count() const;
    // The vector by any of ngspice's spellings (`v(out)`, `i(vout)`), or null.
    const std::vector<std::complex<double>>* find(std::string_view name) const;
};

}  // namespace mirrorcheck
