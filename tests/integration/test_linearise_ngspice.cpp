// The linearised impedance (modified nodal analysis over the whole circuit, src/analyse/
// linearise.cpp) against ngspice's `.tf`: each deck is run with `op` and `tf i(vout) vout`,
// the Circuit is read from the same deck and the OpPoint from the op plot, and the
// resistance at the probed node must match `vout#input_impedance` within 0.1 %.
// `.option gmin=1e-15` keeps ngspice's junction gmin (which the linearised network leaves
// out) below the tolerance at the high impedances of cascodes.
//
// The fallback to a mirror's own devices (when the whole circuit cannot be linearised) is
// checked the same way: its value must match, within 0.1 %, ngspice's `.tf` of a second
// deck holding only those devices, with their gates (bases) held by voltage sources at
// the DC voltages ngspice found in the first deck.
#include <sstream>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/linearise.hpp"
#include "src/model/op_point_build.hpp"
#include "support/ngspice_run.hpp"

using namespace mirrorcheck;

namespace {

// Runs `circuit` (which holds the probe `vout` on node `node`) and compares.
struct Compared {
    double simulated = 0;
    double linearised = 0;
};

Compared compare(const std::string& circuit, const std::vector<std::string>& mos,
                 const std::vector<std::string>& bjt, const std::string& node = "out") {
    std::string saves;
    for (const auto& m : mos)
        for (const char* q : {"gm", "gds", "gmbs", "vds"}) saves += " @" + m + "[" + q + "]";
    for (const auto& q1 : bjt)
        for (const char* q : {"gm", "gpi", "gmu", "go"}) saves += " @" + q1 + "[" + q + "]";
    auto run = test::run_ngspice("* linearised impedance\n.option gmin=1e-15\n" + circuit + ".control\nsave all" +
                                     saves +
                                     "\nop\nwrite run.raw\nset appendwrite\ntf i(vout) vout\nwrite run.raw\nquit 0\n"
                                     ".endc\n.end\n",
                                 "mc-linearise");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    raw::RawFile file = raw::read_raw(run.file("run.raw"));
    REQUIRE(file.plots.size() == 2);
    auto z = file.plots[1].find("vout#input_impedance");
    REQUIRE(z);

    Circuit c = read_circuit(run.file("deck.cir"));
    OpPoint op = build_op_point(c, file, file.plots[0]);
    auto r = compute_linearised_impedances(c, op, {node});
    REQUIRE(r.size() == 1);
    REQUIRE_MESSAGE(r[0].resistance, r[0].note);
    CHECK(r[0].note.find("held by vout") != std::string::npos);
    Compared out{file.plots[1].real[*z][0], *r[0].resistance};
    MESSAGE("ngspice " << out.simulated << " ohm, linearised " << out.linearised << " ohm, relative difference "
                       << out.linearised / out.simulated - 1);
    CHECK(out.linearised == doctest::Approx(out.simulated).epsilon(1e-3));
    return out;
}

const char* level1n = ".model nd nmos level=1 vto=0.5 kp=200u lambda=0.08 gamma=0.5 phi=0.7\n";
const char* level1p = ".model pd pmos level=1 vto=-0.6 kp=80u lambda=0.1 gamma=0.4 phi=0.7\n";

}  // namespace

TEST_CASE("level-1 NMOS cascode sink, stacked diode reference fed by a current source") {
    auto r = compare(std::string(level1n) +
                         "vdd vdd 0 3.3\niref vdd g2 20u\n"
                         "m4 g2 g2 g1 0 nd w=4u l=1u\nm3 g1 g1 0 0 nd w=4u l=1u\n"
                         "m1 mid g1 0 0 nd w=4u l=1u\nm2 out g2 mid 0 nd w=4u l=1u\nvout out 0 dc 2.0\n",
                     {"m1", "m2", "m3", "m4"}, {});
    CHECK(r.simulated > 1e6);  // a cascode: far above one device's ro
}

TEST_CASE("level-1 PMOS simple mirror") {
    compare(std::string(level1p) +
                "vdd vdd 0 3.3\niref g 0 20u\nm1 g g vdd vdd pd w=8u l=1u\nm2 out g vdd vdd pd w=8u l=1u\n"
                "vout out 0 dc 1.5\n",
            {"m1", "m2"}, {});
}

TEST_CASE("BSIM4 NMOS cascode with a resistor-fed diode bias") {
    auto r = compare(".model n4 nmos level=14 version=4.8.0\n"
                     "vdd vdd 0 1.8\nrb1 vdd g1 40k\nm3 g1 g1 0 0 n4 w=2u l=0.5u\n"
                     "vb2 g2 0 1.3\nm1 mid g1 0 0 n4 w=2u l=0.5u\nm2 out g2 mid 0 n4 w=2u l=0.5u\n"
                     "vout out 0 dc 1.5\n",
                     {"m1", "m2", "m3"}, {});
    CHECK(r.simulated > 1e5);
}

