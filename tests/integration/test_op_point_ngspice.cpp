// The operating point in mirrorcheck's sign convention (src/model/op_point.hpp), checked
// against ngspice itself: each transistor of every kind (MOS level 1, BSIM3, BSIM4; NMOS
// and PMOS; NPN and PNP) is biased by sources and has a 0 V ammeter in its drain or
// collector, so its terminal voltages and current are known independently of what the
// model reports. The op read from the raw file must equal the one read from the `show`
// listing, and an m=2 instance must report twice the current and conductances of its m=1
// twin at the same bias (ngspice includes the multiplier in what it reports).
#include <cmath>
#include <string>

#include <doctest/doctest.h>

#include "parsers/listing/listing.hpp"
#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/model/op_point_build.hpp"
#include "support/ngspice_run.hpp"

using namespace mirrorcheck;

namespace {

// Every transistor: name, polarity, its ammeter, and its terminal nets.
const char* deck = R"(* op-point sign conventions
.model n1 nmos level=1 vto=0.6 kp=150u lambda=0.05 gamma=0.5 phi=0.7
.model p1 pmos level=1 vto=-0.7 kp=60u lambda=0.06 gamma=0.4 phi=0.7
.model n3 nmos level=8 version=3.3.0
.model p3 pmos level=8 version=3.3.0
.model n4 nmos level=14 version=4.8.0
.model p4 pmos level=14 version=4.8.0
.model qn npn is=1e-16 bf=100 vaf=50
.model qp pnp is=1e-16 bf=50 vaf=30
vdd vdd 0 3
vgn gn 0 1.1
vgp gp 0 1.8
vbn bn 0 -0.3
vbp bp 0 3.2
* NMOS: drain through an ammeter to 2.0 V, source at ground, bulk reverse biased
vdn dn 0 2.0
vam1 dn d1 0
mn1 d1 gn 0 bn n1 w=4u l=1u
vam2 dn d2 0
mn2 d2 gn 0 bn n1 w=4u l=1u m=2
vam3 dn d3 0
mn3 d3 gn 0 bn n3 w=4u l=0.5u
vam4 dn d4 0
mn4 d4 gn 0 bn n4 w=2u l=0.2u
* PMOS: source at vdd, drain through an ammeter to 0.8 V
vdp dp 0 0.8
vam5 d5 dp 0
mp5 d5 gp vdd bp p1 w=8u l=1u
vam6 d6 dp 0
mp6 d6 gp vdd bp p1 w=8u l=1u m=2
vam7 d7 dp 0
mp7 d7 gp vdd bp p3 w=8u l=0.5u
vam8 d8 dp 0
mp8 d8 gp vdd bp p4 w=4u l=0.2u
* bipolar: base driven, collector through an ammeter
vbq bq 0 0.68
vcq cq 0 2.0
vam9 cq c9 0
q9 c9 bq 0 qn
vbqp bqp 0 2.32
vcqp cqp 0 1.0
vam10 c10 cqp 0
q10 c10 bqp vdd qp
)";

struct Expect {
    const char* device;
    bool p_type;
    const char* ammeter;  // i(ammeter) is the drain/collector current in device polarity
    const char* d;        // drain or collector net
    const char* g;        // gate or base net
    const char* s;        // source or emitter net
    const char* b;        // bulk net, or "" for bipolar
};

const Expect devices[] = {
    {"mn1", false, "vam1", "d1", "gn", "0", "bn"},   {"mn2", false, "vam2", "d2", "gn", "0", "bn"},
    {"mn3", false, "vam3", "d3", "gn", "0", "bn"},   {"mn4", false, "vam4", "d4", "gn", "0", "bn"},
    {"mp5", true, "vam5", "d5", "gp", "vdd", "bp"},  {"mp6", true, "vam6", "d6", "gp", "vdd", "bp"},
    {"mp7", true, "vam7", "d7", "gp", "vdd", "bp"},  {"mp8", true, "vam8", "d8", "gp", "vdd", "bp"},
    {"q9", false, "vam9", "c9", "bq", "0", ""},      {"q10", true, "vam10", "c10", "bqp", "vdd", ""},
};

std::string save_line() {
    std::string s = "save all";
    for (const auto& e : devices) {
        bool mos = e.device[0] == 'm';
        const char* mos_params[] = {"id", "vgs", "vds", "vbs", "vth", "von", "vdsat", "gm", "gds", "gmbs"};
        const char* bjt_params[] = {"ic", "ib", "vbe", "vbc", "gm", "gpi", "gmu", "go"};
        if (mos)
            for (const char* p : mos_params) s += std::string(" @") + e.device + "[" + p + "]";
        else
            for (const char* p : bjt_params) s += std::string(" @") + e.device + "[" + p + "]";
    }
    return s;
}

