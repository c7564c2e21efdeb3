// `mirrorcheck sweep NETLIST --op FILE...` and `mirrorcheck merge REPORT.json...` as a user
// runs them, on operating points ngspice computes in the test (a level-1 NMOS cascode sink
// whose output voltage a control loop steps with `alter`, one op plot per step):
// - differential: the sweep's statistics equal those of `merge` over separate
//   `review --format json` runs of the same ops (mean, min, max to 1e-12 relative), and
//   the mean and σ equal Python's statistics.mean and statistics.stdev (sample standard
//   deviation) of the reviews' own values: an implementation that is not ours;
// - one raw file holding every op plot gives the same statistics as one file per op;
// - the output out of saturation at the lowest step (by ngspice's own vds < vdsat) fails
//   that run: yield 3/4, exit status 1, and --min-yield 70% passes;
// - JUnit: one test case per output per run, failing only at that run;
// - bad input: a raw file with no op plot, runs whose devices differ from the netlist,
//   reports that are not review reports: exit status 2, the file and the run named.
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"
#include "support/ngspice_run.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

namespace fs = std::filesystem;
using nlohmann::json;
using mirrorcheck::test::CliResult;
using mirrorcheck::test::run_cli;

const double steps[] = {0.7, 1.2, 2.0, 2.6};  // V(out); the first leaves m4 in triode

std::string saves() {
    std::string s = "save all";
    for (const char* d : {"m1", "m2", "m3", "m4"})
        for (const char* p : {"id", "gm", "gds", "gmbs", "vdsat", "vds", "vgs", "vbs", "von"})
            s += std::string(" @") + d + "[" + p + "]";
    return s + "\n";
}

std::string circuit(double vout) {
    return "* cascode sink\n.model nc nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=0.45 phi=0.7\n"
           "vdd vdd 0 3\niref vdd top dc 40u\nm2 top top mid 0 nc w=10u l=1u\nm1 mid mid 0 0 nc w=10u l=1u\n"
           "m4 out top s4 0 nc w=10u l=1u\nm3 s4 mid 0 0 nc w=10u l=1u\nvout out 0 dc " +
           std::to_string(vout) + "\n";
}

// Every step in one run of ngspice: one op plot per step, appended to ops.raw, and each
// step also in its own file op1.raw ... op4.raw.
std::string loop_deck() {
    std::string d = circuit(steps[0]) + ".control\nset appendwrite\n" + saves();
    for (std::size_t k = 0; k < std::size(steps); ++k) {
        d += "alter vout dc=" + std::to_string(steps[k]) + "\nop\nwrite ops.raw\n";
        d += "unset appendwrite\nwrite op" + std::to_string(k + 1) + ".raw\nset appendwrite\n";
    }
    return d + "quit 0\n.endc\n.end\n";
}

CliResult cli(const fs::path& dir, const std::string& args) {
    CliResult r = run_cli(args, dir);
    if (args.find("--format json") != std::string::npos && r.status < 2) {
        const bool review = args.rfind("review", 0) == 0;
        CHECK(mirrorcheck::test::schema_errors(r.out, review ? "report.schema.json" : "sweep.schema.json") == "");
    }
    return r;
}

bool close(double a, double b) { return std::fabs(a - b) <= 1e-12 * std::max(std::fabs(a), std::fabs(b)); }

// The statistics of two sweep reports agree output by output and device by device.
void check_same_statistics(const json& a, const json& b) {
    REQUIRE(a["outputs"].size() == b["outputs"].size());
    for (std::size_t k = 0; k < a["outputs"].size(); ++k) {
        const json& x = a["outputs"][k];
        const json& y = b["outputs"][k];
        CAPTURE(x["node"]);
        CHECK(x["mirror"] == y["mirror"]);
        CHECK(x["findings"] == y["findings"]);
        CHECK(x["yield"] == y["yield"]);
        for (const auto& [name, s] : x["statistics"].items()) {
            CAPTURE(name);
            const json& t = y["statistics"][name];
            REQUIRE(s.is_null() == t.is_null());
            if (s.is_null()) continue;
            CHECK(s["count"] == t["count"]);
            for (const char* key : {"mean", "min", "max"}) CHECK(close(s[key].get<double>(), t[key].get<double>()));
        }
    }
    REQUIRE(a["devices"].size() == b["devices"].size());
    for (std::size_t k = 0; k < a["devices"].size(); ++k) {
        CHECK(a["devices"][k]["regions"] == b["devices"][k]["regions"]);
        const json& s = a["devices"][k]["statistics"]["margin"];
        const json& t = b["devices"][k]["statistics"]["margin"];
        for (const char* key : {"mean", "min", "max"}) CHECK(close(s[key].get<double>(), t[key].get<double>()));
    }
}

