// Unit tests of the netlist reader: lexing, numbers, expressions, elements, models,
// subcircuit flattening and naming, includes and libraries. Each test writes a small deck
// of its own into a temporary folder, reads it, and checks the flattened circuit.
#include <doctest/doctest.h>

#include <cstdlib>
#include <filesystem>
#include <string>

#include "parsers/netlist/netlist.hpp"
#include "src/model/circuit_build.hpp"
#include "src/report/circuit_dump.hpp"
#include "support/ngspice_run.hpp"

using mirrorcheck::Circuit;
using mirrorcheck::Device;
using mirrorcheck::DeviceKind;
using mirrorcheck::InputError;

namespace {

struct Decks {
    std::filesystem::path dir = mirrorcheck::test::make_temp_dir("mirrorcheck-netlist");
    ~Decks() {
        std::error_code ec;
        std::filesystem::remove_all(dir, ec);
    }
    std::filesystem::path write(const std::string& name, const std::string& text) const {
        auto path = dir / name;
        std::filesystem::create_directories(path.parent_path());
        mirrorcheck::test::write_text(path, text);
        return path;
    }
    Circuit read(const std::string& text, const std::string& name = "deck.cir") const {
        return mirrorcheck::read_circuit(write(name, text));
    }
    mirrorcheck::netlist::FlatNetlist flat(const std::string& text, const std::string& name = "deck.cir") const {
        return mirrorcheck::netlist::read_netlist(write(name, text));
    }
};

// "name: net net ... [model]" for every device, one a line: what ngspice's listing shows.
std::string connections(const Circuit& c) {
    std::string out;
    for (const Device& d : c.devices()) {
        out += d.name + ":";
        for (const auto& t : d.terminals) out += " " + t.net;
        if (d.model) out += " [" + d.model->ngspice_name + "]";
        out += "\n";
    }
    return out;
}

const Device& device(const Circuit& c, const std::string& name) {
    const Device* d = c.find_device(name);
    REQUIRE_MESSAGE(d != nullptr, "no device " << name << " in\n" << connections(c));
    return *d;
}

double param(const Device& d, const std::string& name) {
    auto v = d.parameter(name);
    REQUIRE_MESSAGE(v.has_value(), d.name << " has no parameter " << name);
    return *v;
}

}  // namespace

TEST_CASE("the first line is the title, even when it looks like an element") {
    Decks decks;
    Circuit c = decks.read("R1 a b 1k\nR2 a 0 2k\n.end\n");
    CHECK(c.title == "R1 a b 1k");
    CHECK(connections(c) == "r2: a 0\n");
}

TEST_CASE("comments, continuations, blank lines, CR LF and case give one circuit") {
    Decks decks;
    const std::string canonical = "title\nm1 out in 0 0 nch w=10u l=1u\nr1 out vdd 10k\n.model nch nmos level=1\n.end\n";
    const std::string spelled =
        "title\r\n"
        "* a comment line\r\n"
        "M1 OUT\r\n"
        "* a comment between continuations\r\n"
        "\r\n"
        "+ In 0 0 ; inline comment\r\n"
        "+ NCH W=10U L=1u $ another comment\r\n"
        "   R1 out VDD 10K\r\n"
        ".MODEL nch NMOS (LEVEL=1)\r\n"
        ".END\r\n";
    Circuit a = decks.read(canonical, "a.cir");
    Circuit b = decks.read(spelled, "b.cir");
    CHECK(connections(a) == connections(b));
    auto devices_without_source = [](const Circuit& c) {
        auto devices = mirrorcheck::report::circuit_to_json(c)["devices"];
        for (auto& d : devices) d.erase("source");
        return devices;
    };
    CHECK(devices_without_source(a) == devices_without_source(b));
    CHECK(param(device(b, "M1"), "w") == doctest::Approx(10e-6));
}

TEST_CASE("numbers take SPICE suffixes, exponents and unit tails") {
    Decks decks;
    Circuit c = decks.read(
        "numbers\n"
        "r1 a 0 1k\nr2 a 0 2.2MEG\nr3 a 0 4.7m\nr4 a 0 1e3\nr5 a 0 1kOhm\nc1 a 0 10uF\nc2 a 0 0.2pF\n"
        "c3 a 0 5f\nl1 a 0 3n\nr6 a 0 2mil\nr7 a 0 1T\nr8 a 0 3G\nv1 a 0 3.3V\nr9 a 0 1e-007\nr10 a 0 .5\n");
    CHECK(*device(c, "r1").value == doctest::Approx(1e3));
    CHECK(*device(c, "r2").value == doctest::Approx(2.2e6));
    CHECK(*device(c, "r3").value == doctest::Approx(4.7e-3));
    CHECK(*device(c, "r4").value == doctest::Approx(1e3));
    CHECK(*device(c, "r5").value == doctest::Approx(1e3));
    CHECK(*device(c, "c1").value == doctest::Approx(10e-6));
    CHECK(*device(c, "c2").value == doctest::Approx(0.2e-12));
    CHECK(*device(c, "c3").value == doctest::Approx(5e-15));
    CHECK(*device(c, "l1").value == doctest::Approx(3e-9));
    CHECK(*device(c, "r6").value == doctest::Approx(2 * 25.4e-6));
    CHECK(*device(c, "r7").value == doctest::Approx(1e12));
    CHECK(*device(c, "r8").value == doctest::Approx(3e9));
    CHECK(*device(c, "v1").value == doctest::Approx(3.3));
    CHECK(*device(c, "r9").value == doctest::Approx(1e-7));
    CHECK(*device(c, "r10").value == doctest::Approx(0.5));
}

