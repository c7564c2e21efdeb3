// Reconciliation of the three resistance values (src/analyse/reconcile.cpp) through
// `mirrorcheck review`, on decks simulated by ngspice in the test: one case per cause of
// disagreement (a loaded output, body effect neglected, a device out of saturation, a
// missing probe, an AC point above DC, an op that is not the AC run's), each producing its
// finding, and healthy cases producing none. The tolerance is the default 10 %.
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/ngspice_run.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

using nlohmann::json;

std::string saves(const std::vector<std::string>& devices, bool with_gmb = true) {
    std::string s = "save all";
    for (const auto& m : devices)
        for (const char* q : {"id", "gm", "gds", "gmbs", "vdsat", "vds", "vgs", "vbs", "von"})
            if (with_gmb || std::string(q) != "gmbs") s += " @" + m + "[" + q + "]";
    return s + "\n";
}

// A level-1 NMOS cascode sink, 1:1, output `out` held by `vout` at `vout_dc` with ac 1;
// `extra` adds lines (loads, capacitors).
std::string cascode(double vout_dc, const std::string& extra, double gamma = 0.45, double iref = 40e-6) {
    return "* cascode sink\n.model nc nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=" + std::to_string(gamma) +
           " phi=0.7\nvdd vdd 0 3\niref vdd top dc " + std::to_string(iref) +
           "\nm2 top top mid 0 nc w=10u l=1u\nm1 mid mid 0 0 nc w=10u l=1u\n"
           "m4 out top s4 0 nc w=10u l=1u\nm3 s4 mid 0 0 nc w=10u l=1u\nvout out 0 dc " +
           std::to_string(vout_dc) + " ac 1\n" + extra;
}

std::string control(const std::string& save_line) {
    return ".control\n" + save_line + "op\nwrite op.raw\nac dec 10 1 1g\nwrite ac.raw\nquit 0\n.endc\n.end\n";
}

struct Reviewed {
    int status = 0;
    json report;
    std::string text;
};

Reviewed review(const std::string& deck, const std::string& options = "") {
    auto run = mirrorcheck::test::run_ngspice(deck, "mc-reconcile");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    auto r = mirrorcheck::test::run_cli("review deck.cir --op op.raw --ac ac.raw --format json " + options, run.dir);
    REQUIRE_MESSAGE(r.status != 2, r.err);
    CHECK(mirrorcheck::test::report_schema_errors(r.out) == "");
    return {r.status, json::parse(r.out), r.out};
}

std::vector<json> with_code(const json& report, const std::string& code) {
    std::vector<json> out;
    for (const auto& f : report["findings"])
        if (f["code"] == code) out.push_back(f);
    return out;
}

bool any_resistance_finding(const json& report) {
    for (const char* c : {"inspection-vs-own", "loaded-output", "feedback-at-output", "linearised-vs-simulated",
                          "inspection-vs-simulated"})
        if (!with_code(report, c).empty()) return true;
    return false;
}

const json& rout_at(const json& report, const std::string& node) {
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"])
            if (o["node"] == node) return o["rout"];
    FAIL("no output " << node);
    static json none;
    return none;
}

}  // namespace

TEST_CASE("healthy cascode: the four values agree, no resistance finding, exit 0") {
    auto r = review(cascode(1.5, "") + control(saves({"m1", "m2", "m3", "m4"})));
    CHECK(r.status == 0);
    const json& rout = rout_at(r.report, "out");
    REQUIRE(rout["linearised"].is_number());
    REQUIRE(rout["simulated"].is_number());
    // ngspice's AC at 1 Hz against the exact solve and the (exact) reflection formula
    CHECK(rout["simulated"].get<double>() == doctest::Approx(rout["linearised"].get<double>()).epsilon(1e-3));
    CHECK(rout["inspection"].get<double>() == doctest::Approx(rout["linearised"].get<double>()).epsilon(1e-3));
    CHECK(rout["probe"] == "vout");
    CHECK(rout["probe_mode"] == "held");
    // alone on its node, the mirror's own resistance is the node's
    CHECK(rout["own"].get<double>() == doctest::Approx(rout["linearised"].get<double>()).epsilon(1e-6));
    CHECK(rout["comparisons"].size() == 4);
    for (const auto& c : rout["comparisons"]) CHECK(c["agrees"] == true);
    CHECK_FALSE(any_resistance_finding(r.report));
}

