// Differential tests of the netlist reader against ngspice itself: for decks of our own,
// ngspice's `listing expand` (the flattened netlist it simulates: device names, then nets)
// and `show all` (device -> model, bins included; m) must agree exactly with our Circuit.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>

#include "src/model/circuit_build.hpp"
#include "support/corpus.hpp"
#include "support/ngspice_run.hpp"
#include "support/print_output.hpp"
#include "test_netlist_support.hpp"

using mirrorcheck::Circuit;
using mirrorcheck::Device;

namespace {

using namespace mirrorcheck::test::netlist;

const std::string control_block = ".control\nlisting expand\nshow all\nshow m : m : model\nquit 0\n.endc\n.end\n";

struct Compared {
    mirrorcheck::test::NgspiceRun run;
    Circuit circuit;
};

Compared compare(const std::string& deck, bool with_show = true) {
    Compared c;
    c.run = mirrorcheck::test::run_ngspice(deck + control_block, "mirrorcheck-netlist-ngspice");
    REQUIRE_MESSAGE(c.run.status == 0, c.run.output);
    c.circuit = mirrorcheck::read_circuit(c.run.file("deck.cir"));
    check_against_listing(c.circuit, listed_elements(c.run.output, c.circuit.title));
    if (with_show) CHECK(check_against_show(c.circuit, c.run.output) > 0);
    return c;
}

}  // namespace

TEST_CASE("ngspice: every element kind inside two levels of subcircuits") {
    compare(
        "element kinds in a hierarchy\n"
        ".global vcc\n"
        ".subckt leaf a b\n"
        "R1 a mid 1k\nC1 mid b 1p\nL1 a b 1u\nL2 mid b 2u\nK1 L1 L2 0.5\nD1 a b dmod\nQ1 a mid b npn1\n"
        "Q2 a mid b vcc npn1\nM2 a mid b b nch w=1u l=1u\nJ1 a mid b jmod\nV1 x1 b 0\nE1 a e1n mid b 2\n"
        "G1 a b mid b 1m\nF1 a b V1 2\nH1 a b V1 2\nB1 a b V=v(mid)*2\nI1 a gnd 1u\nR2 vcc b 10k\n"
        ".ends leaf\n"
        ".subckt branch p q\nX1 p q leaf\nR5 p inner 10k\nR6 inner q 1k\n.ends\n"
        "Vs in 0 1\nVcc vcc 0 5\nX9 in 0 branch\nX8 in out leaf\nR0 in GND 1k\nRL out 0 1k\n"
        ".model dmod d\n.model npn1 npn\n.model nch nmos level=1\n.model jmod njf\n");
}

TEST_CASE("ngspice: a process-kit style wrapped transistor with binned models and .option scale") {
    compare(
        "wrapped binned transistors\n"
        ".option scale=1e-6\n"
        ".subckt nfet d g s b l=1 w=1 mult=1\n"
        "Rd d di 5\n"
        "mnfet di g s b nfet_model l={l} w={w}\n"
        ".model nfet_model.0 nmos level=54 version=4.5 lmin=1e-7 lmax=1e-6 wmin=1e-7 wmax=1e-4\n"
        ".model nfet_model.1 nmos level=54 version=4.5 lmin=1e-6 lmax=1e-4 wmin=1e-7 wmax=5e-6\n"
        ".model nfet_model.2 nmos level=54 version=4.5 lmin=1e-6 lmax=1e-4 wmin=5e-6 wmax=1e-4\n"
        ".ends\n"
        "XM1 d1 g 0 0 nfet w=2 l=0.5\n"
        "XM2 d2 g 0 0 nfet w=5 l=2 m=2\n"
        "XM3 d3 g 0 0 nfet w=10 l=1\n"
        "M4 d4 g 0 0 top w=1 l=1\n"
        ".model top.1 nmos level=54 version=4.5 lmin=1e-7 lmax=1e-6 wmin=1e-7 wmax=1e-6\n"
        ".model top.2 nmos level=54 version=4.5 lmin=1e-6 lmax=1e-5 wmin=1e-7 wmax=1e-6\n"
        "Vg g 0 1\nVd1 d1 0 1\nVd2 d2 0 1\nVd3 d3 0 1\nVd4 d4 0 1\n");
}