TEST_CASE("expressions: operators, precedence, ternary and functions") {
    Decks decks;
    Circuit c = decks.read(
        "expressions\n"
        ".param a=2 b=3 c={a*b+1}\n"
        ".param p1 = '2**3' p2={2^3^2} p3={-2^2} p4={(a+b)*2} p5={a<b ? 10 : 20} p6={a>=b ? 10 : 20}\n"
        ".param p7={sqrt(16)+abs(-1)+min(3,4)+max(3,4)+pow(2,3)} p8={exp(0)+log(1)+log10(100)}\n"
        ".param p9={floor(2.7)+ceil(2.2)+int(-2.7)} p10={sin(0)+cos(0)+tan(0)+atan(0)}\n"
        ".param p11={a==2 && b!=2} p12={!(a==2) || 0} p13={1u*2meg} p14={10/4-1} p15={a<=2 ? (b>3 ? 1 : 2) : 3}\n"
        ".param p16=agauss(5,1,3) p17={-a-b} p18={2*-3}\n"
        "r1 n 0 {c}\nr2 n 0 'p1'\nr3 n 0 {p2}\nr4 n 0 {p3}\nr5 n 0 {p4}\nr6 n 0 {p5}\nr7 n 0 {p6}\n"
        "r8 n 0 {p7}\nr9 n 0 {p8}\nr10 n 0 {p9}\nr11 n 0 {p10}\nr12 n 0 {p11}\nr13 n 0 {p12}\nr14 n 0 {p13}\n"
        "r15 n 0 {p14}\nr16 n 0 {p15}\nr17 n 0 {p16}\nr18 n 0 {p17}\nr19 n 0 {p18}\n");
    auto value = [&](const char* name) { return *device(c, name).value; };
    CHECK(value("r1") == 7);
    CHECK(value("r2") == 8);
    CHECK(value("r3") == 512);
    CHECK(value("r4") == -4);
    CHECK(value("r5") == 10);
    CHECK(value("r6") == 10);
    CHECK(value("r7") == 20);
    CHECK(value("r8") == doctest::Approx(4 + 1 + 3 + 4 + 8));
    CHECK(value("r9") == doctest::Approx(1 + 0 + 2));
    CHECK(value("r10") == doctest::Approx(2 + 3 - 2));
    CHECK(value("r11") == doctest::Approx(1));
    CHECK(value("r12") == 1);
    CHECK(value("r13") == 0);
    CHECK(value("r14") == doctest::Approx(2));
    CHECK(value("r15") == doctest::Approx(1.5));
    CHECK(value("r16") == 2);
    CHECK(value("r17") == 5);
    CHECK(value("r18") == -5);
    CHECK(value("r19") == -6);
}

TEST_CASE("long flat expressions are not mistaken for deep ones") {
    Decks decks;
    std::string sum = "1";
    for (int i = 0; i < 1000; ++i) sum += i % 2 ? "+1" : "-1+2";
    Circuit c = decks.read("long\nR1 a 0 {" + sum + "}\n");
    CHECK(*device(c, "r1").value == 1 + 500 * 1 + 500 * 1);
}

TEST_CASE("parameters: redefinition wins, forward references resolve") {
    Decks decks;
    Circuit c = decks.read("params\n.param x=1\nr1 a 0 {x*y}\n.param x=2\n.param y={z+1}\n.param z=4\n");
    CHECK(*device(c, "r1").value == 10);
}