TEST_CASE("loaded output: reported as information naming the load; the mirror's own value is ngspice's without it") {
    auto r = review(cascode(1.5, "rleak out vdd 200k\n") + control(saves({"m1", "m2", "m3", "m4"})));
    auto f = with_code(r.report, "loaded-output");
    REQUIRE(f.size() == 1);
    CHECK(f[0]["severity"] == "info");
    CHECK(f[0]["message"].get<std::string>().find("rleak") != std::string::npos);
    CHECK(with_code(r.report, "inspection-vs-own").empty());        // the formula describes the mirror alone
    CHECK(with_code(r.report, "linearised-vs-simulated").empty());  // both see the load
    CHECK(r.report["summary"]["warnings"] == 0);
    CHECK(r.status == 0);
    // (a) the mirror's own resistance against ngspice: the same cascode simulated without the
    // load (the probe holds `out` at the same voltage, so the operating point is the same).
    auto bare = review(cascode(1.5, "") + control(saves({"m1", "m2", "m3", "m4"})));
    const json& loaded = rout_at(r.report, "out");
    CHECK(loaded["own"].get<double>() ==
          doctest::Approx(rout_at(bare.report, "out")["simulated"].get<double>()).epsilon(1e-3));
    // (b) the node with the load, against ngspice's AC at the node
    CHECK(loaded["linearised"].get<double>() == doctest::Approx(loaded["simulated"].get<double>()).epsilon(1e-3));
    CHECK(loaded["linearised"].get<double>() < 0.5 * loaded["own"].get<double>());
}

TEST_CASE("a floor on the node's impedance: --min-impedance turns the loaded node into a warning") {
    auto r = review(cascode(1.5, "rleak out vdd 200k\n") + control(saves({"m1", "m2", "m3", "m4"})),
                    "--min-impedance 1Mohm");
    auto f = with_code(r.report, "low-node-impedance");
    REQUIRE(f.size() == 1);
    CHECK(f[0]["severity"] == "warning");
    CHECK(f[0]["message"].get<std::string>().find("below the 1 MΩ asked for") != std::string::npos);
    CHECK(r.report["settings"]["min_impedance"] == doctest::Approx(1e6));
    // a floor for another node does not apply here; one for this node comes first
    auto other = review(cascode(1.5, "rleak out vdd 200k\n") + control(saves({"m1", "m2", "m3", "m4"})),
                        "--min-impedance elsewhere=1Mohm");
    CHECK(with_code(other.report, "low-node-impedance").empty());
    auto first = review(cascode(1.5, "rleak out vdd 200k\n") + control(saves({"m1", "m2", "m3", "m4"})),
                        "--min-impedance 1Mohm --min-impedance out=10kohm");
    CHECK(with_code(first.report, "low-node-impedance").empty());
}

TEST_CASE("body effect neglected: op data without gmb against a simulation that has it") {
    auto r = review(cascode(1.5, "", 0.9) + control(saves({"m1", "m2", "m3", "m4"}, false)));
    CHECK(with_code(r.report, "gmb-missing").size() == 1);
    auto f = with_code(r.report, "linearised-vs-simulated");
    REQUIRE(f.size() == 1);
    CHECK(f[0]["severity"] == "warning");
    CHECK(f[0]["message"].get<std::string>().find("body effect is neglected") != std::string::npos);
    CHECK(r.report["assumptions"].size() == 1);
}

TEST_CASE("a device out of saturation is reported before any resistance finding") {
    auto r = review(cascode(0.6, "rleak out vdd 200k\n") + control(saves({"m1", "m2", "m3", "m4"})));
    CHECK(r.status == 1);
    const json& all = r.report["findings"];
    REQUIRE(all.size() >= 2);
    CHECK(all[0]["code"] == "out-of-saturation");
    CHECK(any_resistance_finding(r.report));
}