TEST_CASE("ngspice: parameters, local models, multipliers and three levels of nesting") {
    auto c = compare(
        "parameters and multipliers\n"
        ".param wbase=2u lbase={wbase/2}\n"
        ".subckt unit d g s w=1u l=1u\n"
        ".model lnch nmos level=1 vto=0.5\n"
        "M1 d g s s lnch w={w} l={l}\nC1 d s 1p\n"
        ".ends\n"
        ".subckt pair d1 d2 g s params: k=2\n"
        "X1 d1 g s unit w={k*wbase}\nX2 d2 g s unit w={wbase} l={lbase*3} m=2\n"
        ".ends\n"
        ".subckt quad a b g\nX1 a b g 0 pair k=3\nX2 b a g 0 pair\nM7 a g 0 0 nch m=3\n.ends\n"
        "Xq n1 n2 g quad m=2\nXp n1 n2 g 0 pair\nM9 n1 g 0 0 nch m=4\n"
        ".model nch nmos level=1\n"
        "Vg g 0 1\nV1 n1 0 1\nV2 n2 0 1\n");
    const Device* m = c.circuit.find_device("m.xq.x1.x2.m1");
    REQUIRE(m != nullptr);
    CHECK(m->model->ngspice_name == "xq.x1.x2:lnch");
    CHECK(m->parameter("l").value() == doctest::Approx(3e-6));
}

TEST_CASE("ngspice: includes and library sections") {
    mirrorcheck::test::NgspiceRun run;
    run.dir = mirrorcheck::test::make_temp_dir("mirrorcheck-netlist-ngspice");
    std::filesystem::create_directories(run.dir / "lib");
    mirrorcheck::test::write_text(run.dir / "lib" / "corners.lib",
                                  "* corners\n.lib typ\n.param vt0=0.5\n.lib 'corners.lib' devices\n.endl typ\n"
                                  ".lib devices\n.model nch nmos level=1 vto={vt0}\n"
                                  ".subckt cell d g s\nM1 d g s s nch\nR1 d s 1meg\n.ends\n.endl devices\n");
    mirrorcheck::test::write_text(run.dir / "top.inc", "Xc out g 0 cell\n");
    mirrorcheck::test::write_text(run.dir / ".spiceinit", "set num_threads=1\n");
    mirrorcheck::test::write_text(run.dir / "deck.cir", "includes\n.lib \"lib/corners.lib\" typ\n.include top.inc\n"
                                                        "Vg g 0 1\nVo out 0 1\n" + control_block);
    std::string cmd = "cd '" + run.dir.string() + "' && ngspice -b deck.cir > ngspice.log 2>&1";
    REQUIRE(std::system(cmd.c_str()) == 0);
    run.output = mirrorcheck::test::read_text(run.dir / "ngspice.log");
    Circuit c = mirrorcheck::read_circuit(run.dir / "deck.cir");
    check_against_listing(c, listed_elements(run.output, c.title));
    CHECK(check_against_show(c, run.output) > 0);
}

TEST_CASE("ngspice: X-line multipliers through subcircuits with and without parameters") {
    compare(
        "multipliers\n"
        ".subckt plain d g s\nM1 d g s s nch w=1u l=1u m=2\nC1 d s 1p\n.ends\n"
        ".subckt outer d g s\nX1 d g s plain m=5\nM2 d g s s nch m=6\n.ends\n"
        ".subckt declares d g s m=1\nM1 d g s s nch m=2\n.ends\n"
        ".subckt sized d g s w=1u\nM1 d g s s nch w={w} m=3\n.ends\n"
        ".subckt wrap d g s\nX1 d g s declares m=7\nX2 d g s sized m=2\nX3 d g s sized\nX4 d g s plain m=9\n.ends\n"
        "X1 d g 0 plain\nX2 d g 0 outer m=3\nX3 d g 0 outer\nX4 d g 0 declares m=4\nX5 d g 0 wrap m=2\n"
        "X6 d g 0 sized m=8\nM9 d g 0 0 nch m=4\n"
        ".model nch nmos level=1\nVd d 0 1\nVg g 0 1\n");
}

TEST_CASE("ngspice: binning by finger width with .options wnflag=1, by total width without") {
    const std::string devices =
        ".model nch.1 nmos level=54 lmin=0.1u lmax=10u wmin=1u wmax=3u\n"
        ".model nch.2 nmos level=54 lmin=0.1u lmax=10u wmin=3u wmax=10u\n"
        "M1 d d 0 0 nch w=4u l=1u nf=2\nM2 d d 0 0 nch w=4u l=1u\nVd d 0 1\n";
    auto fingers = compare("finger width\n.options wnflag=1\n" + devices);
    CHECK(fingers.circuit.find_device("m1")->model->ngspice_name == "nch.1");
    CHECK(fingers.circuit.find_device("m2")->model->ngspice_name == "nch.2");
    auto total = compare("total width\n" + devices);
    CHECK(total.circuit.find_device("m1")->model->ngspice_name == "nch.2");
}