TEST_CASE("every element kind is read with its nets and values") {
    Decks decks;
    Circuit c = decks.read(
        "elements\n"
        "R1 a b 1k\nC1 b 0 1p\nL1 a c 1u\nL2 c 0 2u\nK1 L1 L2 0.5\n"
        "V1 a 0 DC 1.8 AC 1 90\nI1 0 b dc {2*5u}\nV2 d 0 pulse(0 1.8 1n 1n 1n 10n 20n)\nV3 e 0 sin(0 1 1k) ac 0.5\n"
        "E1 f 0 a b 2\nG1 g 0 a b 1m\nF1 h 0 V1 3\nH1 i 0 V1 4\nB1 j 0 V=v(a)*2+1\n"
        "E2 k 0 value={v(a)*3}\nE3 l 0 poly(2) a 0 b 0 0 1 1\n"
        "D1 a b dmod 2\nQ1 c b e qmod\nQ2 c b e sub qmod 3\nJ1 d g s jmod\nM1 d g s bb nch w=1u l=2u m=2 nf=2 ad=1p\n"
        "S1 a b c d swmod\nW1 a b V1 cswmod\nT1 a 0 b 0 z0=50 td=1n\n"
        ".model dmod d\n.model qmod npn\n.model jmod njf\n.model nch nmos level=1 vto=0.7\n.model swmod sw\n"
        ".model cswmod csw\n.end\n");
    CHECK(connections(c) ==
          "r1: a b\nc1: b 0\nl1: a c\nl2: c 0\nk1:\nv1: a 0\ni1: 0 b\nv2: d 0\nv3: e 0\n"
          "e1: f 0 a b\ng1: g 0 a b\nf1: h 0\nh1: i 0\nb1: j 0\ne2: k 0\ne3: l 0 a 0 b 0\n"
          "d1: a b [dmod]\nq1: c b e [qmod]\nq2: c b e sub [qmod]\nj1: d g s [jmod]\nm1: d g s bb [nch]\n"
          "s1: a b c d [swmod]\nw1: a b [cswmod]\nt1: a 0 b 0\n");
    CHECK(device(c, "k1").text.at("inductor1") == "l1");
    CHECK(*device(c, "k1").value == 0.5);
    const Device& v1 = device(c, "v1");
    CHECK(*v1.value == doctest::Approx(1.8));
    CHECK(param(v1, "acmag") == 1);
    CHECK(param(v1, "acphase") == 90);
    CHECK(*device(c, "i1").value == doctest::Approx(10e-6));
    CHECK(device(c, "v2").text.at("transient") == "pulse(0 1.8 1n 1n 1n 10n 20n)");
    CHECK(param(device(c, "v3"), "acmag") == 0.5);
    CHECK(*device(c, "e1").value == 2);
    CHECK(device(c, "f1").text.at("control") == "v1");
    CHECK(device(c, "b1").text.at("expression") == "V=v(a)*2+1");
    CHECK(device(c, "b1").kind == DeviceKind::behavioural);
    CHECK(param(device(c, "d1"), "area") == 2);
    CHECK(param(device(c, "q2"), "area") == 3);
    CHECK(device(c, "q2").terminal("s")->net == "sub");
    const Device& m1 = device(c, "m1");
    CHECK(m1.kind == DeviceKind::mosfet);
    CHECK(m1.terminal("b")->net == "bb");
    CHECK(param(m1, "w") == doctest::Approx(1e-6));
    CHECK(param(m1, "l") == doctest::Approx(2e-6));
    CHECK(param(m1, "m") == 2);
    CHECK(param(m1, "nf") == 2);
    CHECK(param(m1, "ad") == doctest::Approx(1e-12));
    CHECK(m1.model->type == "nmos");
    CHECK(m1.model->level == 1);
    CHECK(m1.model->parameters.at("vto") == doctest::Approx(0.7));
    CHECK(c.find_net("a")->terminals.size() == 10);
}

TEST_CASE("subcircuits flatten with ngspice's names for devices of every kind and for nets") {
    Decks decks;
    Circuit c = decks.read(
        "hierarchy\n"
        ".global vdd\n"
        ".subckt cell in out\n"
        "R1 in mid 1k\nC1 mid gnd 1p\nM1 out mid 0 0 nch w=1u l=1u\nQ1 out mid vdd qmod\nD1 mid out dmod\n"
        "V1 x 0 0\nF1 out 0 V1 2\nE1 out 0 mid 0 1\nL1 a 0 1u\nL2 b 0 1u\nK1 L1 L2 0.1\n"
        ".ends cell\n"
        ".subckt pair p q\nX1 p m cell\nX2 m q cell\nR9 p vdd 1\n.ends\n"
        "Xtop n1 n2 pair\nXsolo n2 n3 cell\nVdd vdd 0 1.8\n"
        ".model nch nmos level=1\n.model qmod npn\n.model dmod d\n");
    const Device& r = device(c, "r.xtop.x1.r1");
    CHECK(r.terminals[0].net == "n1");
    CHECK(r.terminals[1].net == "xtop.x1.mid");
    CHECK(r.instance_path() == "xtop.x1.r1");
    CHECK(r.designer_instance() == "xtop");
    REQUIRE(r.hierarchy.size() == 2);
    CHECK(r.hierarchy[0].subckt == "pair");
    CHECK(r.hierarchy[1].subckt == "cell");
    CHECK(device(c, "c.xtop.x2.c1").terminals[1].net == "0");
    CHECK(device(c, "m.xtop.x2.m1").terminals[0].net == "n2");
    CHECK(device(c, "m.xtop.x1.m1").terminals[0].net == "xtop.m");
    CHECK(device(c, "q.xsolo.q1").terminals[2].net == "vdd");
    CHECK(device(c, "d.xsolo.d1").terminals[1].net == "n3");
    CHECK(device(c, "f.xsolo.f1").text.at("control") == "v.xsolo.v1");
    CHECK(device(c, "k.xsolo.k1").text.at("inductor2") == "l.xsolo.l2");
    CHECK(device(c, "r.xtop.r9").terminals[1].net == "vdd");
    CHECK(c.find_device("R.XTOP.X1.R1") == &r);
    CHECK(c.devices().size() == 3 * 11 + 2);
}

