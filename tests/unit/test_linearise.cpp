// The linearised impedance on small networks whose value is known by hand: resistors only,
// a node measured through its probe source with another held, a floating node, and a degenerated MOS device whose
// output resistance ro + (1 + (gm + gmb)·ro)·Rs is textbook. Against frequency: first-order
// networks (R parallel C, R in series with L, a transistor's output conductance with the
// capacitances at its output node), whose |Z|, phase and corner 1/(2·pi·R·C) are the
// textbook single-pole formulas (common circuit theory; quoted from memory). And the
// fallback to a mirror's own devices.
#include <cmath>
#include <complex>
#include <memory>
#include <numbers>

#include <doctest/doctest.h>

#include "src/analyse/linearise.hpp"

using namespace mirrorcheck;

namespace {

Device two_terminal(DeviceKind kind, const std::string& name, const std::string& pos, const std::string& neg,
                    std::optional<double> value) {
    Device d;
    d.kind = kind;
    d.name = d.local_name = name;
    d.terminals = {{"pos", pos}, {"neg", neg}};
    d.value = value;
    return d;
}

Device mos(const std::string& name, const std::string& dn, const std::string& g, const std::string& s,
           const std::string& b) {
    Device d;
    d.kind = DeviceKind::mosfet;
    d.name = d.local_name = name;
    d.terminals = {{"d", dn}, {"g", g}, {"s", s}, {"b", b}};
    return d;
}

Device with_model(Device d, const std::string& type, double level) {
    auto m = std::make_shared<Model>();
    m->name = m->ngspice_name = type + "_model";
    m->type = type;
    m->level = level;
    d.model = m;
    return d;
}

Device bjt(const std::string& name, const std::string& c, const std::string& b, const std::string& e,
           const std::string& type) {
    Device d;
    d.kind = DeviceKind::bjt;
    d.name = d.local_name = name;
    d.terminals = {{"c", c}, {"b", b}, {"e", e}};
    return with_model(d, type, 1);
}

// The single-pole impedance R/(1 + j·2·pi·f·R·C).
std::complex<double> single_pole(double r, double c, double f) {
    return r / std::complex<double>(1.0, 2 * std::numbers::pi * f * r * c);
}

void check_point(const ImpedancePoint& p, std::complex<double> z) {
    CHECK(p.magnitude == doctest::Approx(std::abs(z)).epsilon(1e-9));
    CHECK(p.phase_degrees == doctest::Approx(std::arg(z) * 180 / std::numbers::pi).epsilon(1e-9));
}

// The circuit-level note of `solve` whose text holds `part`, or null.
const SolveNote* note_with(const LinearisedSolve& solve, const std::string& part) {
    for (const auto& n : solve.notes)
        if (n.text.find(part) != std::string::npos) return &n;
    return nullptr;
}

DeviceOp mos_op(const std::string& name, Polarity p, double gm, double gmb, double gds) {
    DeviceOp o;
    o.name = name;
    o.polarity = p;
    o.values = {{"gm", gm}, {"gmb", gmb}, {"gds", gds}, {"vds", 1.0}};
    return o;
}

}  // namespace

TEST_CASE("resistors: a held by its probe vout, b beside it: each measured with the other held") {
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", 1e3));
    c.add_device(two_terminal(DeviceKind::resistor, "r2", "a", "b", 2e3));
    c.add_device(two_terminal(DeviceKind::resistor, "r3", "b", "0", 3e3));
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "a", "0", 1.0));
    c.add_device(two_terminal(DeviceKind::capacitor, "c1", "a", "b", 1e-12));
    c.add_device(two_terminal(DeviceKind::isource, "i1", "b", "0", 1e-3));
    auto r = compute_linearised_impedances(c, OpPoint{}, {"a", "B"});
    REQUIRE(r.size() == 2);
    REQUIRE(r[0].resistance);
    CHECK(*r[0].resistance == doctest::Approx(1e3 * 5e3 / 6e3).epsilon(1e-12));
    CHECK(r[0].note.find("vout") != std::string::npos);
    REQUIRE(r[1].resistance);
    CHECK(r[1].node == "b");
    CHECK(*r[1].resistance == doctest::Approx(2e3 * 3e3 / 5e3).epsilon(1e-12));  // a held by vout: r2 || r3
}