TEST_CASE("probe missing: an output without a probe in the AC data is not simulated") {
    // a second mirror output `o2` held by a source without `ac`, and a .tf that names only vout
    auto r = review(cascode(1.5, "m5 o2 mid 0 0 nc w=10u l=1u\nvo2 o2 0 dc 1\n") +
                    control(saves({"m1", "m2", "m3", "m4", "m5"})));
    auto f = with_code(r.report, "not-simulated");
    REQUIRE(f.size() == 1);
    CHECK(f[0]["subject"] == "o2");
    CHECK(rout_at(r.report, "o2")["simulated"].is_null());
    CHECK(rout_at(r.report, "out")["simulated"].is_number());
}

TEST_CASE("an AC point above DC: the disagreement is put down to frequency") {
    auto r = review(cascode(1.5, "cout out 0 1p\n") + control(saves({"m1", "m2", "m3", "m4"})), "--at 100MHz");
    auto f = with_code(r.report, "linearised-vs-simulated");
    REQUIRE(f.size() == 1);
    CHECK(f[0]["severity"] == "warning");
    CHECK(f[0]["message"].get<std::string>().find("not a DC value") != std::string::npos);
    // the same data read at the lowest frequency agrees
    auto low = review(cascode(1.5, "cout out 0 1p\n") + control(saves({"m1", "m2", "m3", "m4"})));
    CHECK(with_code(low.report, "linearised-vs-simulated").empty());
}

TEST_CASE("an op that is not the AC run's: an error with no benign cause") {
    // op from a deck with 40 uA, AC from the same circuit at 10 uA: ro differs by about 4x
    auto op_run = mirrorcheck::test::run_ngspice(cascode(1.5, "") + control(saves({"m1", "m2", "m3", "m4"})),
                                                 "mc-reconcile");
    auto ac_run = mirrorcheck::test::run_ngspice(cascode(1.5, "", 0.45, 10e-6) +
                                                     control(saves({"m1", "m2", "m3", "m4"})),
                                                 "mc-reconcile");
    REQUIRE(op_run.status == 0);
    REQUIRE(ac_run.status == 0);
    auto r = mirrorcheck::test::run_cli("review deck.cir --op op.raw --ac '" + ac_run.file("ac.raw").string() +
                                            "' --format json",
                                        op_run.dir);
    REQUIRE_MESSAGE(r.status != 2, r.err);
    auto report = json::parse(r.out);
    auto f = with_code(report, "linearised-vs-simulated");
    REQUIRE(f.size() == 1);
    CHECK(f[0]["severity"] == "error");
    CHECK(r.status == 1);
}

TEST_CASE("the table shows all three values with the probe and the agreement") {
    auto run = mirrorcheck::test::run_ngspice(cascode(1.5, "") + control(saves({"m1", "m2", "m3", "m4"})),
                                              "mc-reconcile");
    REQUIRE(run.status == 0);
    auto r = mirrorcheck::test::run_cli("review deck.cir --op op.raw --ac ac.raw", run.dir);
    CHECK(r.status == 0);
    CHECK(r.out.find("inspection") != std::string::npos);
    CHECK(r.out.find("linearised") != std::string::npos);
    CHECK(r.out.find("held by vout") != std::string::npos);
    CHECK(r.out.find("agreement") != std::string::npos);
}

TEST_CASE("a circuit the solve cannot take whole: the mirror's own devices, said in a note and a finding") {
    // a behavioural source elsewhere has no linear model in the solve
    auto r = review(cascode(1.5, "bx bx 0 v=1.2\nrbx bx 0 10k\n") + control(saves({"m1", "m2", "m3", "m4"})));
    const json& rout = rout_at(r.report, "out");
    REQUIRE(rout["linearised"].is_number());
    CHECK(rout["linearised_scope"] == "mirror devices only");
    auto f = with_code(r.report, "not-linearised");
    REQUIRE(f.size() == 1);
    CHECK(f[0]["severity"] == "info");
    // the stack alone with its gates at AC ground is what the simulation sees here too
    CHECK(rout["simulated"].get<double>() == doctest::Approx(rout["linearised"].get<double>()).epsilon(1e-3));
    CHECK(r.status == 0);
}