TEST_CASE("subcircuit parameters: defaults, X-line overrides, params:, body .param, m") {
    Decks decks;
    Circuit c = decks.read(
        "subckt parameters\n"
        ".param wglobal=4u\n"
        ".subckt fet d g s b w=1u l={2*lmin} params: lmin=0.5u\n"
        ".param area={w*l}\n"
        "M0 d g s b nch w={w} l={l} ad={area}\n"
        ".ends\n"
        ".subckt wrap d g s\n.param w=3u l=1u\nM1 d g s s nch w=w l=l\n.ends\n"
        "X1 a b 0 0 fet\n"
        "X2 a b 0 0 fet w=2u lmin=1u\n"
        "X3 a b 0 0 fet params: w={wglobal}\n"
        "X4 a b 0 wrap w=5u m=3\n"
        "X5 a b 0 wrap\n"
        ".model nch nmos\n");
    const Device& m1 = device(c, "m.x1.m0");
    CHECK(param(m1, "w") == doctest::Approx(1e-6));
    CHECK(param(m1, "l") == doctest::Approx(1e-6));
    CHECK(param(m1, "ad") == doctest::Approx(1e-12));
    const Device& m2 = device(c, "m.x2.m0");
    CHECK(param(m2, "w") == doctest::Approx(2e-6));
    CHECK(param(m2, "l") == doctest::Approx(2e-6));
    CHECK(param(device(c, "m.x3.m0"), "w") == doctest::Approx(4e-6));
    const Device& m4 = device(c, "m.x4.m1");
    CHECK(param(m4, "w") == doctest::Approx(5e-6));
    CHECK(param(m4, "m") == 3);
    CHECK(param(device(c, "m.x5.m1"), "w") == doctest::Approx(3e-6));
    CHECK(param(device(c, "m.x5.m1"), "m") == 1);
}

TEST_CASE("the X-line multiplier replaces the devices' own m, as in ngspice 39") {
    Decks decks;
    Circuit c = decks.read(
        "multiplier\n"
        ".subckt plain d g s\nM1 d g s s nch m=2\nR1 d s 1k\nV1 d s 0\n.ends\n"
        ".subckt outer d g s\nX1 d g s plain m=5\n.ends\n"
        ".subckt declares d g s m=1\nM1 d g s s nch m=2\n.ends\n"
        "X4 d g 0 plain\nX5 d g 0 outer m=3\nX6 d g 0 outer\nX7 d g 0 declares m=4\nM9 d g 0 0 nch m=7\n"
        ".model nch nmos\n");
    CHECK(param(device(c, "m.x4.m1"), "m") == 1);
    CHECK(param(device(c, "r.x4.r1"), "m") == 1);
    CHECK_FALSE(device(c, "v.x4.v1").parameter("m").has_value());
    CHECK(param(device(c, "m.x5.x1.m1"), "m") == 3);
    CHECK(param(device(c, "m.x6.x1.m1"), "m") == 1);
    CHECK(param(device(c, "m.x7.m1"), "m") == 2);
    CHECK(param(device(c, "m9"), "m") == 7);
}

TEST_CASE("subcircuit-local models are named after their instance; local shadows global") {
    Decks decks;
    Circuit c = decks.read(
        "local models\n"
        ".subckt cell d g s\n.model nch nmos level=2\nM1 d g s s nch\n.ends\n"
        "X1 a b 0 cell\nM2 a b 0 0 nch\n.model nch nmos level=1\n");
    CHECK(device(c, "m.x1.m1").model->ngspice_name == "x1:nch");
    CHECK(device(c, "m.x1.m1").model->level == 2);
    CHECK(device(c, "m2").model->ngspice_name == "nch");
    CHECK(device(c, "m2").model->level == 1);
}

TEST_CASE("binned models are chosen from l and w, with .option scale") {
    Decks decks;
    const std::string models =
        ".model nch.1 nmos level=1 lmin=0.1u lmax=1u wmin=0.1u wmax=10u vto=0.1\n"
        ".model nch.2 nmos level=1 lmin=1u lmax=10u wmin=0.1u wmax=10u vto=0.2\n"
        ".model nch.3 nmos (level=1 lmin=0.1u lmax=10u wmin=10u wmax=100u vto=0.3)\n";
    Circuit c = decks.read("bins\nM1 a b 0 0 nch w=1u l=0.5u\nM2 a b 0 0 nch w=1u l=2u\nM3 a b 0 0 nch w=20u l=1u\n"
                           "M4 a b 0 0 nch w=1u l=1u\nM5 a b 0 0 nch w=1u l=10u\nM6 a b 0 0 nch w=1u l=1.0009u\n"
                           "M7 a b 0 0 nch w=1u l=1.0011u\n" + models, "a.cir");
    CHECK(device(c, "m1").model->ngspice_name == "nch.1");
    CHECK(device(c, "m2").model->ngspice_name == "nch.2");
    CHECK(device(c, "m3").model->ngspice_name == "nch.3");
    CHECK(device(c, "m3").model->parameters.at("vto") == doctest::Approx(0.3));
    // ngspice 39: closed intervals widened by 1 nm, the first bin in definition order wins.
    CHECK(device(c, "m4").model->ngspice_name == "nch.1");
    CHECK(device(c, "m5").model->ngspice_name == "nch.2");
    CHECK(device(c, "m6").model->ngspice_name == "nch.1");
    CHECK(device(c, "m7").model->ngspice_name == "nch.2");
    Circuit s = decks.read("scaled\n.option scale=1e-6\nM1 a b 0 0 nch w=1 l=2 as=2\n" + models, "b.cir");
    CHECK(device(s, "m1").model->ngspice_name == "nch.2");
    CHECK(param(device(s, "m1"), "l") == doctest::Approx(2e-6));
    CHECK(param(device(s, "m1"), "as") == doctest::Approx(2e-12));
}