TEST_CASE("a voltage source elsewhere is a short; an inductor too; a resistor's m divides it") {
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", 1e3));
    c.add_device(two_terminal(DeviceKind::resistor, "r2", "a", "b", 2e3));
    c.add_device(two_terminal(DeviceKind::inductor, "l1", "b", "c", 1e-6));
    c.add_device(two_terminal(DeviceKind::vsource, "vb", "c", "0", 0.7));
    Device r3 = two_terminal(DeviceKind::resistor, "r3", "a", "0", 4e3);
    r3.parameters["m"] = 2;  // two 4k in parallel: 2k
    c.add_device(r3);
    auto r = compute_linearised_impedances(c, OpPoint{}, {"a"});
    REQUIRE(r[0].resistance);
    // 1k || 2k || 2k = 500
    CHECK(*r[0].resistance == doctest::Approx(500.0).epsilon(1e-12));
}

TEST_CASE("a floating node: gmin from every node, and said so") {
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", 1e3));
    c.add_device(two_terminal(DeviceKind::resistor, "r2", "x", "y", 1e3));
    auto r = compute_linearised_impedances(c, OpPoint{}, {"a", "nothere", "0"});
    REQUIRE(r[0].resistance);
    CHECK(*r[0].resistance == doctest::Approx(1e3).epsilon(1e-6));
    CHECK(note_with(r, "1e-12"));  // said once, for the circuit
    CHECK_FALSE(r[1].resistance);
    CHECK_FALSE(r[2].resistance);
}

TEST_CASE("degenerated MOS, NMOS and PMOS alike: ro + (1 + (gm + gmb)ro)Rs") {
    const double gm = 1e-3, gmb = 2e-4, gds = 1e-5, rs = 5e3;
    const double expected = 1 / gds + (1 + (gm + gmb) / gds) * rs;
    for (Polarity p : {Polarity::n_type, Polarity::p_type}) {
        Circuit c;
        c.add_device(mos("m1", "out", "g", "s", "0"));
        c.add_device(two_terminal(DeviceKind::resistor, "rs", "s", "0", rs));
        c.add_device(two_terminal(DeviceKind::vsource, "vg", "g", "0", 1.0));
        c.add_device(two_terminal(DeviceKind::vsource, "vout", "out", "0", 2.0));
        OpPoint op;
        op.devices["m1"] = mos_op("m1", p, gm, gmb, gds);
        auto r = compute_linearised_impedances(c, op, {"out"});
        REQUIRE(r[0].resistance);
        CHECK(*r[0].resistance == doctest::Approx(expected).epsilon(1e-12));
    }
}

TEST_CASE("a transistor without op values: no result, and the note names it") {
    Circuit c;
    c.add_device(mos("m1", "out", "g", "0", "0"));
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "out", "0", 2.0));
    auto r = compute_linearised_impedances(c, OpPoint{}, {"out"});
    CHECK_FALSE(r[0].resistance);
    CHECK(r[0].note.find("m1") != std::string::npos);
}

TEST_CASE("a diode is left out with a note; a behavioural source makes the result absent") {
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", 1e3));
    c.add_device(two_terminal(DeviceKind::diode, "d1", "a", "0", std::nullopt));
    auto r = compute_linearised_impedances(c, OpPoint{}, {"a"});
    REQUIRE(r[0].resistance);
    CHECK(*r[0].resistance == doctest::Approx(1e3));
    const SolveNote* diodes = note_with(r, "diodes left out");
    REQUIRE(diodes);
    CHECK(diodes->devices == std::vector<std::string>{"d1"});

    Device b = two_terminal(DeviceKind::behavioural, "b1", "a", "0", std::nullopt);
    b.text["expression"] = "i=v(a)*v(a)";
    c.add_device(b);
    r = compute_linearised_impedances(c, OpPoint{}, {"a"});
    CHECK_FALSE(r[0].resistance);
    CHECK(r[0].note.find("b1") != std::string::npos);
    const SolveNote* refused = note_with(r, "whole circuit not linearised: behavioural sources");
    REQUIRE(refused);
    CHECK(refused->devices == std::vector<std::string>{"b1"});
}