TEST_CASE("NPN mirror with emitter degeneration") {
    compare(".model qn npn is=1e-16 bf=100 vaf=40\n"
            "vcc vcc 0 5\nrref vcc b 40k\nq1 b b e1 qn\nre1 e1 0 1k\nq2 out b e2 qn\nre2 e2 0 1k\n"
            "vout out 0 dc 3\n",
            {}, {"q1", "q2"});
}

TEST_CASE("PNP mirror") {
    compare(".model qp pnp is=1e-16 bf=60 vaf=30\n"
            "vcc vcc 0 5\nq1 b b vcc qp\nrref b 0 40k\nq2 out b vcc qp\nvout out 0 dc 2\n",
            {}, {"q1", "q2"});
}

TEST_CASE("five-transistor OTA: NMOS pair, PMOS mirror load, NMOS tail source") {
    // The output is held by the probe near the voltage of the mirror's diode side, so
    // that every device is saturated; the impedance is roughly ro(n) || ro(p).
    compare(std::string(level1n) + level1p +
                "vdd vdd 0 3.3\nvinp inp 0 1.5\nvinn inn 0 1.5\n"
                "ib vdd bias 20u\nm5 bias bias 0 0 nd w=4u l=1u\nm6 tail bias 0 0 nd w=4u l=1u\n"
                "m1 x inn tail 0 nd w=8u l=1u\nm2 out inp tail 0 nd w=8u l=1u\n"
                "m3 x x vdd vdd pd w=8u l=1u\nm4 out x vdd vdd pd w=8u l=1u\nvout out 0 dc 2.2\n",
            {"m1", "m2", "m3", "m4", "m5", "m6"}, {});
}

TEST_CASE("regulated cascode: an E amplifier drives the cascode gate") {
    auto r = compare(std::string(level1n) +
                         "vb1 g1 0 0.9\nm1 mid g1 0 0 nd w=4u l=1u\nvr vr 0 0.6\ne1 g2 0 vr mid 20\n"
                         "m2 out g2 mid 0 nd w=4u l=1u\nvout out 0 dc 2.4\n",
                     {"m1", "m2"}, {});
    CHECK(r.simulated > 1e8);  // the loop gain multiplies the cascode's resistance
}

TEST_CASE("linear controlled sources E, F, G, H with resistors") {
    compare("vout out 0 dc 1\nr1 out m 10k\nvs2 m m2 0\nr2 m2 0 5k\nh1 y 0 vs2 2k\nr3 y out 20k\n"
            "g1 out 0 y 0 0.1m\nf1 out 0 vs2 0.5\ne1 z 0 out 0 2\nr4 z out 50k\n",
            {}, {});
}

TEST_CASE("a device written with drain and source exchanged (reverse mode), level 1 and BSIM4") {
    for (std::string model : {std::string(level1n), std::string(".model nd nmos level=14 version=4.8.0\n")}) {
        CAPTURE(model);
        compare(model + "vb1 g1 0 0.9\nm1 mid g1 0 0 nd w=4u l=1u\nvb2 g2 0 1.6\n"
                        "m2 mid g2 out 0 nd w=4u l=1u\nvout out 0 dc 2.4\n",
                {"m1", "m2"}, {});
    }
}

