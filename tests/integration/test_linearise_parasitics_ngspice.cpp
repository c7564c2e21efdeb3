// The exact small-signal solve with the ohmic parasitics ngspice puts inside a device,
// against ngspice on decks of our own: Gummel-Poon rb (fixed, with irb, with rbm), re, rc;
// MOS level 1 rd, rs and sheet resistance rsh·nrd/nrs; BSIM4 rgatemod, rbodymod = 2 with
// its geometry scaling, rsh·nrd and rdsmod = 1. Each deck is run with `op` (saving what a
// review deck saves: tests/support/probe_simulation.hpp), then `.tf` and an AC analysis at
// 1 Hz per probe; the linearised resistance must match ngspice's AC (real part) and `.tf`
// within 1e-6. ngspice's own gmin (1e-12 S across every junction, in gbd, gbs, gpi, gmu) is
// left at its default: the solve takes it from the op data. For bipolar devices ngspice's
// `.tf` (its DC matrix) also has the substrate diode's conductance, gmin, at the collector
// of a vertical device, which its AC analysis leaves out (bjtload.c stamps gdsub,
// bjtacld.c does not): against `.tf` the solve is held to 1e-6 or 1.5·gmin·R, whichever is
// larger. Every expected value is ngspice's; the model cards are invented for the tests.
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "src/analyse/linearise.hpp"
#include "src/model/device_parasitics.hpp"
#include "support/probe_simulation.hpp"

using namespace mirrorcheck;

namespace {

constexpr double tolerance = 1e-6;

const SolveNote* note_with(const LinearisedSolve& solve, const std::string& part) {
    for (const auto& n : solve.notes)
        if (n.text.find(part) != std::string::npos) return &n;
    return nullptr;
}

// Solves `node` and compares with ngspice's answers for `probe`; returns the solve.
LinearisedSolve check(const test::ProbeSimulation& sim, const std::string& node, const std::string& probe,
                      const OpPoint* op = nullptr) {
    LinearisedSolve solve = compute_linearised_impedances(sim.circuit, op ? *op : sim.op, {node});
    for (const auto& n : solve.notes) MESSAGE("note: " << n.text);
    const LinearisedImpedance& r = solve.outputs.at(0);
    REQUIRE_MESSAGE(r.resistance, r.note);
    CHECK(r.scope == "whole circuit");
    const test::ProbeAnswer& ng = sim.probes.at(probe);
    MESSAGE(node << ": linearised " << *r.resistance << " ohm; ngspice ac " << ng.ac.real() << " ("
                 << *r.resistance / ng.ac.real() - 1 << "), tf " << ng.tf << " (" << *r.resistance / ng.tf - 1 << ")");
    CHECK(*r.resistance == doctest::Approx(ng.ac.real()).epsilon(tolerance));
    const double tf_tolerance = std::max(tolerance, 1.5e-12 * std::abs(ng.tf));
    CHECK(*r.resistance == doctest::Approx(ng.tf).epsilon(tf_tolerance));
    return solve;
}

const Device& device(const Circuit& c, const std::string& name) {
    const Device* d = c.find_device(name);
    REQUIRE_MESSAGE(d, name);
    return *d;
}

}  // namespace

TEST_CASE("NPN mirror with a fixed rb, re and rc: area/rb, area/re, area/rc behind the terminals") {
    auto sim = test::simulate_probes("* npn mirror with rb re rc\n"
                                     ".model qr npn is=2e-16 bf=150 vaf=70 rb=200 re=2 rc=50 ikf=20m\n"
                                     "vcc vcc 0 5\niref vcc b 50u\nq1 b b 0 qr\nq2 out b 0 qr area=2\n"
                                     "vout out 0 dc 2.5 ac 0\n",
                                     {"vout"});
    check(sim, "out", "vout");
    const DeviceParasitics p = find_device_parasitics(device(sim.circuit, "q2"));
    REQUIRE(p.base_linear);
    CHECK(*p.base_linear == doctest::Approx(2.0 / 200));
    // ngspice's own gx equals area/rb when rbm and irb are not given.
    CHECK(*sim.op.device("q2")->get("gx") == doctest::Approx(2.0 / 200).epsilon(1e-12));
}