TEST_CASE("E, F, G, H on resistors, against the hand solution") {
    // vout holds `a`; G draws 2 mS·v(a) out of a, i.e. a conductance: 1k || 500 = 333.3.
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", 1e3));
    Device g = two_terminal(DeviceKind::vccs, "g1", "a", "0", 2e-3);
    g.terminals.push_back({"cpos", "a"});
    g.terminals.push_back({"cneg", "0"});
    c.add_device(g);
    // E copies 3·v(a) onto e; 3k from e back to a feeds (3v - v)/3k = (2/3 mS)·v(a) into a,
    // a negative conductance: 1/(1m + 2m - 0.6667m) = 428.57.
    Device e = two_terminal(DeviceKind::vcvs, "e1", "e", "0", 3.0);
    e.terminals.push_back({"cpos", "a"});
    e.terminals.push_back({"cneg", "0"});
    c.add_device(e);
    c.add_device(two_terminal(DeviceKind::resistor, "r2", "e", "a", 3e3));
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "a", "0", 1.0));
    auto r = compute_linearised_impedances(c, OpPoint{}, {"a"});
    REQUIRE(r[0].resistance);
    CHECK(*r[0].resistance == doctest::Approx(1.0 / (3e-3 - 2e-3 / 3)).epsilon(1e-12));
}

TEST_CASE("R parallel C: |Z| and phase of a single pole, corner 1/(2 pi R C)") {
    const double r = 10e3, cap = 1e-9;
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", r));
    c.add_device(two_terminal(DeviceKind::capacitor, "c1", "a", "0", cap));
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "a", "0", 1.0));
    const double corner = 1 / (2 * std::numbers::pi * r * cap);  // textbook first-order RC
    const std::vector<double> f = {1.0, corner, 10 * corner};
    auto z = compute_linearised_impedances(c, OpPoint{}, {{"a", {}}}, f);
    REQUIRE(z.size() == 1);
    REQUIRE(z[0].resistance);
    CHECK(*z[0].resistance == doctest::Approx(r).epsilon(1e-12));
    CHECK(z[0].scope == "whole circuit");
    REQUIRE(z[0].spectrum.size() == 3);
    for (std::size_t i = 0; i < f.size(); ++i) {
        CHECK(z[0].spectrum[i].frequency == f[i]);
        check_point(z[0].spectrum[i], single_pole(r, cap, f[i]));
    }
    CHECK(z[0].spectrum[1].phase_degrees == doctest::Approx(-45.0).epsilon(1e-9));
    REQUIRE_MESSAGE(z[0].corner_frequency, z[0].spectrum_note);
    CHECK(*z[0].corner_frequency == doctest::Approx(corner).epsilon(1e-6));
    CHECK(z[0].spectrum_note.empty());
}

TEST_CASE("the node-only overload gives the corner too, and the m of a capacitor multiplies it") {
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", 1e6));
    Device c1 = two_terminal(DeviceKind::capacitor, "c1", "a", "0", 1e-12);
    c1.parameters["m"] = 3;  // three 1 pF in parallel
    c.add_device(c1);
    auto z = compute_linearised_impedances(c, OpPoint{}, {"a"});
    REQUIRE(z[0].corner_frequency);
    CHECK(*z[0].corner_frequency == doctest::Approx(1 / (2 * std::numbers::pi * 1e6 * 3e-12)).epsilon(1e-6));
    CHECK(z[0].spectrum.empty());
}

TEST_CASE("R in series with L: Z = R + j w L rises, so no corner; a resistive network has none either") {
    const double r = 50, l = 1e-6;
    Circuit c;
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "b", r));
    c.add_device(two_terminal(DeviceKind::inductor, "l1", "b", "0", l));
    auto z = compute_linearised_impedances(c, OpPoint{}, {{"a", {}}}, {1e6});
    REQUIRE(z[0].spectrum.size() == 1);
    check_point(z[0].spectrum[0], std::complex<double>(r, 2 * std::numbers::pi * 1e6 * l));
    CHECK_FALSE(z[0].corner_frequency);
    CHECK(z[0].spectrum_note.find("1 THz") != std::string::npos);

    Circuit rc;
    rc.add_device(two_terminal(DeviceKind::resistor, "r1", "a", "0", r));
    z = compute_linearised_impedances(rc, OpPoint{}, {{"a", {}}}, {1e9});
    REQUIRE(z[0].spectrum.size() == 1);
    CHECK(z[0].spectrum[0].magnitude == doctest::Approx(r));
    CHECK_FALSE(z[0].corner_frequency);
    CHECK(z[0].spectrum_note.find("no capacitances") != std::string::npos);
}

