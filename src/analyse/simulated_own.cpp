// Pairing. The testbench of a mirror alone holds each of its outputs with its own source,
// own_probe_name(k), and drives one of them per AC run (acmag 1, the others 0), so the plot
// of output k holds i(vmc_own<k>) and v(NODE) = 1 (a held node's voltage is its source's
// AC value): the run that drives NODE is the one where v(NODE) is not zero, and the value
// is |v(NODE) / -i(vmc_own<k>)| at its one point, the impedance the source sees. A plot
// that holds i(vmc_own<k>) but no v(NODE) is from another netlist, and is not used.
#include "src/analyse/simulated_own.hpp"

#include <cmath>
#include <complex>
#include <numbers>

#include <fmt/format.h>

#include "parsers/common/text.hpp"

namespace mirrorcheck {
namespace {

constexpr std::string_view prefix = "vmc_own";
constexpr std::string_view suffix = "#branch";

bool ends_with(std::string_view s, std::string_view tail) {
    return s.size() >= tail.size() && s.substr(s.size() - tail.size()) == tail;
}

}  // namespace

std::string own_probe_name(std::size_t k) { return fmt::format("{}{}", prefix, k); }

bool is_alone_plot(const SimulationPlot& plot) {
    if (plot.kind != "ac") return false;
    for (const auto& [name, values] : plot.vectors)
        if (name.starts_with(prefix) && ends_with(name, suffix)) return true;
    return false;
}

std::vector<SimulatedOwn> find_simulated_own(const std::vector<SimulationPlot>& plots,
                                             const std::vector<Mirror>& mirrors) {
    bool any = false;
    for (const auto& plot : plots) any = any || is_alone_plot(plot);
    std::vector<SimulatedOwn> result;
    std::size_t k = 0;
    for (const Mirror& m : mirrors)
        for (const MirrorOutput& o : m.outputs) {
            SimulatedOwn own{m.id, to_lower(o.node), std::nullopt, {}};
            const std::string source = own_probe_name(++k);
            const std::string current = source + std::string(suffix);
            for (const auto& plot : plots) {
                if (!is_alone_plot(plot)) continue;
                const auto* i = plot.find(current);
                if (!i || i->empty()) continue;
                const auto* v = plot.find("v(" + own.node + ")");
                if (!v || v->empty()) {
                    own.note = fmt::format("{} in {} holds no node {}: the run is not of this netlist", source,
                                           plot.origin, own.node);
                    continue;
                }
                if ((*v)[0] == 0.0 || (*i)[0] == 0.0) continue;  // another output's run
                const std::complex<double> z = (*v)[0] / -(*i)[0];
                SimulatedValue value;
                value.magnitude = std::abs(z);
                value.phase_degrees = std::arg(z) * 180.0 / std::numbers::pi;
                value.frequency = plot.frequencies.empty() ? 0.0 : plot.frequencies[0];
                value.source = fmt::format("{}, v({})/(-i({})) at {:g} Hz (the mirror alone)", plot.origin, own.node,
                                           source, *value.frequency);
                own.value = value;
                own.note.clear();
                break;
            }
            if (!own.value && any && own.note.empty()) own.note = "no run of the mirror alone measured it";
            result.push_back(std::move(own));
        }
    return result;
}

}  // namespace mirrorcheck
