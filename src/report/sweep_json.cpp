// The sweep as JSON for flows (schema mirrorcheck-sweep/1, docs/sweep.schema.json): plain SI
// numbers, a statistic null where no run had the value, every key always present.
#include <cmath>

#include "src/report/sweep_report.hpp"

namespace mirrorcheck::report {
namespace {

using nlohmann::json;

json number(double x) { return std::isfinite(x) ? json(x) : json(); }

json statistic_json(const std::optional<sweep::Statistic>& s) {
    if (!s) return json();
    return {{"mean", number(s->mean)},
            {"sigma", s->sigma ? number(*s->sigma) : json()},
            {"min", number(s->min)},
            {"max", number(s->max)},
            {"min_run", s->min_run},
            {"max_run", s->max_run},
            {"count", s->count}};
}

json counts_json(const std::map<std::string, std::size_t>& counts) {
    json j = json::object();
    for (const auto& [key, n] : counts) j[key] = n;
    return j;
}

json run_json(const sweep::RunRecord& r) {
    return {{"label", r.label},
            {"source", r.source},
            {"errors", r.errors},
            {"warnings", r.warnings},
            {"passed", r.passed},
            {"failed", r.failed},
            {"failure", r.failed ? json(r.failure) : json()}};
}

json output_json(const sweep::OutputStatistics& o) {
    json statistics = json::object();
    for (std::size_t q = 0; q < sweep::output_quantity_count; ++q)
        statistics[sweep::output_quantities[q]] = statistic_json(o.values[q]);
    return {{"mirror", o.mirror},
            {"label", o.label},
            {"node", o.node},
            {"statistics", statistics},
            {"findings", counts_json(o.findings)},
            {"runs", o.runs},
            {"passed", o.passed},
            {"yield", number(o.yield)},
            {"failed_runs", o.failed_runs}};
}

}  // namespace

nlohmann::json sweep_to_json(const sweep::SweepResult& result, const SweepInputs& inputs) {
    const ToolInfo tool = this_tool();
    json runs = json::array(), outputs = json::array(), devices = json::array();
    for (const auto& r : result.runs) runs.push_back(run_json(r));
    for (const auto& o : result.outputs) outputs.push_back(output_json(o));
    for (const auto& d : result.devices)
        devices.push_back({{"name", d.name},
                           {"statistics", {{"margin", statistic_json(d.margin)}}},
                           {"regions", counts_json(d.regions)}});
    const sweep::SweepSummary& s = result.summary;
    return {{"schema", "mirrorcheck-sweep/1"},
            {"tool", {{"name", tool.name}, {"version", tool.version},
                      {"revision", tool.revision.empty() ? json() : json(tool.revision)}}},
            {"inputs", {{"command", inputs.command},
                        {"netlist", inputs.netlist.empty() ? json() : json(inputs.netlist)},
                        {"sources", inputs.sources}}},
            {"runs", runs},
            {"outputs", outputs},
            {"devices", devices},
            {"summary", {{"runs", s.runs},
                         {"yield", number(s.yield)},
                         {"errors", s.errors},
                         {"warnings", s.warnings},
                         {"failed_runs", s.failed_runs},
                         {"runs_with_errors", s.runs_with_errors},
                         {"min_yield", s.min_yield ? number(*s.min_yield) : json()},
                         {"passed", s.passed}}}};
}

}  // namespace mirrorcheck::report