TEST_CASE("Meyer MOS (level 1): 1/(gds + j w (cgd + cbd)) at the drain with gate and source held") {
    const double gds = 2e-6, cgd = 1e-15, cbd = 4e-15;
    Circuit c;
    c.add_device(with_model(mos("m1", "out", "g", "0", "0"), "nmos", 1));
    c.add_device(two_terminal(DeviceKind::vsource, "vg", "g", "0", 1.0));
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "out", "0", 2.0));
    OpPoint op;
    op.devices["m1"] = mos_op("m1", Polarity::n_type, 1e-4, 2e-5, gds);
    // cgs, cgb and cbs join nets that are all at AC ground: they must not matter.
    for (auto [q, v] : {std::pair{"cgs", 7e-15}, {"cgd", cgd}, {"cgb", 1e-16}, {"cbd", cbd}, {"cbs", 3e-15}})
        op.devices["m1"].values[q] = v;
    const double corner = gds / (2 * std::numbers::pi * (cgd + cbd));
    auto z = compute_linearised_impedances(c, op, {{"out", {}}}, {corner, 3 * corner});
    REQUIRE(z[0].spectrum.size() == 2);
    check_point(z[0].spectrum[0], single_pole(1 / gds, cgd + cbd, corner));
    check_point(z[0].spectrum[1], single_pole(1 / gds, cgd + cbd, 3 * corner));
    REQUIRE(z[0].corner_frequency);
    CHECK(*z[0].corner_frequency == doctest::Approx(corner).epsilon(1e-6));
}

TEST_CASE("charge-model MOS (BSIM4): cddb and the drain junction at the drain; reverse mode uses the source row") {
    const double gds = 5e-6, cbd = 2e-15, cbs = 3e-15;
    // Forward-frame derivatives: rows g, d, b; columns g, d, s.
    const double cggb = 3e-14, cgdb = -1e-17, cgsb = -2.5e-14, cdgb = -1.2e-14, cddb = 2e-17, cdsb = 1.3e-14,
                 cbgb = -4e-15, cbdb = -1e-17, cbsb = 2e-15;
    for (bool reversed : {false, true}) {
        CAPTURE(reversed);
        Circuit c;
        c.add_device(with_model(mos("m1", "out", "g", "0", "0"), "nmos", 14));
        c.add_device(two_terminal(DeviceKind::vsource, "vg", "g", "0", 1.0));
        OpPoint op;
        op.devices["m1"] = mos_op("m1", Polarity::n_type, 1e-4, 2e-5, gds);
        auto& v = op.devices["m1"].values;
        v["vds"] = reversed ? -1.0 : 1.0;
        v.insert({{"cggb", cggb}, {"cgdb", cgdb}, {"cgsb", cgsb}, {"cdgb", cdgb}, {"cddb", cddb}, {"cdsb", cdsb},
                  {"cbgb", cbgb}, {"cbdb", cbdb}, {"cbsb", cbsb}, {"cbd", cbd}, {"cbs", cbs}});
        // Forward: the drain's own term is cddb. Reverse: the physical drain is the forward
        // source, whose own term is css = -(cgsb + cdsb + cbsb) by charge conservation; and
        // in reverse the forward-frame source node carries gm + gmb too (its vgs and vbs
        // change with it): 1/(gds + gm + gmb).
        const double own = reversed ? -(cgsb + cdsb + cbsb) : cddb;
        const double g = reversed ? gds + 1e-4 + 2e-5 : gds;
        const double f = 1e8;
        auto z = compute_linearised_impedances(c, op, {{"out", {}}}, {f});
        REQUIRE(z[0].spectrum.size() == 1);
        check_point(z[0].spectrum[0], 1.0 / std::complex<double>(g, 2 * std::numbers::pi * f * (own + cbd)));
        const SolveNote* overlaps = note_with(z, "gate overlap capacitances");
        REQUIRE(overlaps);
        CHECK(overlaps->devices == std::vector<std::string>{"m1"});
    }
}

