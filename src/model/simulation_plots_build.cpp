#include "src/model/simulation_plots_build.hpp"

#include <cmath>
#include <filesystem>

#include <fmt/format.h>

#include "src/model/plot_value_errors.hpp"

namespace mirrorcheck {

std::size_t SimulationPlot::point_count() const {
    if (!frequencies.empty()) return frequencies.size();
    return vectors.empty() ? 0 : vectors.begin()->second.size();
}

const std::vector<std::complex<double>>* SimulationPlot::find(std::string_view name) const {
    auto it = vectors.find(raw::canonical_vector_name(name));
    return it == vectors.end() ? nullptr : &it->second;
}

std::vector<SimulationPlot> simulation_plots_from_raw(const raw::RawFile& file) {
    std::vector<SimulationPlot> out;
    const std::string file_name = std::filesystem::path(file.path).filename().string();
    for (std::size_t k = 0; k < file.plots.size(); ++k) {
        const raw::Plot& plot = file.plots[k];
        const std::string kind = plot.kind();
        if ((kind != "ac" && kind != "tf") || !plot.decoded) continue;
        SimulationPlot p;
        p.kind = kind;
        p.origin = file.plots.size() == 1 ? fmt::format("{}: {}", file_name, plot.name)
                                          : fmt::format("{}: {} (plot {})", file_name, plot.name, k + 1);
        for (std::size_t v = 0; v < plot.variables.size(); ++v) {
            std::vector<std::complex<double>> values;
            if (plot.complex) values.assign(plot.cplx[v].begin(), plot.cplx[v].end());
            else values.assign(plot.real[v].begin(), plot.real[v].end());
            const raw::Variable& var = plot.variables[v];
            if (kind == "ac" && var.type == "frequency") {
                for (std::size_t i = 0; i < values.size(); ++i) {
                    const double f = values[i].real();
                    if (!std::isfinite(f) || f < 0)
                        throw errors::ac_bad_frequency(raw::value_location(file, plot, v, i), plot.name, i, f);
                    p.frequencies.push_back(f);
                }
                continue;
            }
            p.vectors.emplace(raw::canonical_vector_name(var.name), std::move(values));
        }
        out.push_back(std::move(p));
    }
    return out;
}

}  // namespace mirrorcheck
