// Renders a sweep as JUnit XML: one test case per mirror output per run, so that a CI
// server's list of failed tests names the corner or Monte Carlo run that failed. Nothing
// here judges: which findings fail is in each run's record (its review's --fail-on).
#include <fmt/format.h>

#include "src/report/sweep_report.hpp"
#include "src/report/xml_text.hpp"

namespace mirrorcheck::report {
namespace {

using xml::attr;
using xml::content;
using xml::undotted;

const sweep::RunOutput* find_output(const sweep::RunRecord& run, const sweep::OutputStatistics& o) {
    for (const auto& r : run.outputs)
        if (r.mirror == o.mirror && r.node == o.node) return &r;
    return nullptr;
}

std::string joined(const std::vector<std::string>& codes) {
    std::string s;
    for (const auto& c : codes) s += (s.empty() ? "" : ", ") + c;
    return s;
}

// The <failure> of one output in one run, or "" when it passed.
std::string failure_of(const sweep::RunRecord& run, const sweep::OutputStatistics& o) {
    const auto element = [](const std::string& type, const std::string& message, const std::string& body) {
        return fmt::format("      <failure type=\"{}\" message=\"{}\">{}</failure>\n", attr(type), attr(message),
                           content(body));
    };
    if (run.failed) return element("run-failed", "the run gave no review", run.failure);
    const sweep::RunOutput* r = find_output(run, o);
    if (!r) return element("not-reviewed", "the run's review has no such output", "source: " + run.source);
    if (r->passed) return {};
    const std::string codes = r->failing.empty() ? std::string("the review failed") : joined(r->failing);
    return element(r->failing.empty() ? "review-failed" : r->failing.front(), codes,
                   fmt::format("{} at {} in run {} ({}): {}", o.label, o.node, run.label, run.source, codes));
}

}  // namespace

std::string sweep_to_junit(const sweep::SweepResult& result, const SweepInputs& inputs) {
    std::size_t tests = 0, failures = 0;
    std::string cases;
    for (const auto& o : result.outputs)
        for (const auto& run : result.runs) {
            const std::string failure = failure_of(run, o);
            ++tests;
            std::string open = fmt::format("    <testcase classname=\"{}\" name=\"{}\"", attr(undotted(o.label)),
                                           attr("output " + o.node + " at " + run.label));
            if (failure.empty()) {
                cases += open + "/>\n";
                continue;
            }
            ++failures;
            cases += open + ">\n" + failure + "    </testcase>\n";
        }
    const std::string counts = fmt::format("tests=\"{}\" failures=\"{}\" errors=\"0\" skipped=\"0\"", tests, failures);
    const ToolInfo tool = this_tool();
    std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
    out += fmt::format("<testsuites name=\"mirrorcheck\" {}>\n", counts);
    out += fmt::format("  <testsuite name=\"mirrorcheck {}\" {}>\n", inputs.command, counts);
    out += "    <properties>\n";
    auto property = [&](const std::string& name, const std::string& value) {
        out += fmt::format("      <property name=\"{}\" value=\"{}\"/>\n", attr(name), attr(value));
    };
    if (!inputs.netlist.empty()) property("netlist", inputs.netlist);
    property("runs", std::to_string(result.summary.runs));
    property("yield", fmt::format("{}", result.summary.yield));
    property("tool", tool.name + " " + tool.version + (tool.revision.empty() ? "" : " " + tool.revision));
    out += "    </properties>\n" + cases + "  </testsuite>\n</testsuites>\n";
    return out;
}

}  // namespace mirrorcheck::report