TEST_CASE("bipolar: cmu and cbx at the collector, csub there for a vertical NPN, at the base for a lateral PNP") {
    const double go = 1e-5, gmu = 1e-9, cmu = 0.5e-12, cbx = 0.1e-12, csub = 0.3e-12, f = 1e6;
    for (std::string type : {"npn", "pnp"}) {
        CAPTURE(type);
        Circuit c;
        c.add_device(bjt("q1", "out", "b", "0", type));
        c.add_device(two_terminal(DeviceKind::vsource, "vb", "b", "0", 0.7));
        OpPoint op;
        DeviceOp& o = op.devices["q1"];
        o.name = "q1";
        o.is_mos = false;
        o.values = {{"gm", 4e-3}, {"gpi", 4e-5}, {"gmu", gmu}, {"go", go},
                    {"cpi", 10e-12}, {"cmu", cmu}, {"cbx", cbx}, {"csub", csub}};
        const double at_collector = cmu + cbx + (type == "npn" ? csub : 0.0);
        auto z = compute_linearised_impedances(c, op, {{"out", {}}}, {f});
        REQUIRE(z[0].spectrum.size() == 1);
        check_point(z[0].spectrum[0], 1.0 / std::complex<double>(go + gmu, 2 * std::numbers::pi * f * at_collector));
        CHECK(z[0].spectrum_note.empty());
    }
}

TEST_CASE("transistors without capacitances: resistance yes, spectrum and corner no, and the note says so") {
    Circuit c;
    c.add_device(with_model(mos("m1", "out", "g", "0", "0"), "nmos", 1));
    c.add_device(two_terminal(DeviceKind::vsource, "vg", "g", "0", 1.0));
    c.add_device(two_terminal(DeviceKind::capacitor, "cl", "out", "0", 1e-12));
    OpPoint op;
    op.devices["m1"] = mos_op("m1", Polarity::n_type, 1e-4, 2e-5, 1e-6);
    auto z = compute_linearised_impedances(c, op, {{"out", {}}}, {1e3});
    REQUIRE(z[0].resistance);
    CHECK(z[0].spectrum.empty());
    CHECK_FALSE(z[0].corner_frequency);
    CHECK(z[0].spectrum_note.find("no spectrum") != std::string::npos);
    const SolveNote* uncharged = note_with(z, "no capacitances in the op data");
    REQUIRE(uncharged);
    CHECK(uncharged->text.find("@m1[cgs]") != std::string::npos);
    CHECK(uncharged->devices == std::vector<std::string>{"m1"});
}

TEST_CASE("fallback: a behavioural source elsewhere; the degenerated output alone gives ro + (1 + (gm + gmb)ro)Rs") {
    const double gm = 1e-3, gmb = 2e-4, gds = 1e-5, rs = 5e3;
    const double expected = 1 / gds + (1 + (gm + gmb) / gds) * rs;  // HANDCALC.md section 1 (Razavi, ch. 3)
    Circuit c;
    c.add_device(mos("m1", "out", "g", "s", "0"));
    c.add_device(two_terminal(DeviceKind::resistor, "rs", "s", "0", rs));
    c.add_device(two_terminal(DeviceKind::resistor, "rg", "g", "x", 1e3));  // the gate is AC ground anyway
    Device b = two_terminal(DeviceKind::behavioural, "b1", "x", "0", std::nullopt);
    b.text["expression"] = "v=v(out)*2";
    c.add_device(b);
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "out", "0", 2.0));
    OpPoint op;
    op.devices["m1"] = mos_op("m1", Polarity::n_type, gm, gmb, gds);
    auto z = compute_linearised_impedances(c, op, {{"out", {0, 1}}}, {});
    REQUIRE_MESSAGE(z[0].resistance, z[0].note);
    CHECK(*z[0].resistance == doctest::Approx(expected).epsilon(1e-12));
    CHECK(z[0].scope == "mirror devices only");
    CHECK(z[0].note.find("behavioural sources have no linear model here: b1") != std::string::npos);
    CHECK(z[0].note.find("m1, rs") != std::string::npos);

    // Without own devices the old answer stays: absent, with the reason.
    z = compute_linearised_impedances(c, op, {{"out", {}}}, {});
    CHECK_FALSE(z[0].resistance);
    CHECK(z[0].scope.empty());
    CHECK(z[0].note.find("b1") != std::string::npos);
}