TEST_CASE("a transistor wrapped in a subcircuit keeps the designer's instance") {
    Decks decks;
    Circuit c = decks.read(
        "wrapped\n"
        ".subckt nfet_wrap d g s b l=1 w=1 mult=1\n"
        "Rd d di 10\n"
        "mnfet di g s b nfet_model l={l} w={w}\n"
        ".model nfet_model.0 nmos level=54 lmin={0.1u} lmax=1e-5 wmin=1e-7 wmax={1e-4*mult}\n"
        ".ends\n"
        "XM1 out in 0 0 nfet_wrap w=2u l=1u\n");
    const Device& m = device(c, "m.xm1.mnfet");
    CHECK(m.designer_instance() == "xm1");
    CHECK(m.model->ngspice_name == "xm1:nfet_model.0");
    CHECK(m.model->level == 54);
    CHECK(m.terminals[0].net == "xm1.di");
    CHECK(m.hierarchy.at(0).source.line == 7);
    CHECK(m.source.line == 4);
}

TEST_CASE(".include and .lib sections, relative to the including file") {
    Decks decks;
    decks.write("models/corners.lib",
                "* corner library\n"
                ".lib tt\n.param vt=0.5\n.lib 'corners.lib' common\n.endl tt\n"
                ".lib ff\n.param vt=0.3\n.lib 'corners.lib' common\n.endl\n"
                ".LIB common\n.model nch nmos level=1 vto={vt}\n.ENDL common\n");
    decks.write("cells/inv.sp", ".subckt inv a y\nM1 y a 0 0 nch\n.ends\n");
    Circuit c = decks.read("includes\n.include \"cells/inv.sp\"\n.lib 'models/corners.lib' ff\nX1 in out inv\n");
    CHECK(device(c, "m.x1.m1").model->parameters.at("vto") == doctest::Approx(0.3));
    CHECK(device(c, "m.x1.m1").source.file == (decks.dir / "cells/inv.sp").string());
}

TEST_CASE("paths resolve as ngspice run in the deck's folder: ./ first, a .lib inside an include from the deck's folder") {
    Decks decks;
    // sub/a.inc includes b.inc: the deck's folder has one too, and ngspice takes it first.
    decks.write("sub/a.inc", ".include b.inc\n.include c.inc\n.lib m.lib tt\n");
    decks.write("sub/b.inc", "R1 1 0 1\n");
    decks.write("b.inc", "R1 1 0 2\n");
    decks.write("sub/c.inc", "R2 1 0 3\n");
    // a .lib inside an included file: from the deck's folder, not from the include's
    decks.write("m.lib", ".lib tt\nR3 1 0 4\n.endl\n");
    decks.write("sub/m.lib", ".lib tt\nR3 1 0 5\n.endl\n");
    // a library naming itself resolves beside itself
    decks.write("lib/self.lib", ".lib top\n.lib self.lib inner\n.endl\n.lib inner\nR4 1 0 6\n.endl\n");
    auto flat = decks.flat("paths\n.include sub/a.inc\n.lib lib/self.lib top\nV1 1 0 1\n");
    Circuit c = mirrorcheck::build_circuit(flat);
    CHECK(*device(c, "r1").value == 2);
    CHECK(*device(c, "r2").value == 3);
    CHECK(*device(c, "r3").value == 4);
    CHECK(*device(c, "r4").value == 6);
    namespace nl = mirrorcheck::netlist;
    REQUIRE(flat.references.size() == 6);
    auto ref = [&](std::size_t k) { return flat.references[k]; };
    CHECK(ref(0).written == "sub/a.inc");
    CHECK(ref(0).resolved == decks.dir / "sub/a.inc");
    CHECK(ref(0).where.line == 2);
    CHECK(ref(0).column == 10);
    CHECK(ref(0).length == 9);
    CHECK(ref(1).resolved == decks.dir / "b.inc");
    CHECK(ref(1).via_working_folder);       // found in the deck's folder, not beside sub/a.inc
    CHECK(ref(2).resolved == decks.dir / "sub/c.inc");
    CHECK_FALSE(ref(2).via_working_folder);  // beside its includer
    CHECK(ref(3).resolved == decks.dir / "m.lib");
    CHECK(ref(3).library);
    CHECK(ref(3).via_working_folder);
    CHECK(ref(4).resolved == decks.dir / "lib/self.lib");
    CHECK(ref(5).resolved == decks.dir / "lib/self.lib");
    CHECK_FALSE(ref(5).via_working_folder);  // inside a library: beside the library
    REQUIRE(flat.files.size() == 6);
    CHECK(flat.files[0].role == nl::ReadFile::Role::top);
    CHECK(flat.files[1].path == decks.dir / "sub/a.inc");
    CHECK(flat.files[1].role == nl::ReadFile::Role::included);
    CHECK(flat.files[4].role == nl::ReadFile::Role::library);
}