TEST_CASE("ngspice: the golden cascode mirror deck") {
    std::string deck = mirrorcheck::test::read_text(std::filesystem::path(MIRRORCHECK_TEST_DATA) / "netlist" /
                                                    "cascode_mirror.cir");
    compare(deck);
}

namespace {

namespace fs = std::filesystem;

// Runs `deck` (its last line before the control block) in `dir` with `op` and a `print` of
// every resistor's value and of `more` vectors; returns what ngspice printed.
mirrorcheck::test::PrintedVectors printed(const fs::path& dir, const std::string& deck, const Circuit& c,
                                          const std::vector<std::string>& more = {}) {
    std::string control = ".control\nop\n";
    for (const Device& d : c.devices())
        if (d.kind == mirrorcheck::DeviceKind::resistor) control += "print @" + d.name + "[resistance]\n";
    for (const auto& v : more) control += "print " + v + "\n";
    mirrorcheck::test::write_text(dir / "printed.cir", deck + control + "quit 0\n.endc\n");
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
    const std::string cmd = "cd '" + dir.string() + "' && ngspice -b printed.cir > printed.log 2>&1";
    const int status = std::system(cmd.c_str());
    const std::string log = mirrorcheck::test::read_text(dir / "printed.log");
    REQUIRE_MESSAGE(status == 0, log);
    return mirrorcheck::test::parse_print_output(log);
}

// Every resistor's value equals ngspice's; returns how many were compared.
std::size_t check_resistors(const Circuit& c, const mirrorcheck::test::PrintedVectors& values) {
    std::size_t compared = 0;
    for (const Device& d : c.devices()) {
        if (d.kind != mirrorcheck::DeviceKind::resistor) continue;
        auto it = values.find("@" + d.name + "[resistance]");
        REQUIRE_MESSAGE(it != values.end(), "ngspice printed no value for " << d.name);
        CHECK_MESSAGE(*d.value == doctest::Approx(it->second.at(0).real()), d.name);
        ++compared;
    }
    return compared;
}

using mirrorcheck::test::corpus_dir;

}  // namespace

TEST_CASE("ngspice: an X line's expressions are evaluated in the instance's own scope") {
    const std::string deck =
        "instance scope\n.param g=100 p=7 k=50\n"
        ".subckt s a b p=1 q=1 r=5\n.param t=4\n.param u={t*10}\nR1 a b {p}\nR2 a b {q}\nR3 a b {r}\nR4 a b {u}\n.ends\n"
        ".subckt s2 a b q=1 p=1\nR1 a b {p}\nR2 a b {q}\n.ends\n"
        ".subckt outer a b k=3 p=9\nXI a b s q='k*2' r='p'\n.ends\n"
        "V1 1 0 1\n"
        "XA 1 0 s p=2 q='p*3'\nXB 1 0 s q='p*3' p=2\nXC 1 0 s q='r*3'\nXD 1 0 s q='g*3'\nXE 1 0 s q='p*3'\n"
        "XF 1 0 s q='t*2' t=6\nXG 1 0 s p='p*2'\nXH 1 0 s2 q='p*3' p=2\nXO 1 0 outer\nXZ 1 0 s zz=3\n"
        "XY 1 0 s u='r+g' r=2\n";
    mirrorcheck::test::NgspiceRun run;
    run.dir = mirrorcheck::test::make_temp_dir("mirrorcheck-netlist-ngspice");
    mirrorcheck::test::write_text(run.dir / "deck.cir", deck);
    Circuit c = mirrorcheck::read_circuit(run.dir / "deck.cir");
    CHECK(check_resistors(c, printed(run.dir, deck, c)) == 4 * 10 + 2);
}