struct Fixture {
    test::NgspiceRun run;
    Circuit circuit;
    raw::RawFile raw;
    OpPoint from_raw, from_listing;

    Fixture() {
        run = test::run_ngspice(std::string(deck) + ".control\n" + save_line() +
                                    "\nop\nwrite op.raw\nshow all > show.txt\nquit 0\n.endc\n.end\n",
                                "mc-op");
        REQUIRE_MESSAGE(run.status == 0, run.output);
        circuit = read_circuit(run.file("deck.cir"));
        raw = raw::read_raw(run.file("op.raw"));
        REQUIRE(raw.plots.size() == 1);
        from_raw = build_op_point(circuit, raw, raw.plots[0]);
        from_listing = build_op_point(circuit, listing::read_listing(run.file("show.txt")));
    }

    double v(const std::string& net) const { return net == "0" ? 0.0 : *from_raw.voltage(net); }
    double current(const std::string& ammeter) const {
        return raw.plots[0].real[*raw.plots[0].find("i(" + ammeter + ")")][0];
    }
};

double in_polarity(bool p_type, double x) { return p_type ? -x : x; }

}  // namespace

TEST_CASE("terminal voltages and currents in device polarity agree with the circuit's own") {
    Fixture f;
    for (const auto& e : devices) {
        const std::string device = e.device;
        CAPTURE(device);
        const DeviceOp* d = f.from_raw.device(e.device);
        REQUIRE(d);
        CHECK((d->polarity == Polarity::p_type) == e.p_type);
        // ngspice's branch current is positive flowing into a source's + node. Each ammeter's
        // + node is where the current comes from in normal operation: the supply side for
        // NMOS/NPN, the device's drain or collector for PMOS/PNP.
        double i_meas = f.current(e.ammeter);
        if (d->is_mos) {
            CHECK(*d->get("vgs") == doctest::Approx(in_polarity(e.p_type, f.v(e.g) - f.v(e.s))).epsilon(1e-9));
            CHECK(*d->get("vds") == doctest::Approx(in_polarity(e.p_type, f.v(e.d) - f.v(e.s))).epsilon(1e-9));
            CHECK(*d->get("vbs") == doctest::Approx(in_polarity(e.p_type, f.v(e.b) - f.v(e.s))).epsilon(1e-9));
            CHECK(*d->get("vbs") < 0);  // both bulks are reverse biased by 0.3 V / 0.2 V
            CHECK(*d->get("id") == doctest::Approx(i_meas).epsilon(1e-6));
            CHECK(*d->get("id") > 0);
            CHECK(*d->get("vth") > 0);
            CHECK(*d->get("vdsat") > 0);
            CHECK(*d->get("gm") > 0);
            CHECK(*d->get("gds") > 0);
            CHECK(*d->get("gmb") > 0);
        } else {
            CHECK(*d->get("vbe") == doctest::Approx(in_polarity(e.p_type, f.v(e.g) - f.v(e.s))).epsilon(1e-9));
            CHECK(*d->get("vce") == doctest::Approx(in_polarity(e.p_type, f.v(e.d) - f.v(e.s))).epsilon(1e-9));
            CHECK(*d->get("ic") == doctest::Approx(i_meas).epsilon(1e-6));
            CHECK(*d->get("ic") > 0);
            CHECK(*d->get("ib") > 0);
            CHECK(*d->get("vbc") < 0);  // forward-active
            CHECK(*d->get("gm") > 0);
            CHECK(*d->get("gpi") > 0);
            CHECK(*d->get("go") > 0);
        }
    }
}

TEST_CASE("level-1 threshold comes from von, not the vth that ngspice saves as 0 for it") {
    Fixture f;
    // With vbs = 0 von equals |vto|; here vbs is -0.3 V (NMOS) and -0.2 V (PMOS), so the
    // body effect raises it: vth = |vto| + gamma (sqrt(phi - vbs) - sqrt(phi)), the level-1
    // equation (Shichman-Hodges with body effect, as ngspice's level 1 implements it).
    double vth_n = 0.6 + 0.5 * (std::sqrt(0.7 + 0.3) - std::sqrt(0.7));
    double vth_p = 0.7 + 0.4 * (std::sqrt(0.7 + 0.2) - std::sqrt(0.7));
    CHECK(*f.from_raw.device("mn1")->get("vth") == doctest::Approx(vth_n).epsilon(1e-6));
    CHECK(*f.from_raw.device("mp5")->get("vth") == doctest::Approx(vth_p).epsilon(1e-6));
}