TEST_CASE("statements that describe no circuit are recorded with their lines; .end does not stop the reading") {
    Decks decks;
    decks.write("inc.cir", "R9 1 0 1k\n.control\necho inside\n.endc\n.TRAN 1n 10n\n");
    auto flat = decks.flat(
        "cards\nV1 1 0 1\n.include inc.cir\n.op\n.Ac dec 10 1 1g\n.tran 1n\n+ 1u\n.save v(1)\n.probe i(v1)\n"
        ".meas tran t1 find v(1) at=1n\n.four 1k v(1)\n.print dc v(1)\n.temp 50\n.options gmin=1e-12\n"
        ".control\nop\n* a comment\nquit 0\n.endc\n.end\nR2 1 0 2k\n");
    using Kind = mirrorcheck::netlist::Card::Kind;
    std::vector<std::string> seen;
    for (const auto& card : flat.cards) {
        std::string kind = card.kind == Kind::control_block ? "control"
                           : card.kind == Kind::analysis    ? "analysis"
                           : card.kind == Kind::output      ? "output"
                                                            : "end";
        seen.push_back(std::filesystem::path(card.first.file).filename().string() + ":" + std::to_string(card.first.line) +
                       "-" + std::to_string(card.last_line) + " " + kind + " " + card.keyword);
    }
    CHECK(seen == std::vector<std::string>{"inc.cir:2-4 control .control", "inc.cir:5-5 analysis .tran",
                                           "deck.cir:4-4 analysis .op", "deck.cir:5-5 analysis .ac",
                                           "deck.cir:6-7 analysis .tran", "deck.cir:8-8 output .save",
                                           "deck.cir:9-9 output .probe", "deck.cir:10-10 output .meas",
                                           "deck.cir:11-11 output .four", "deck.cir:12-12 output .print",
                                           "deck.cir:15-19 control .control", "deck.cir:20-20 end .end"});
    CHECK(flat.cards[4].text == ".tran 1n  1u");  // the continuation joined to its line
    // ngspice 39 reads on after `.end` (checked: a resistor after it carries current)
    Circuit c = mirrorcheck::build_circuit(flat);
    CHECK(c.find_device("r2") != nullptr);
    CHECK(c.find_device("r9") != nullptr);
    CHECK(c.control_blocks.size() == 2);
}

TEST_CASE("an X line's expressions see its own parameters, the subcircuit's defaults, then the caller's") {
    Decks decks;
    Circuit c = decks.read(
        "instance scope\n.param g=100 p=7 k=50\n"
        ".subckt s a b p=1 q=1 r=5\n.param t=4\nR1 a b {p}\nR2 a b {q}\nR3 a b {r}\n.ends\n"
        ".subckt s2 a b q=1 p=1\nR1 a b {p}\nR2 a b {q}\n.ends\n"
        ".subckt outer a b k=3 p=9\nXI a b s q='k*2' r='p'\n.ends\n"
        "XA 1 0 s p=2 q='p*3'\nXB 1 0 s q='p*3' p=2\nXC 1 0 s q='r*3'\nXD 1 0 s q='g*3'\nXE 1 0 s q='p*3'\n"
        "XF 1 0 s q='t*2'\nXG 1 0 s p='p*2'\nXH 1 0 s2 q='p*3' p=2\nXO 1 0 outer\nXZ 1 0 s zz=3\n");
    auto r = [&](const char* name) { return *device(c, name).value; };
    // the values ngspice 39 prints for the same deck (test_netlist_ngspice checks them live)
    CHECK(r("r.xa.r2") == 6);
    CHECK(r("r.xb.r2") == 6);   // the line's numbers are assigned first, whatever their order
    CHECK(r("r.xc.r2") == 15);  // a default not on the line
    CHECK(r("r.xd.r2") == 300); // the caller's .param
    CHECK(r("r.xe.r2") == 3);   // the subcircuit's own p shadows the caller's
    CHECK(r("r.xf.r2") == 8);   // a body .param is a formal parameter too
    CHECK(r("r.xg.r1") == 14);  // p='p*2' reads the caller's p: the instance's is not yet assigned
    CHECK(r("r.xh.r2") == 6);
    CHECK(r("r.xo.xi.r2") == 6);  // the calling instance's k
    CHECK(r("r.xo.xi.r3") == 1);  // the called subcircuit's own p, not the caller's
    CHECK(r("r.xz.r1") == 1);     // a name that is no formal parameter is dropped
}