TEST_CASE("ngspice: PDK instance lines as schematic tools write them (sky130 nfet_01v8, gf180 nmos_3p3)") {
    if (!mirrorcheck::test::corpus_present()) return;
    mirrorcheck::test::NgspiceRun run;
    run.dir = mirrorcheck::test::make_temp_dir("mirrorcheck-netlist-ngspice");
    fs::create_directory_symlink(fs::canonical(corpus_dir() / "sky130"), run.dir / "sky130");
    fs::create_directory_symlink(fs::canonical(corpus_dir() / "gf180mcu"), run.dir / "gf180");
    const std::string sky =
        ".include \"sky130/models/parameters/lod.spice\"\n"
        ".include \"sky130/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__tt.corner.spice\"\n"
        ".include \"sky130/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__mismatch.corner.spice\"\n";
    const std::string line =
        " d g 0 0 sky130_fd_pr__nfet_01v8 L=1 W=10 nf=2 ad='int((nf+1)/2) * W/nf * 0.29' "
        "as='int((nf+2)/2) * W/nf * 0.29' pd='2*int((nf+1)/2) * (W/nf + 0.29)' ps='2*int((nf+2)/2) * (W/nf + 0.29)' "
        "nrd='0.29 / W' nrs='0.29 / W' sa=0 sb=0 sd=0 mult=1 m=";
    const std::string sky_deck = "sky130 instance lines\n.option scale=1.0u\n" + sky + ".param W=3 nf=7\n"
                                 "XM1" + line + "1\nXM2" + line + "2\nXM3 d g 0 0 sky130_fd_pr__nfet_01v8 W=5 L=1 mult=2\n"
                                 "vd d 0 1\nvg g 0 0.9\n";
    const std::string gf_deck = "gf180 instance lines\n.include \"gf180/design.ngspice\"\n"
                                ".lib \"gf180/sm141064.ngspice\" typical\n.param sw_stat_mismatch=0\n"
                                "XG1 d g 0 0 nmos_3p3 w=10u l=1u nf=2 m=2 ad='w/nf*0.5u' pd='2*(w/nf+0.5u)'\n"
                                "vd d 0 1\nvg g 0 0.9\n";
    const std::vector<std::string> keys = {"w", "l", "nf", "m", "ad", "as", "pd", "ps", "nrd", "nrs"};
    Circuit both;
    for (const std::string& deck : {sky_deck, gf_deck}) {
        mirrorcheck::test::write_text(run.dir / "deck.cir", deck);
        Circuit c = mirrorcheck::read_circuit(run.dir / "deck.cir");
        std::vector<std::string> vectors;
        std::vector<const Device*> fets;
        for (const Device& d : c.devices())
            if (d.kind == mirrorcheck::DeviceKind::mosfet) fets.push_back(&d);
        REQUIRE(fets.size() == (deck.rfind("sky130", 0) == 0 ? 3u : 1u));
        for (const Device* d : fets)
            for (const auto& k : keys) vectors.push_back("@" + d->name + "[" + k + "]");
        auto values = printed(run.dir, deck, c, vectors);
        for (const Device* d : fets)
            for (const auto& k : keys) {
                CAPTURE(d->name);
                CAPTURE(k);
                auto it = values.find("@" + d->name + "[" + k + "]");
                REQUIRE(it != values.end());
                // after `op` ngspice shows 1 for an m nobody gave, 0 for the others
                CHECK(d->parameter(k).value_or(k == "m" ? 1 : 0) ==
                      doctest::Approx(it->second.at(0).real()).epsilon(1e-12));
            }
        for (const Device& d : c.devices()) both.add_device(d);
    }
    Circuit& c = both;
    CHECK(c.find_device("m.xm2.msky130_fd_pr__nfet_01v8")->parameter("m") == 2);
    CHECK(c.find_device("m.xg1.m0")->parameter("m").value_or(1) == 1);  // GF180 ignores m on its X line
}

TEST_CASE("ngspice: paths resolve as ngspice run in the deck's folder finds them") {
    mirrorcheck::test::NgspiceRun run;
    run.dir = mirrorcheck::test::make_temp_dir("mirrorcheck-netlist-ngspice");
    auto write = [&](const std::string& name, const std::string& text) {
        fs::create_directories((run.dir / name).parent_path());
        mirrorcheck::test::write_text(run.dir / name, text);
    };
    write("sub/a.inc", ".include b.inc\n.include c.inc\n.lib m.lib tt\n");
    write("sub/b.inc", "R1 1 0 1\n");
    write("b.inc", "R1 1 0 2\n");  // the deck's folder first
    write("sub/c.inc", "R2 1 0 3\n");
    write("m.lib", ".lib tt\nR3 1 0 4\n.endl\n");
    write("sub/m.lib", ".lib tt\nR3 1 0 5\n.endl\n");  // not beside the including file
    write("lib/self.lib", ".lib top\n.lib self.lib inner\n.endl\n.lib inner\nR4 1 0 6\n.endl\n");
    const std::string deck = "paths\n.include sub/a.inc\n.lib lib/self.lib top\nV1 1 0 1\n.end\nR5 1 0 7\n";
    write("deck.cir", deck);
    Circuit c = mirrorcheck::read_circuit(run.dir / "deck.cir");
    CHECK(check_resistors(c, printed(run.dir, deck, c)) == 5);  // R5 after `.end`: ngspice reads on
    CHECK(*c.find_device("r1")->value == 2);
    CHECK(*c.find_device("r3")->value == 4);
}
