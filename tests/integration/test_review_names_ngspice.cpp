// Names as the designer knows them, through `mirrorcheck review` on a deck of transistors
// wrapped one per subcircuit as process kits do (ngspice names them m.xbias.xm4.m0): the
// table, the findings and JUnit say `xbias.xm4`; JSON keeps ngspice's name (`name`,
// ids, subjects) beside the designer's (`designer_name`, `label`); JUnit writes the
// hierarchy's dots as `/`, which CI viewers do not split into packages; waivers take
// either name.
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/ngspice_run.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

using nlohmann::json;

// The cascode of tests/data/recognise/pdk_wrapped.cir with its output held at 0.6 V, too
// low for xm4 to stay saturated, and every parameter saved.
std::string deck() {
    std::string saves = "save all";
    for (const char* x : {"xm1", "xm2", "xm3", "xm4"})
        for (const char* p : {"id", "gm", "gds", "gmbs", "vdsat", "vds", "vgs", "vbs", "von"})
            saves += std::string(" @m.xbias.") + x + ".m0[" + p + "]";
    return "* a cascode mirror of wrapped transistors\n"
           ".model nch nmos (level=1 vto=0.5 kp=200u lambda=0.05 gamma=0.4 phi=0.7)\n"
           ".subckt nfet d g s b w=1u l=1u mult=1\nm0 d g s b nch w={w} l={l} m={mult}\n.ends nfet\n"
           ".subckt casmirror in out vss\nxm1 g1 g1 vss vss nfet w=10u l=1u\nxm3 in in g1 vss nfet w=10u l=1u\n"
           "xm2 mid g1 vss vss nfet w=10u l=1u mult=3\nxm4 out in mid vss nfet w=10u l=1u mult=3\n.ends casmirror\n"
           "vdd vdd 0 dc 3.3\nxbias ref out 0 casmirror\niref vdd ref 20u\nvout out 0 dc 0.6\n"
           ".control\n" + saves + "\nop\nwrite op.raw\nquit 0\n.endc\n.end\n";
}

}  // namespace

TEST_CASE("a wrapped cascode in triode: the designer's names everywhere a person reads") {
    auto run = mirrorcheck::test::run_ngspice(deck(), "mc-names");
    REQUIRE_MESSAGE(run.status == 0, run.output);

    auto table = mirrorcheck::test::run_cli("review deck.cir --op op.raw", run.dir);
    CHECK(table.status == 1);
    // ngspice's names only inside a `save` line to paste, which must use them.
    std::string prose;
    bool quoted = false;
    for (char c : table.out) {
        if (c == '`') quoted = !quoted;
        else if (!quoted) prose += c;
    }
    CHECK(prose.find("m.xbias") == std::string::npos);
    CHECK(table.out.find("nmos-cascode:xbias.xm4, reference at") != std::string::npos);
    CHECK(table.out.find("xbias.xm4 is in triode") != std::string::npos);

    auto j = mirrorcheck::test::run_cli("review deck.cir --op op.raw --format json", run.dir);
    CHECK(mirrorcheck::test::report_schema_errors(j.out) == "");
    auto report = json::parse(j.out);
    CHECK(report["mirrors"][0]["id"] == "nmos-cascode:m.xbias.xm4.m0");
    CHECK(report["mirrors"][0]["label"] == "nmos-cascode:xbias.xm4");
    bool found = false;
    for (const auto& d : report["devices"])
        if (d["name"] == "m.xbias.xm4.m0") {
            found = true;
            CHECK(d["designer_name"] == "xbias.xm4");
            CHECK(d["instance"] == "xbias.xm4.m0");
            CHECK(d["healthy"] == false);
        }
    CHECK(found);
    bool subject = false;
    for (const auto& f : report["findings"])
        if (f["code"] == "out-of-saturation") {
            subject = subject || f["subject"] == "m.xbias.xm4.m0";
            CHECK(f["message"].get<std::string>().find("xbias.xm4 is in") == 0);
        }
    CHECK(subject);

    auto junit = mirrorcheck::test::run_cli("review deck.cir --op op.raw --format junit", run.dir);
    CHECK(junit.out.find("classname=\"nmos-cascode:xbias/xm4\" name=\"output out\"") != std::string::npos);
    CHECK(junit.out.find("classname=\"nmos-cascode:xbias.xm4\"") == std::string::npos);

    // a waiver by the designer's names
    mirrorcheck::test::write_text(run.file("w.txt"), "xbias.xm4 out-of-saturation held low in reset only\n");
    auto waived = mirrorcheck::test::run_cli("review deck.cir --op op.raw --waive w.txt --format json", run.dir);
    auto w = json::parse(waived.out);
    bool all_waived = true;
    for (const auto& f : w["findings"])
        if (f["code"] == "out-of-saturation" && f["subject"] == "m.xbias.xm4.m0") all_waived = all_waived && f.value("waived", false);
    CHECK(all_waived);
}