TEST_CASE("a schematic tool's PDK instance line: W/nf and int((nf+1)/2) from the line itself") {
    Decks decks;
    // The shape of sky130's nfet_01v8 wrapper: formal parameters as body .params, one device.
    Circuit c = decks.read(
        "pdk instance\n.option scale=1.0u\n.param W=3\n"
        ".subckt nfet d g s b\n+\n.param l=1 w=1 ad=0 as=0 pd=0 ps=0 nrd=0 nrs=0 sa=0 sb=0 sd=0 mult=1 nf=1.0\n"
        "mfet d g s b nch l={l} w={w} ad={ad} as={as} pd={pd} ps={ps} nrd={nrd} nrs={nrs} sa={sa} sb={sb} sd={sd} nf={nf}\n"
        ".model nch nmos level=1\n.ends\n"
        "XM1 d g 0 0 nfet L=1 W=10 nf=2 ad='int((nf+1)/2) * W/nf * 0.29' as='int((nf+2)/2) * W/nf * 0.29'\n"
        "+ pd='2*int((nf+1)/2) * (W/nf + 0.29)' ps='2*int((nf+2)/2) * (W/nf + 0.29)' nrd='0.29 / W' nrs='0.29 / W'\n"
        "+ sa=0 sb=0 sd=0 mult=1 m=2\n");
    const Device& m = device(c, "m.xm1.mfet");
    // ngspice 39 on sky130's own wrapper: ad 1.45e-12, as 2.9e-12, pd 1.058e-05, nrd 0.029
    CHECK(param(m, "w") == doctest::Approx(10e-6));
    CHECK(param(m, "nf") == 2);
    CHECK(param(m, "ad") == doctest::Approx(1.45e-12));
    CHECK(param(m, "as") == doctest::Approx(2.9e-12));
    CHECK(param(m, "pd") == doctest::Approx(10.58e-6));
    CHECK(param(m, "ps") == doctest::Approx(21.16e-6));
    CHECK(param(m, "nrd") == doctest::Approx(0.029));
    CHECK(param(m, "m") == 2);
}

TEST_CASE("the reader's result is plain data; the Circuit shares each model among its devices") {
    Decks decks;
    auto flat = decks.flat("plain\nM1 d g 0 0 nch w=1u l=1u\nM2 d g 0 0 nch w=2u l=1u\n.model nch nmos level=1\n");
    REQUIRE(flat.devices.size() == 2);
    REQUIRE(flat.models.size() == 1);
    CHECK(flat.devices[0].model == std::optional<std::size_t>(0));
    CHECK(flat.devices[1].model == std::optional<std::size_t>(0));
    CHECK(flat.devices[1].kind == mirrorcheck::netlist::ElementKind::mosfet);
    Circuit c = mirrorcheck::build_circuit(flat);
    CHECK(device(c, "m1").model == device(c, "m2").model);
    CHECK(device(c, "m1").model->name == "nch");
    CHECK(c.find_net("d")->terminals.size() == 2);
}

TEST_CASE(".control blocks are kept as text and not read as elements") {
    Decks decks;
    Circuit c = decks.read("control\nR1 a 0 1k\n.control\nop\nlet x = 1\nshow all\n.endc\n.end\n");
    CHECK(c.devices().size() == 1);
    REQUIRE(c.control_blocks.size() == 1);
    CHECK(c.control_blocks[0] == "op\nlet x = 1\nshow all\n");
}

TEST_CASE("the table and JSON dumps show nets, models and units") {
    Decks decks;
    Circuit c = decks.read("dump\nM1 d g 0 0 nch w=10u l=1u m=2\nR1 d vdd 24.5meg\n.model nch nmos level=1\n");
    std::string table = mirrorcheck::report::write_circuit_table(c);
    CHECK(table.find("d=d g=g s=0 b=0") != std::string::npos);
    CHECK(table.find("w=10 µm") != std::string::npos);
    CHECK(table.find("24.5 MΩ") != std::string::npos);
    CHECK(table.find("nch (nmos level 1)") != std::string::npos);
    CHECK(table.find("2 devices, 4 nets") != std::string::npos);
    auto json = mirrorcheck::report::circuit_to_json(c);
    CHECK(json["schema"] == "mirrorcheck-circuit/1");
    CHECK(json["devices"][0]["parameters"]["w"] == doctest::Approx(10e-6));
    CHECK(json["models"]["nch"]["type"] == "nmos");
    CHECK(json["nets"].size() == 4);
}