TEST_CASE("fallback on a cascode: the net between the two devices is kept, the gates and the bulk are AC ground") {
    const double gm1 = 1e-3, gmb1 = 1e-4, gds1 = 1e-5, gm2 = 1.1e-3, gmb2 = 2e-4, gds2 = 2e-5;
    // Standard cascode, exact with gates at AC ground (HANDCALC.md section 2):
    // ro2 + (1 + (gm2 + gmb2)·ro2)·ro1 for m2 on top of m1.
    const double expected = 1 / gds2 + (1 + (gm2 + gmb2) / gds2) / gds1;
    Circuit c;
    c.add_device(mos("m1", "mid", "g1", "0", "vss"));
    c.add_device(mos("m2", "out", "g2", "mid", "vss"));
    c.add_device(mos("m9", "g2", "g2", "g1", "vss"));  // a reference device without op data
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "out", "0", 2.0));
    OpPoint op;
    op.devices["m1"] = mos_op("m1", Polarity::n_type, gm1, gmb1, gds1);
    op.devices["m2"] = mos_op("m2", Polarity::n_type, gm2, gmb2, gds2);
    auto z = compute_linearised_impedances(c, op, {{"out", {0, 1}}}, {});
    REQUIRE_MESSAGE(z[0].resistance, z[0].note);
    CHECK(*z[0].resistance == doctest::Approx(expected).epsilon(1e-12));
    CHECK(z[0].note.find("gm, gds, gmb not in the op data: m9") != std::string::npos);

    // The own devices lacking their values: absent, both reasons given.
    z = compute_linearised_impedances(c, op, {{"out", {1, 2}}}, {});
    CHECK_FALSE(z[0].resistance);
    CHECK(z[0].note.find("nor on the mirror's own devices: gm, gds, gmb not in the op data: m9") != std::string::npos);
}

TEST_CASE("fallback spectrum: the own devices' capacitances, gates held") {
    const double gds = 2e-6, cgd = 1e-15, cbd = 4e-15;
    Circuit c;
    c.add_device(with_model(mos("m1", "out", "g", "0", "0"), "nmos", 1));
    Device b = two_terminal(DeviceKind::behavioural, "b1", "g", "0", std::nullopt);
    b.text["expression"] = "v=1";
    c.add_device(b);
    OpPoint op;
    op.devices["m1"] = mos_op("m1", Polarity::n_type, 1e-4, 2e-5, gds);
    op.devices["m1"].values.insert({{"cgs", 7e-15}, {"cgd", cgd}, {"cgb", 1e-16}, {"cbd", cbd}, {"cbs", 3e-15}});
    auto z = compute_linearised_impedances(c, op, {{"out", {0}}}, {1e6});
    REQUIRE(z[0].spectrum.size() == 1);
    CHECK(z[0].scope == "mirror devices only");
    check_point(z[0].spectrum[0], single_pole(1 / gds, cgd + cbd, 1e6));
    REQUIRE(z[0].corner_frequency);
    CHECK(*z[0].corner_frequency == doctest::Approx(gds / (2 * std::numbers::pi * (cgd + cbd))).epsilon(1e-6));
}

TEST_CASE("a cause concerning many devices is said once for the circuit: how many, a few names, all in devices") {
    Circuit c;
    for (int k = 1; k <= 6; ++k)
        c.add_device(mos("m" + std::to_string(k), k == 1 ? "out" : "n" + std::to_string(k), "g", "0", "0"));
    c.add_device(two_terminal(DeviceKind::vsource, "vout", "out", "0", 2.0));
    c.add_device(two_terminal(DeviceKind::vsource, "vg", "g", "0", 1.0));
    c.add_device(two_terminal(DeviceKind::resistor, "r1", "out", "0", 1e3));
    auto solve = compute_linearised_impedances(c, OpPoint{}, {{"out", {8}}, {"n2", {}}}, {});
    const SolveNote* refused = note_with(solve, "whole circuit not linearised: gm, gds, gmb not in the op data");
    REQUIRE(refused);
    CHECK(refused->text.find("6 devices (m1, m2, m3, m4 and 2 more)") != std::string::npos);
    CHECK(refused->devices == std::vector<std::string>{"m1", "m2", "m3", "m4", "m5", "m6"});
    std::size_t mentions = 0;
    for (const auto& n : solve.notes) mentions += n.text.find("gm, gds, gmb not in the op data") != std::string::npos;
    CHECK(mentions == 1);
    // Each output's own note stays short: the cause with a few names, never the whole list.
    for (const auto& r : solve.outputs) {
        CAPTURE(r.node);
        CHECK(r.note.find("m6") == std::string::npos);
        CHECK(r.note.find("6 devices") != std::string::npos);
    }
    // The output with its own device (r1) is solved on it alone.
    REQUIRE(solve.outputs[0].resistance);
    CHECK(*solve.outputs[0].resistance == doctest::Approx(1e3));
    CHECK_FALSE(solve.outputs[1].resistance);
}
