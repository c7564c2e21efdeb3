// The linearised impedance on small networks whose value is known by hand: resistors only,
// a probe source removed, a held node, a floating node, and a degenerated MOS device whose
// output resistance ro + (1 + (gm + gmb)·ro)·Rs is textbook.
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

DeviceOp mos_op(const std::string& name, Polarity p, double gm, double gmb, double gds) {
    DeviceOp o;
    o.name = name;
    o.polarity = p;
    o.values = {{"gm", gm}, {"gmb", gmb}, {"gds", gds}, {"vds", 1.0}};
    return o;
}

}  // namespace

TEST_CASE("resistors: 1k to ground in parallel with 2k + 3k; the probe source is removed") {
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
    CHECK(*r[1].resistance == doctest::Approx(3e3 * 3e3 / 6e3).epsilon(1e-12));
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
    CHECK(r[0].note.find("1e-12") != std::string::npos);
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
    CHECK(r[0].note.find("diode d1") != std::string::npos);

    Device b = two_terminal(DeviceKind::behavioural, "b1", "a", "0", std::nullopt);
    b.text["expression"] = "i=v(a)*v(a)";
    c.add_device(b);
    r = compute_linearised_impedances(c, OpPoint{}, {"a"});
    CHECK_FALSE(r[0].resistance);
    CHECK(r[0].note.find("b1") != std::string::npos);
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