TEST_CASE("an m=2 instance reports twice the current and conductances of its m=1 twin") {
    Fixture f;
    for (auto [one, two] : {std::pair{"mn1", "mn2"}, std::pair{"mp5", "mp6"}}) {
        const std::string name = one;
        CAPTURE(name);
        for (const char* q : {"id", "gm", "gds", "gmb"})
            CHECK(*f.from_raw.device(two)->get(q) == doctest::Approx(2 * *f.from_raw.device(one)->get(q)).epsilon(1e-9));
        for (const char* q : {"vth", "vdsat", "vgs", "vds"})
            CHECK(*f.from_raw.device(two)->get(q) == doctest::Approx(*f.from_raw.device(one)->get(q)).epsilon(1e-9));
    }
}

TEST_CASE("the op read from the show listing equals the op read from the raw file") {
    Fixture f;
    for (const auto& e : devices) {
        const std::string device = e.device;
        CAPTURE(device);
        const DeviceOp* a = f.from_raw.device(e.device);
        const DeviceOp* b = f.from_listing.device(e.device);
        REQUIRE(b);
        for (const auto& [q, value] : a->values) {
            const std::string quantity = q;
            CAPTURE(quantity);
            REQUIRE(b->get(q));
            // The listing prints 6 significant digits.
            CHECK(*b->get(q) == doctest::Approx(value).epsilon(1e-5).scale(1e-15));
        }
    }
}

TEST_CASE("missing parameters: the error lists each device, what it lacks and the save line") {
    Fixture f;
    OpPoint empty = f.from_raw;
    empty.devices.at("mn3").values.erase("gm");
    empty.devices.at("q9").values.erase("go");
    try {
        require_transistor_quantities(empty, f.circuit, {"mn1", "mn3", "q9"});
        FAIL("no error");
    } catch (const InputError& e) {
        CHECK(e.code() == "op.missing-parameters");
        std::string m = e.message();
        CHECK(m.find("mn3: gm") != std::string::npos);
        CHECK(m.find("q9: go") != std::string::npos);
        CHECK(m.find("@mn3[gm]") != std::string::npos);
        CHECK(m.find("mn1") == std::string::npos);
    }
    CHECK_NOTHROW(require_transistor_quantities(f.from_raw, f.circuit, {"mn1", "mn3", "q9", "mp8"}));
}

namespace {

// Devices with series, body and base resistances, whose terminal voltages refer to their
// internal nodes: ngspice writes #body (and #gate), not #drain, #source, #base, #collCX or
// #emitter, so the derivation must move the terminal's voltage by the drop across the
// resistor.
const char* parasitic_deck = R"(* terminal voltages behind internal nodes
.model nr nmos level=1 vto=0.6 kp=150u lambda=0.05 gamma=0.5 phi=0.7 rd=300 rs=200
.model ps pmos level=1 vto=-0.7 kp=60u lambda=0.06 gamma=0.4 phi=0.7 rsh=50
.model n4 nmos level=14 version=4.8.0 rbodymod=1 rsh=20
.model p4 pmos level=14 version=4.8.0 rgatemod=1
.model qr npn is=1e-16 bf=100 vaf=50 rb=300 re=5 rc=40
.model qi pnp is=1e-16 bf=50 vaf=30 rb=400 irb=10u rbm=30 re=3 rc=20
vdd vdd 0 3
vbn bn 0 -0.3
iref1 vdd g1 50u
mn1 g1 g1 0 bn nr w=4u l=1u
mn2 d2 g1 0 bn nr w=4u l=1u m=2
rl2 vdd d2 20k
iref2 g3 0 30u
mp3 g3 g3 vdd vdd ps w=8u l=1u nrd=2 nrs=3
mp4 d4 g3 vdd vdd ps w=8u l=1u
rl4 d4 0 30k
iref3 vdd g5 20u
mn5 g5 g5 0 bn n4 w=2u l=0.5u
mn6 d6 g5 0 bn n4 w=2u l=0.5u nrd=3 nrs=1
rl6 vdd d6 40k
mp7 d7 g7 vdd vdd p4 w=4u l=0.5u
vg7 g7 0 2.1
rl7 d7 0 50k
iref4 vdd b8 20u
q8 b8 b8 e8 qr
re8 e8 0 1k
q9 c9 b8 0 qr
rl9 vdd c9 30k
iref5 b10 0 10u
q10 b10 b10 vdd qi
q11 c11 b10 vdd qi
rl11 c11 0 50k
)";

const char* parasitic_mos[] = {"mn1", "mn2", "mp3", "mp4", "mn5", "mn6", "mp7"};
const char* parasitic_bjt[] = {"q8", "q9", "q10", "q11"};