namespace {

std::string number(double v) {
    std::ostringstream s;
    s.precision(17);
    s << v;
    return s.str();
}

std::size_t device_index(const Circuit& c, const std::string& name) {
    for (std::size_t i = 0; i < c.devices().size(); ++i)
        if (c.devices()[i].name == name) return i;
    FAIL("no device " << name);
    return 0;
}

// Runs `circuit` (probe `vout` on `out`) saving only `saves`, and returns the fallback
// result for the output stack `own` together with the op plot's node voltages.
struct Fallback {
    LinearisedImpedance result;
    OpPoint op;
};

Fallback fallback(const std::string& circuit, const std::string& saves, const std::vector<std::string>& own) {
    auto run = test::run_ngspice("* fallback\n.option gmin=1e-15\n" + circuit + ".control\nsave all" + saves +
                                     "\nop\nwrite run.raw\nquit 0\n.endc\n.end\n",
                                 "mc-fallback");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    raw::RawFile file = raw::read_raw(run.file("run.raw"));
    Circuit c = read_circuit(run.file("deck.cir"));
    OpPoint op = build_op_point(c, file, file.plots[0]);
    LineariseTarget target{"out", {}};
    for (const auto& name : own) target.own_devices.push_back(device_index(c, name));
    auto r = compute_linearised_impedances(c, op, {target}, {});
    REQUIRE(r.size() == 1);
    return {r[0], op};
}

// ngspice's `.tf` of the output stack alone.
double stack_tf(const std::string& stack) {
    auto run = test::run_ngspice("* output stack\n.option gmin=1e-15\n" + stack +
                                     ".control\ntf i(vout) vout\nwrite run.raw\nquit 0\n.endc\n.end\n",
                                 "mc-fallback-stack");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    raw::RawFile file = raw::read_raw(run.file("run.raw"));
    auto z = file.plots[0].find("vout#input_impedance");
    REQUIRE(z);
    return file.plots[0].real[*z][0];
}

// A fallback result against ngspice's `.tf` of `stack`: the output stack alone, its gates
// (bases) held by voltage sources.
void check_against_stack(const LinearisedImpedance& r, const std::string& stack) {
    REQUIRE_MESSAGE(r.resistance, r.note);
    CHECK(r.scope == "mirror devices only");
    MESSAGE("note: " << r.note);
    double tf = stack_tf(stack);
    MESSAGE("ngspice .tf of the stack " << tf << " ohm, fallback " << *r.resistance << " ohm, relative difference "
                                        << *r.resistance / tf - 1);
    CHECK(*r.resistance == doctest::Approx(tf).epsilon(1e-3));
}

}  // namespace

TEST_CASE("fallback: only the output stack's parameters saved; its value is the .tf of the stack with gates held") {
    const std::string model = level1n;
    auto f = fallback(model +
                          "vdd vdd 0 3.3\niref vdd g2 20u\n"
                          "m4 g2 g2 g1 0 nd w=4u l=1u\nm3 g1 g1 0 0 nd w=4u l=1u\n"
                          "m1 mid g1 0 0 nd w=4u l=1u\nm2 out g2 mid 0 nd w=4u l=1u\nvout out 0 dc 2.0\n",
                      " @m1[gm] @m1[gds] @m1[gmbs] @m1[vds] @m2[gm] @m2[gds] @m2[gmbs] @m2[vds]", {"m1", "m2"});
    CHECK(f.result.note.find("gm, gds, gmb not in the op data: 2 devices (m4, m3)") != std::string::npos);
    CHECK(f.result.note.find("m1, m2") != std::string::npos);
    check_against_stack(f.result, model + "vg1 g1 0 dc " + number(*f.op.voltage("g1")) + "\nvg2 g2 0 dc " +
                                      number(*f.op.voltage("g2")) +
                                      "\nm1 mid g1 0 0 nd w=4u l=1u\nm2 out g2 mid 0 nd w=4u l=1u\nvout out 0 dc 2.0\n");
}

TEST_CASE("fallback: a behavioural source elsewhere; NPN output with emitter degeneration") {
    const std::string model = ".model qn npn is=1e-16 bf=100 vaf=40\n";
    auto f = fallback(model +
                          "vcc vcc 0 5\nrref vcc b 40k\nq1 b b e1 qn\nre1 e1 0 1k\nq2 out b e2 qn\nre2 e2 0 1k\n"
                          "rx vcc x 10k\nb1 x 0 i=v(x)*v(x)*1e-5\nvout out 0 dc 3\n",
                      " @q1[gm] @q1[gpi] @q1[gmu] @q1[go] @q2[gm] @q2[gpi] @q2[gmu] @q2[go]", {"q2", "re2"});
    CHECK(f.result.note.find("behavioural sources have no linear model here: b1") != std::string::npos);
    check_against_stack(f.result, model + "vb b 0 dc " + number(*f.op.voltage("b")) +
                                      "\nq2 out b e2 qn\nre2 e2 0 1k\nvout out 0 dc 3\n");
}

TEST_CASE("fallback: when the own devices lack their parameters too, no result and a note saying both") {
    auto f = fallback(std::string(level1n) + "vdd vdd 0 3.3\niref vdd g 20u\nm1 g g 0 0 nd w=4u l=1u\n"
                                             "m2 out g 0 0 nd w=4u l=1u\nvout out 0 dc 2.0\n",
                      " @m1[gm] @m1[gds] @m1[gmbs]", {"m2"});
    CHECK_FALSE(f.result.resistance);
    CHECK(f.result.scope.empty());
    CHECK(f.result.note.find("not in the op data: m2") != std::string::npos);
    CHECK(f.result.note.find("own devices") != std::string::npos);
}
