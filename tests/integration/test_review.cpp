// `mirrorcheck review` as a user runs it, on decks simulated by ngspice in the test:
// exit status 1 with an out-of-saturation error when a cascode's output voltage is too
// low (its region must agree with ngspice's own vds < vdsat), exit 0 and JSON following
// the report contract (DESIGN.md, version 1) when the same mirror has headroom, the same
// review from the `show` listing as from the raw file, and exit 2 when the operating
// point lacks the device parameters, with the save line to add.
#include <cstdlib>
#include <filesystem>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"
#include "support/ngspice_run.hpp"
#include "support/run_cli.hpp"

namespace {

using Result = mirrorcheck::test::CliResult;

Result review(const std::filesystem::path& dir, const std::string& args) {
    return mirrorcheck::test::run_cli("review " + args, dir);
}

// A level-1 NMOS cascode sink, 1:1, with its output held at `vout`.
std::string cascode_deck(double vout, bool save_parameters) {
    std::string saves = save_parameters ? "save all @m1[id] @m1[gm] @m1[gds] @m1[gmbs] @m1[vdsat] @m1[vds] @m1[vgs] "
                                          "@m1[vbs] @m1[von] @m2[id] @m2[gm] @m2[gds] @m2[gmbs] @m2[vdsat] @m2[vds] "
                                          "@m2[vgs] @m2[vbs] @m2[von] @m3[id] @m3[gm] @m3[gds] @m3[gmbs] @m3[vdsat] "
                                          "@m3[vds] @m3[vgs] @m3[vbs] @m3[von] @m4[id] @m4[gm] @m4[gds] @m4[gmbs] "
                                          "@m4[vdsat] @m4[vds] @m4[vgs] @m4[vbs] @m4[von]\n"
                                        : "save all\n";
    return "* cascode sink\n.model nc nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=0.45 phi=0.7\n"
           "vdd vdd 0 3\niref vdd top dc 40u\nm2 top top mid 0 nc w=10u l=1u\nm1 mid mid 0 0 nc w=10u l=1u\n"
           "m4 out top s4 0 nc w=10u l=1u\nm3 s4 mid 0 0 nc w=10u l=1u\nvout out 0 dc " +
           std::to_string(vout) + "\n.control\n" + saves +
           "op\nwrite op.raw\nshow all > show.txt\nquit 0\n.endc\n.end\n";
}

}  // namespace

TEST_CASE("a cascode without headroom: error finding, exit 1, region as ngspice's vds < vdsat") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(0.7, true), "mc-review");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    auto raw = mirrorcheck::raw::read_raw(run.file("op.raw"));
    const auto& op = raw.plots[0];
    double vds = op.real[*op.find("@m4[vds]")][0], vdsat = op.real[*op.find("@m4[vdsat]")][0];
    REQUIRE(vds < vdsat);  // the deck does what this case is about, by ngspice's own numbers
    Result r = review(run.dir, "deck.cir --op op.raw --format json");
    CHECK(r.status == 1);
    auto j = nlohmann::json::parse(r.out);
    bool flagged = false;
    for (const auto& f : j["findings"]) flagged = flagged || (f["code"] == "out-of-saturation" && f["subject"] == "m4");
    CHECK(flagged);
    for (const auto& d : j["devices"])
        if (d["name"] == "m4") CHECK(d["region"] != "saturation");
}

TEST_CASE("the same cascode with headroom: exit 0 and the report contract's fields") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, true), "mc-review");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    Result r = review(run.dir, "deck.cir --op op.raw --format json");
    CHECK(r.status == 0);
    auto j = nlohmann::json::parse(r.out);
    CHECK(j["schema"] == "mirrorcheck-report/1");
    REQUIRE(j["mirrors"].size() == 1);
    const auto& m = j["mirrors"][0];
    CHECK(m["family"] == "nmos-cascode");
    CHECK(m["reference"] == nlohmann::json({"m1", "m2"}));
    const auto& o = m["outputs"][0];
    CHECK(o["node"] == "out");
    CHECK(o["devices"] == nlohmann::json({"m3", "m4"}));
    CHECK(o["rout"]["inspection"].get<double>() > o["rout"]["inspection_no_body"].get<double>());
    // Nothing loads this output but the probe, which the solve removes: the whole-circuit
    // value equals the exact-for-cascodes inspection value (HANDCALC.md section 2).
    CHECK(o["rout"]["linearised"].get<double>() == doctest::Approx(o["rout"]["inspection"].get<double>()).epsilon(1e-6));
    CHECK(o["rout"]["simulated"].is_null());
    CHECK(o["headroom"]["vout"] == doctest::Approx(2.0));
    CHECK(o["headroom"]["vout_min"].get<double>() < 2.0);
    CHECK(o["current"]["ratio"] == doctest::Approx(o["current"]["out"].get<double>() / o["current"]["ref"].get<double>()));
    CHECK(j["summary"]["errors"] == 0);

    SUBCASE("the show listing gives the same resistance as the raw file, to its 6 digits") {
        Result l = review(run.dir, "deck.cir --op show.txt --format json");
        REQUIRE(l.status == 0);
        auto k = nlohmann::json::parse(l.out);
        CHECK(k["mirrors"][0]["outputs"][0]["rout"]["inspection"].get<double>() ==
              doctest::Approx(o["rout"]["inspection"].get<double>()).epsilon(1e-4));
    }
}

TEST_CASE("an op without device parameters: exit 2 and the save line to add") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, false), "mc-review");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    Result r = review(run.dir, "deck.cir --op op.raw");
    CHECK(r.status == 2);
    CHECK(r.err.find("op.missing-parameters") != std::string::npos);
    CHECK(r.err.find("@m4[gm]") != std::string::npos);
}

TEST_CASE("bad option values are usage errors") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, true), "mc-review");
    REQUIRE(run.status == 0);
    CHECK(review(run.dir, "deck.cir --op op.raw --margin 100mA").status == 2);
    CHECK(review(run.dir, "deck.cir --op op.raw --margin 50mV").status == 0);
}