// Saves what a review needs with (or without) the terminal voltages.
std::string parasitic_saves(bool terminal_voltages) {
    std::string s = "save all";
    for (const char* m : parasitic_mos)
        for (const char* p : {"id", "vth", "von", "vdsat", "gm", "gds", "gmbs", "vgs", "vds", "vbs"})
            if (terminal_voltages || std::string(p).rfind("v", 0) != 0 || std::string(p) == "vth" ||
                std::string(p) == "von" || std::string(p) == "vdsat")
                s += std::string(" @") + m + "[" + p + "]";
    for (const char* q : parasitic_bjt)
        for (const char* p : {"ic", "ib", "gm", "gpi", "gmu", "go", "gx", "vbe", "vbc"})
            if (terminal_voltages || std::string(p).rfind("v", 0) != 0) s += std::string(" @") + q + "[" + p + "]";
    return s + "\n";
}

struct ParasiticRuns {
    Circuit circuit;
    OpPoint derived;   // from the run without terminal voltages
    OpPoint reported;  // from the run with them
};

ParasiticRuns parasitic_runs() {
    ParasiticRuns r;
    OpPoint* ops[2] = {&r.derived, &r.reported};
    for (bool with : {false, true}) {
        auto run = test::run_ngspice(std::string(parasitic_deck) + ".control\n" + parasitic_saves(with) +
                                         "op\nwrite op.raw\nquit 0\n.endc\n.end\n",
                                     "mc-op-derive");
        REQUIRE_MESSAGE(run.status == 0, run.output);
        r.circuit = read_circuit(run.file("deck.cir"));
        raw::RawFile file = raw::read_raw(run.file("op.raw"));
        *ops[with ? 1 : 0] = build_op_point(r.circuit, file, file.plots[0]);
    }
    return r;
}

}  // namespace

TEST_CASE("terminal voltages the op data lacks are derived from the node voltages and equal ngspice's own") {
    ParasiticRuns r = parasitic_runs();
    // Across a series resistance the drop is the reported current over the conductance: as
    // exact as that current (a bipolar base current to about 1e-5 of itself), so to 10 nV.
    for (const char* m : parasitic_mos)
        for (const char* q : {"vgs", "vds", "vbs"}) {
            const std::string at = std::string(m) + " " + q;
            CAPTURE(at);
            REQUIRE(r.derived.device(m)->get(q));
            CHECK(*r.derived.device(m)->get(q) == doctest::Approx(*r.reported.device(m)->get(q)).epsilon(1e-7).scale(0.1));
        }
    for (const char* b : parasitic_bjt)
        for (const char* q : {"vbe", "vbc", "vce"}) {
            const std::string at = std::string(b) + " " + q;
            CAPTURE(at);
            REQUIRE(r.derived.device(b)->get(q));
            CHECK(*r.derived.device(b)->get(q) == doctest::Approx(*r.reported.device(b)->get(q)).epsilon(1e-7).scale(0.1));
        }
    // The series drops are not small here: taking the terminal nets alone would be off.
    const double vds_terminals = *r.reported.voltage("d2") - 0.0;
    CHECK(std::abs(vds_terminals - *r.reported.device("mn2")->get("vds")) > 1e-3);
    bool noted = false;
    for (const auto& n : r.derived.notes) noted = noted || n.find("vbs derived from the node voltages for 7 devices") != std::string::npos;
    CHECK(noted);
    CHECK(r.reported.notes.empty());
}

TEST_CASE("a listing's node voltages come from its terminal voltages, through transistors and sources") {
    auto run = test::run_ngspice(std::string(parasitic_deck) + "rfloat x 0 1k\nifloat vdd x 1u\n.control\n" +
                                     parasitic_saves(true) + "op\nwrite op.raw\nshow all > show.txt\nquit 0\n.endc\n.end\n",
                                 "mc-op-listing");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    Circuit c = read_circuit(run.file("deck.cir"));
    raw::RawFile file = raw::read_raw(run.file("op.raw"));
    OpPoint from_raw = build_op_point(c, file, file.plots[0]);
    OpPoint from_listing = build_op_point(c, listing::read_listing(run.file("show.txt")));
    // Through sources (vdd, vbn, vg7) and transistors (every gate, drain and base net);
    // the listing prints six digits, and the series drops come from its id and ic.
    for (const char* net : {"vdd", "bn", "g1", "d2", "g3", "d4", "g5", "d6", "g7", "d7", "b8", "e8", "c9", "b10", "c11"}) {
        CAPTURE(net);
        REQUIRE(from_listing.voltage(net));
        CHECK(*from_listing.voltage(net) == doctest::Approx(*from_raw.voltage(net)).epsilon(1e-4).scale(1e-3));
    }
    // x hangs on a resistor and a current source: no transistor or source path from ground.
    CHECK_FALSE(from_listing.voltage("x"));
    bool named = false;
    for (const auto& n : from_listing.notes) named = named || n.find("1 net unknown, with no such path from ground: x") != std::string::npos;
    CHECK(named);
}