TEST_CASE(".if / .elseif / .else / .endif choose lines by the global parameters") {
    Decks decks;
    Circuit c = decks.read(
        "conditionals\n.param select=3 inner=2\nV1 1 0 1\n"
        ".if (select == 1)\nR1 1 0 1\n.elseif (select == 3)\n"
        "  .if (inner = 1)\n  R1 1 0 100\n  .elseif (inner = 2)\n  R1 1 0 200\n  .else\n  R1 1 0 300\n  .endif\n"
        ".else\nR1 1 0 10000\n.endif\n"
        ".if (select > 5)\n.subckt never a\nR9 a 0 1\n.ends\nX9 1 never\n.endif\n");
    CHECK(c.devices().size() == 2);
    CHECK(*device(c, "r1").value == 200);
}

TEST_CASE(".func, string parameters and nonlinear values") {
    Decks decks;
    Circuit c = decks.read(
        "functions\n.func sq(x) {x*x}\n.func hyp(a, b) = 'sqrt(sq(a)+sq(b))'\n.param table=\"0110\" both=table{table}\n"
        ".subckt cell a b gain=2\n.func twice(y) {gain*y}\nR1 a b {twice(hyp(3,4))}\n.ends\n"
        "X1 n 0 cell\nR2 n 0 {sq(3)}\nR3 n 0 r={v(n)*1k}\nC1 n 0 {1p}\n"
        ".model lut d_lut table_values=both\nA1 [ n m ] out lut\n");
    CHECK(*device(c, "r.x1.r1").value == doctest::Approx(10));
    CHECK(*device(c, "r2").value == 9);
    CHECK_FALSE(device(c, "r3").value.has_value());
    CHECK(device(c, "r3").text.at("expression") == "v(n)*1k");
    const Device& a = device(c, "a1");
    CHECK(a.kind == DeviceKind::other);
    REQUIRE(a.terminals.size() == 3);
    CHECK(a.terminals[2].net == "out");
    CHECK(a.model->text.at("table_values") == "01100110");
}

TEST_CASE("temper follows .temp; version strings are kept as text") {
    Decks decks;
    Circuit c = decks.read("temperature\n.temp 85\nR1 a 0 {1k*(1+0.001*(temper-27))}\nM1 a a 0 0 b4\n"
                           ".model b4 nmos level=54 version=4.8.2\n");
    CHECK(*device(c, "r1").value == doctest::Approx(1058));
    CHECK(device(c, "m1").model->text.at("version") == "4.8.2");
    CHECK(device(c, "m1").model->version.value() == doctest::Approx(4.8));
}

TEST_CASE("a subcircuit defined inside another gives its devices two prefixes, as in ngspice") {
    Decks decks;
    Circuit c = decks.read(
        "nested definitions\n"
        ".subckt outer a b\n.subckt inner p q\n.model my r r=8k\nR1 p mid 1k\nR2 mid q my\n.ends\n"
        "X1 a b inner\nR3 a b 2k\n.ends\n"
        "Xo n 0 outer\n");
    const Device& r1 = device(c, "r.xo.r.x1.r1");
    CHECK(r1.terminals[1].net == "xo.x1.mid");
    CHECK(r1.instance_path() == "xo.x1.r1");
    CHECK(device(c, "r.xo.r.x1.r2").model->ngspice_name == "xo:x1:my");
    CHECK(device(c, "r.xo.r3").terminals[0].net == "n");
}

// Golden: `peek` on tests/data/netlist/cascode_mirror.cir. After a deliberate change, accept
// the new output with `MIRRORCHECK_ACCEPT=1 ctest -R test_netlist$`.
TEST_CASE("the table dump of a small cascode mirror matches its golden file") {
    const std::filesystem::path data = std::filesystem::path(MIRRORCHECK_TEST_DATA) / "netlist";
    Circuit c = mirrorcheck::read_circuit(data / "cascode_mirror.cir");
    std::string table = mirrorcheck::report::write_circuit_table(c);
    for (auto at = table.find(data.string() + "/"); at != std::string::npos; at = table.find(data.string() + "/"))
        table.erase(at, data.string().size() + 1);
    const auto golden = data / "cascode_mirror.table.txt";
    if (std::getenv("MIRRORCHECK_ACCEPT")) mirrorcheck::test::write_text(golden, table);
    CHECK(table == mirrorcheck::test::read_text(golden));
}

TEST_CASE("Circuit: nets collect their terminals, lookups ignore case, a taken name is not added") {
    Circuit c;
    Device r;
    r.kind = DeviceKind::resistor;
    r.name = r.local_name = "r1";
    r.terminals = {{"pos", "a"}, {"neg", "0"}};
    Device again = r;
    again.terminals = {{"pos", "b"}, {"neg", "0"}};
    CHECK(c.add_device(r) == 0);
    CHECK_FALSE(c.try_add_device(again));
    CHECK(c.add_device(again) == 0);
    CHECK(c.devices().size() == 1);
    CHECK(c.find_device("R1") == &c.devices()[0]);
    CHECK(c.find_net("b") == nullptr);
    REQUIRE(c.find_net("0") != nullptr);
    CHECK(c.find_net("0")->terminals.size() == 1);
    CHECK(c.find_net("0")->terminals[0].terminal == 1);
}
