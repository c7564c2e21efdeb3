#include "src/sweep/sweep_plan.hpp"

#include <fmt/format.h>

namespace mirrorcheck::sweep {

std::vector<PlannedRun> plan_runs(const SweepAxes& axes) {
    std::vector<PlannedRun> runs{{"", RunVariant{}}};
    runs.front().variant.params = axes.params;
    const auto extend = [&runs](auto values, auto apply) {
        std::vector<PlannedRun> more;
        for (const PlannedRun& r : runs)
            for (const auto& v : values) {
                PlannedRun next = r;
                const std::string part = apply(next.variant, v);
                next.label += (next.label.empty() ? "" : "/") + part;
                more.push_back(std::move(next));
            }
        runs = std::move(more);
    };
    if (!axes.corners.empty())
        extend(axes.corners, [](RunVariant& v, const std::string& c) {
            v.corner = c;
            return c;
        });
    if (!axes.temperatures.empty())
        extend(axes.temperatures, [](RunVariant& v, double t) {
            v.temperature = t;
            return fmt::format("{}C", t);
        });
    for (const auto& [source, values] : axes.supplies)
        extend(values, [name = source](RunVariant& v, double volts) {
            v.supplies.emplace_back(name, volts);
            return fmt::format("{}={}", name, volts);
        });
    if (axes.monte_carlo > 0) {
        std::vector<std::size_t> draws;
        for (std::size_t k = 1; k <= axes.monte_carlo; ++k) draws.push_back(k);
        extend(draws, [seed = axes.seed](RunVariant& v, std::size_t k) {
            v.seed = seed + k - 1;
            return fmt::format("mc{}", k);
        });
    }
    if (runs.size() == 1 && runs.front().label.empty()) runs.front().label = "nominal";
    return runs;
}

}  // namespace mirrorcheck::sweep