struct Simulated {
    mirrorcheck::test::NgspiceRun run;
    Simulated() : run(mirrorcheck::test::run_ngspice(loop_deck(), "mc-sweep")) {
        REQUIRE_MESSAGE(run.status == 0, run.output);
    }
};

}  // namespace

TEST_CASE("sweep over op plots: the statistics of separate reviews, and Python's mean and stdev") {
    Simulated s;
    const fs::path& dir = s.run.dir;
    // The case is about a step that leaves m4 without headroom, by ngspice's own numbers.
    const auto raw = mirrorcheck::raw::read_raw(s.run.file("op1.raw"));
    const auto& op = raw.plots.at(0);
    REQUIRE(op.real[*op.find("@m4[vds]")][0] < op.real[*op.find("@m4[vdsat]")][0]);

    const CliResult sweep = cli(dir, "sweep deck.cir --op op1.raw op2.raw op3.raw op4.raw --format json");
    CHECK(sweep.status == 1);
    const json swept = json::parse(sweep.out);
    CHECK(swept["summary"]["runs"] == 4);
    CHECK(swept["summary"]["yield"] == 0.75);
    CHECK(swept["summary"]["runs_with_errors"] == 1);
    CHECK(swept["runs"][0]["label"] == "op1");
    CHECK(swept["runs"][0]["passed"] == false);
    CHECK(swept["outputs"][0]["failed_runs"] == json::array({"op1"}));
    CHECK(swept["outputs"][0]["findings"]["out-of-saturation"] == 1);

    std::vector<std::string> reports;
    for (int k = 1; k <= 4; ++k) {
        const std::string name = "op" + std::to_string(k);
        const CliResult r = cli(dir, "review deck.cir --op " + name + ".raw --format json");
        CHECK(r.status == (k == 1 ? 1 : 0));
        mirrorcheck::test::write_text(dir / (name + ".json"), r.out);
        reports.push_back(name + ".json");
    }
    const CliResult merge = cli(dir, "merge op1.json op2.json op3.json op4.json --format json");
    CHECK(merge.status == 1);
    const json merged = json::parse(merge.out);
    check_same_statistics(swept, merged);
    CHECK(merged["runs"][0]["label"] == "op1");  // the report's file name: the same labels
    CHECK(swept["outputs"][0]["statistics"]["headroom.margin"]["min_run"] == "op1");
    CHECK(merged["outputs"][0]["statistics"]["headroom.margin"]["min_run"] == "op1");

    // Python's statistics module over the values of the separate reviews.
    const std::string py =
        "import json, statistics, sys\n"
        "reports = [json.load(open(p)) for p in sys.argv[1:]]\n"
        "out = {}\n"
        "for key, get in [('rout.inspection', lambda o: o['rout']['inspection']),\n"
        "                 ('rout.linearised', lambda o: o['rout']['linearised']),\n"
        "                 ('current.ratio', lambda o: o['current']['ratio']),\n"
        "                 ('headroom.margin', lambda o: o['headroom']['margin'])]:\n"
        "    xs = [get(r['mirrors'][0]['outputs'][0]) for r in reports]\n"
        "    out[key] = [statistics.mean(xs), statistics.stdev(xs), min(xs), max(xs)]\n"
        "json.dump(out, open('python.json', 'w'))\n";
    mirrorcheck::test::write_text(dir / "stats.py", py);
    REQUIRE(std::system(("cd '" + dir.string() + "' && python3 stats.py op1.json op2.json op3.json op4.json").c_str()) ==
            0);
    const json python = json::parse(mirrorcheck::test::read_text(dir / "python.json"));
    for (const auto& [name, v] : python.items()) {
        CAPTURE(name);
        const json& st = swept["outputs"][0]["statistics"][name];
        CHECK(close(st["mean"].get<double>(), v[0].get<double>()));
        CHECK(std::fabs(st["sigma"].get<double>() - v[1].get<double>()) <= 1e-9 * std::fabs(v[1].get<double>()));
        CHECK(st["min"].get<double>() == v[2].get<double>());
        CHECK(st["max"].get<double>() == v[3].get<double>());
    }

    // One file holding every op plot: the same statistics, runs labelled by plot.
    const CliResult one_file = cli(dir, "sweep deck.cir --op ops.raw --format json");
    CHECK(one_file.status == 1);
    const json multi = json::parse(one_file.out);
    CHECK(multi["runs"].size() == 4);
    CHECK(multi["runs"][2]["label"] == "ops/op3");
    check_same_statistics(swept, multi);

    // A yield floor below 3/4 passes the same sweep.
    CHECK(cli(dir, "sweep deck.cir --op ops.raw --min-yield 70% --format json").status == 0);
    CHECK(cli(dir, "sweep deck.cir --op ops.raw --min-yield 80%").status == 1);
    CHECK(cli(dir, "sweep deck.cir --op ops.raw --min-yield 120%").status == 2);
}