TEST_CASE("NPN cascode whose rb follows the base current (irb, rbm): gx from the op data, or from ib") {
    const std::string deck = "* npn cascode with irb\n"
                             ".model qi npn is=2e-16 bf=120 vaf=60 rb=500 irb=20u rbm=40 re=3 rc=80\n"
                             "vcc vcc 0 5\niref vcc b2 40u\nq4 b2 b2 b1 qi\nq3 b1 b1 0 qi\n"
                             "q1 mid b1 0 qi\nq2 out b2 mid qi\nvout out 0 dc 3 ac 0\n";
    auto sim = test::simulate_probes(deck, {"vout"});
    check(sim, "out", "vout");
    // Without gx the base conductance follows from ib by bjtload.c's law: the same answer.
    OpPoint without_gx = sim.op;
    for (auto& [name, dev] : without_gx.devices) {
        const double gx = *dev.get("gx");
        dev.values.erase("gx");
        CHECK(bipolar_base_conductance(device(sim.circuit, name), *dev.get("ib")) == doctest::Approx(gx).epsilon(1e-9));
    }
    check(sim, "out", "vout", &without_gx);
}

TEST_CASE("PNP Wilson with rbm < rb and no irb: gx depends on qb and comes from the op data") {
    auto sim = test::simulate_probes("* pnp wilson with rbm\n"
                                     ".model qp pnp is=1e-16 bf=60 vaf=35 ikf=5m rb=300 rbm=30 re=4 rc=60\n"
                                     "vcc vcc 0 5\nq2 n2 n2 vcc qp\nq1 n1 n2 vcc qp\nq3 out n1 n2 qp\niref n1 0 30u\n"
                                     "vout out 0 dc 1.5 ac 0\n",
                                     {"vout"});
    check(sim, "out", "vout");
    // Without gx the resistance cannot be known: refused, naming the device and what to save.
    OpPoint without_gx = sim.op;
    for (auto& [name, dev] : without_gx.devices) dev.values.erase("gx");
    LinearisedSolve solve = compute_linearised_impedances(sim.circuit, without_gx, {"out"});
    CHECK_FALSE(solve.outputs[0].resistance);
    const SolveNote* refused = note_with(solve, "without gx in the op data");
    REQUIRE(refused);
    CHECK(refused->devices == std::vector<std::string>{"q2", "q1", "q3"});
}

TEST_CASE("level-1 NMOS cascode with rd and rs, and a reversed device") {
    auto sim = test::simulate_probes("* level 1 rd rs\n"
                                     ".model nr nmos level=1 vto=0.5 kp=200u lambda=0.08 gamma=0.5 phi=0.7 rd=150 rs=90\n"
                                     "vdd vdd 0 3.3\niref vdd g2 20u\nm4 g2 g2 g1 0 nr w=4u l=1u\nm3 g1 g1 0 0 nr w=4u l=1u\n"
                                     "m1 mid g1 0 0 nr w=4u l=1u m=2\nm2 mid g2 out 0 nr w=4u l=1u\n"
                                     "vout out 0 dc 2.0 ac 0\n",
                                     {"vout"});
    CHECK(*sim.op.device("m2")->get("vds") < 0);  // m2 written with drain and source exchanged
    check(sim, "out", "vout");
}

TEST_CASE("level-1 PMOS mirror with sheet resistance: rsh·nrd, rsh·nrs, and nrd defaulting to 1") {
    auto sim = test::simulate_probes("* level 1 rsh\n"
                                     ".model ps pmos level=1 vto=-0.6 kp=80u lambda=0.1 gamma=0.4 phi=0.7 rsh=40\n"
                                     "vdd vdd 0 3.3\niref g 0 20u\nm1 g g vdd vdd ps w=8u l=1u nrd=3 nrs=2\n"
                                     "m2 out g vdd vdd ps w=8u l=1u nrs=5\nvout out 0 dc 1.5 ac 0\n",
                                     {"vout"});
    const DeviceParasitics p = find_device_parasitics(device(sim.circuit, "m2"));
    REQUIRE(p.drain);
    REQUIRE(p.source);
    CHECK(*p.drain == doctest::Approx(1.0 / 40));  // nrd not given: 1 square
    CHECK(*p.source == doctest::Approx(1.0 / 200));
    check(sim, "out", "vout");
}

