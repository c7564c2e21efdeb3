// The sweep's statistics pass on records made by hand: which run is named at the extremes,
// that σ is absent below two values, that yields are shares of every run (a failed run and
// a run without the output count against them), and --min-yield. The mean and σ of real
// reviews are checked against Python's statistics module in test_sweep_ngspice.
#include <doctest/doctest.h>

#include "src/sweep/sweep_statistics.hpp"

namespace {

using namespace mirrorcheck::sweep;

RunRecord run(const std::string& label, std::optional<double> margin, bool passed) {
    RunRecord r;
    r.label = label;
    r.passed = passed;
    RunOutput o;
    o.mirror = "nmos-simple:m2";
    o.node = "out";
    o.values[4] = margin;
    o.passed = passed;
    if (!passed) o.findings = {"out-of-saturation"};
    r.outputs.push_back(o);
    r.devices.push_back({"m2", margin, passed ? "saturation" : "triode"});
    return r;
}

}  // namespace

TEST_CASE("extremes name the first run to reach them; one value has no sigma") {
    const SweepResult one = compute_sweep_statistics({run("a", 0.2, true)});
    REQUIRE(one.outputs.size() == 1);
    const auto& s = *one.outputs[0].values[4];
    CHECK(s.count == 1);
    CHECK_FALSE(s.sigma.has_value());
    CHECK(s.min_run == "a");

    const SweepResult three = compute_sweep_statistics({run("a", 0.3, true), run("b", 0.1, true), run("c", 0.1, true)});
    const auto& t = *three.outputs[0].values[4];
    CHECK(t.min_run == "b");
    CHECK(t.max_run == "a");
    CHECK(t.sigma.has_value());
    CHECK_FALSE(three.outputs[0].values[0].has_value());  // no run had an inspection value
}

TEST_CASE("a failed run and a failing output count against the yield; --min-yield sets the verdict") {
    std::vector<RunRecord> runs = {run("a", 0.2, true), run("b", -0.1, false), run("c", 0.2, true),
                                   failed_record("d", "deck", "no convergence")};
    const SweepResult r = compute_sweep_statistics(runs);
    CHECK(r.summary.runs == 4);
    CHECK(r.summary.failed_runs == 1);
    CHECK(r.summary.runs_with_errors == 1);
    CHECK(r.summary.yield == 0.5);
    CHECK_FALSE(r.summary.passed);
    const OutputStatistics& o = r.outputs[0];
    CHECK(o.runs == 3);
    CHECK(o.passed == 2);
    CHECK(o.yield == 0.5);
    CHECK(o.failed_runs == std::vector<std::string>{"b", "d"});
    CHECK(o.findings.at("out-of-saturation") == 1);
    CHECK(r.devices[0].regions.at("triode") == 1);
    CHECK(r.devices[0].regions.at("saturation") == 2);
    CHECK(compute_sweep_statistics(runs, 0.5).summary.passed);
    CHECK_FALSE(compute_sweep_statistics(runs, 0.51).summary.passed);
}