TEST_CASE("sweep tables and JUnit: worst first, one test case per output per run") {
    Simulated s;
    const CliResult table = cli(s.run.dir, "sweep deck.cir --op ops.raw");
    CHECK(table.status == 1);
    CHECK(table.out.find("FAIL") != std::string::npos);
    CHECK(table.out.find("yield 75 %") != std::string::npos);
    CHECK(table.out.find("ops/op1") != std::string::npos);

    const CliResult junit = cli(s.run.dir, "sweep deck.cir --op ops.raw --format junit");
    CHECK(junit.status == 1);
    mirrorcheck::test::write_text(s.run.dir / "sweep.xml", junit.out);
    // Read back by Python's XML parser: a document a CI server can read.
    const std::string py =
        "import sys, xml.etree.ElementTree as ET\n"
        "root = ET.parse('sweep.xml').getroot()\n"
        "cases = root.findall('./testsuite/testcase')\n"
        "failed = [c.get('name') for c in cases if c.find('failure') is not None]\n"
        "print(len(cases), root.get('tests'), root.get('failures'), '|'.join(failed))\n";
    mirrorcheck::test::write_text(s.run.dir / "junit.py", py);
    REQUIRE(std::system(("cd '" + s.run.dir.string() + "' && python3 junit.py > junit.txt").c_str()) == 0);
    // One mirror output (the cascode's), four runs, the first failing.
    CHECK(mirrorcheck::test::read_text(s.run.dir / "junit.txt") == "4 4 1 output out at ops/op1\n");
}

TEST_CASE("sweep and merge: bad input is exit status 2 naming the file and the run") {
    Simulated s;
    const fs::path& dir = s.run.dir;
    // A raw file with only a DC sweep.
    auto dc = mirrorcheck::test::run_ngspice(circuit(2.0) + ".control\n" + saves() +
                                                 "dc vout 1 2 0.5\nwrite dc.raw\nquit 0\n.endc\n.end\n",
                                             "mc-sweep-dc");
    REQUIRE_MESSAGE(dc.status == 0, dc.output);
    CliResult r = cli(dir, "sweep deck.cir --op '" + dc.file("dc.raw").string() + "'");
    CHECK(r.status == 2);
    CHECK(r.err.find("dc.raw") != std::string::npos);
    CHECK(r.err.find("[usage.no-op-plot]") != std::string::npos);

    // Ops of a circuit whose cascode devices are named otherwise (m4 is m9 there).
    std::string other = circuit(2.0);
    other.replace(other.find("m4 out"), 2, "m9");
    std::string other_saves = saves();
    for (std::size_t at; (at = other_saves.find("@m4[")) != std::string::npos;) other_saves.replace(at, 3, "@m9");
    auto renamed = mirrorcheck::test::run_ngspice(other + ".control\n" + other_saves +
                                                      "op\nwrite other.raw\nquit 0\n.endc\n.end\n",
                                                  "mc-sweep-other");
    REQUIRE_MESSAGE(renamed.status == 0, renamed.output);
    fs::copy_file(renamed.file("other.raw"), dir / "other.raw");
    r = cli(dir, "sweep deck.cir --op op2.raw other.raw");
    CHECK(r.status == 2);
    CHECK(r.err.find("other.raw") != std::string::npos);
    CHECK(r.err.find("run other ") != std::string::npos);
    CHECK(r.err.find("[sweep.run-does-not-fit]") != std::string::npos);

    // Reports that are not review reports.
    mirrorcheck::test::write_text(dir / "broken.json", "{\"schema\": ");
    r = cli(dir, "merge broken.json");
    CHECK(r.status == 2);
    CHECK(r.err.find("[merge.not-json]") != std::string::npos);
    const CliResult swept = cli(dir, "sweep deck.cir --op op2.raw --format json");
    CHECK(swept.status == 0);
    mirrorcheck::test::write_text(dir / "sweep.json", swept.out);
    r = cli(dir, "merge sweep.json");
    CHECK(r.status == 2);
    CHECK(r.err.find("sweep.json") != std::string::npos);
    CHECK(r.err.find("[merge.not-a-review-report]") != std::string::npos);
}