TEST_CASE("BSIM4 cascode with rgatemod = 1 and 3, rbodymod = 2 scaled by the geometry, rsh·nrd") {
    auto sim = test::simulate_probes(
        "* bsim4 gate and body networks\n"
        ".model n4 nmos level=14 version=4.8.0 rgatemod=3 rbodymod=2 rsh=15 rshg=8 xrcrg1=12 xrcrg2=1\n"
        "+ rbpbx0=80 rbpby0=120 rbpbxl=0.2 rbpbyw=-0.1 rbps0=30 rbpsl=0.1 rbpd0=35 rbpdw=0.2\n"
        "+ rbsbx0=90 rbsby0=110 rbdbx0=95 rbdby0=105 rbsdbxl=0.1 rbsdbyw=0.05 rbsdbxnf=0.3 gbmin=1e-10\n"
        "vdd vdd 0 1.8\nrb1 vdd g1 40k\nm3 g1 g1 0 0 n4 w=2u l=0.5u rgatemod=1\n"
        "vb2 g2 0 1.3\nm1 mid g1 0 0 n4 w=4u l=0.5u nf=2 nrd=2 nrs=1.5\n"
        "m2 out g2 mid 0 n4 w=2u l=0.5u nrd=3\nvout out 0 dc 1.5 ac 0\n",
        {"vout"});
    check(sim, "out", "vout");
    CHECK(find_device_parasitics(device(sim.circuit, "m3")).gate.mode == 1);
    CHECK(find_device_parasitics(device(sim.circuit, "m2")).gate.mode == 3);
}

TEST_CASE("BSIM4 PMOS mirror with rdsmod = 1: bias-dependent Rd(V), Rs(V) and their slopes") {
    auto sim = test::simulate_probes("* bsim4 rdsmod\n"
                                     ".model p4 pmos level=14 version=4.8.0 rdsmod=1 rdw=400 rsw=300 rdwmin=50 "
                                     "rswmin=40 prwg=0.5 prwb=0.1 wr=0.9 ngate=5e19 rsh=10\n"
                                     "vdd vdd 0 1.8\nrb1 g 0 30k\nm1 g g vdd vdd p4 w=4u l=0.5u\n"
                                     "m2 out g vdd vdd p4 w=4u l=0.5u nrd=4 nrs=2 m=2\nvout out 0 dc 0.6 ac 0\n",
                                     {"vout"});
    check(sim, "out", "vout");
}

TEST_CASE("BSIM4 with a strong GIDL and GISL: their slopes from the reported igidl, igisl") {
    // agidl and bgidl chosen so that GIDL carries a good part of the output conductance at
    // 1.8 V; m4 is written with drain and source exchanged, so that its leakage is GISL.
    auto sim = test::simulate_probes("* bsim4 gidl\n"
                                     ".model ng nmos level=14 version=4.8.0 agidl=2e-5 bgidl=1e9 cgidl=0.3 egidl=0.1\n"
                                     "vdd vdd 0 1.8\nrb1 vdd g1 40k\nm3 g1 g1 0 0 ng w=2u l=0.5u\n"
                                     "m2 out g1 0 0 ng w=2u l=0.5u\nvout out 0 dc 1.8 ac 0\n"
                                     "m4 0 g1 out2 0 ng w=2u l=0.5u\nvout2 out2 0 dc 1.7 ac 0\n",
                                     {"vout", "vout2"});
    CHECK(*sim.op.device("m4")->get("vds") < 0);
    CHECK(*sim.op.device("m2")->get("igidl") > 0.1 * *sim.op.device("m2")->get("gds") * 1.0);  // 10 % of gds·1 V
    CHECK(*sim.op.device("m4")->get("igisl") > 0.1 * *sim.op.device("m4")->get("gds") * 1.0);
    check(sim, "out", "vout");
    check(sim, "out2", "vout2");
}
