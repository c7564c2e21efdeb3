// Unit tests of the inspection pass with hand-made circuits and operating points: region
// classification at each boundary, the reflection rule's levels and formula text, and the
// order of findings (errors first).
#include <map>
#include <memory>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "parsers/common/input_error.hpp"
#include "src/analyse/inspect.hpp"

using namespace mirrorcheck;

namespace {

DeviceOp mos(const std::string& name, double vgs, double vds, double vth, double vdsat, double id = 10e-6,
             double gm = 100e-6, double gds = 1e-6, double gmb = 20e-6) {
    DeviceOp d;
    d.name = name;
    d.is_mos = true;
    d.values = {{"id", id},       {"vgs", vgs}, {"vds", vds}, {"vbs", 0.0}, {"vth", vth},
                {"vdsat", vdsat}, {"gm", gm},   {"gds", gds}, {"gmb", gmb}};
    return d;
}

DeviceOp bjt(const std::string& name, double vbe, double vbc, double ic = 10e-6) {
    DeviceOp d;
    d.name = name;
    d.is_mos = false;
    d.values = {{"ic", ic},           {"ib", ic / 100},    {"vbe", vbe}, {"vbc", vbc},   {"vce", vbe - vbc},
                {"gm", ic / 0.02585}, {"gpi", ic / 2.585}, {"gmu", 0.0}, {"go", ic / 50}};
    return d;
}

const InspectOptions defaults;

}  // namespace

TEST_CASE("MOS regions: saturation, triode, weak inversion, cutoff") {
    CHECK(classify_region(mos("m1", 0.9, 1.0, 0.5, 0.4), defaults).region == Region::saturation);
    CHECK(classify_region(mos("m1", 0.9, 0.4, 0.5, 0.4), defaults).region == Region::saturation);  // vds = vdsat
    auto triode = classify_region(mos("m1", 0.9, 0.3, 0.5, 0.4), defaults);
    CHECK(triode.region == Region::triode);
    CHECK_FALSE(triode.current_source);
    CHECK(triode.headroom == doctest::Approx(-0.1));
    // 50 mV below vth (under 10 kT/q = 259 mV) with 1 nA: weak inversion, saturated above 4 kT/q.
    auto weak = classify_region(mos("m1", 0.45, 0.5, 0.5, 0.05, 1e-9), defaults);
    CHECK(weak.region == Region::weak_inversion);
    CHECK(weak.current_source);
    CHECK(weak.saturation_voltage == doctest::Approx(4 * 0.025865).epsilon(1e-3));
    CHECK_FALSE(classify_region(mos("m1", 0.45, 0.05, 0.5, 0.05, 1e-9), defaults).current_source);
    // Same voltages with only leakage (level 1 has no subthreshold current): cutoff.
    CHECK(classify_region(mos("m1", 0.45, 0.5, 0.5, 0.05, 1e-13), defaults).region == Region::cutoff);
    CHECK(classify_region(mos("m1", 0.3, 0.5, 0.5, 0.05, 1e-9), defaults).region == Region::weak_inversion);
    // 300 mV below vth: cutoff whatever the current.
    CHECK(classify_region(mos("m1", 0.2, 0.5, 0.5, 0.05, 1e-9), defaults).region == Region::cutoff);
}

TEST_CASE("MOS margin against the option") {
    auto d = classify_region(mos("m1", 0.9, 0.45, 0.5, 0.4), defaults);
    CHECK(d.region == Region::saturation);
    CHECK(d.low_margin);  // 50 mV < 100 mV
    InspectOptions loose;
    loose.margin = 0.03;
    CHECK_FALSE(classify_region(mos("m1", 0.9, 0.45, 0.5, 0.4), loose).low_margin);
}

TEST_CASE("bipolar regions: forward-active, saturation, cutoff") {
    CHECK(classify_region(bjt("q1", 0.65, -1.0), defaults).region == Region::forward_active);
    CHECK(classify_region(bjt("q1", 0.65, 0.0), defaults).region == Region::forward_active);  // a diode
    auto sat = classify_region(bjt("q1", 0.65, 0.5), defaults);                               // vce = 0.15 V
    CHECK(sat.region == Region::bipolar_saturation);
    CHECK(sat.headroom == doctest::Approx(-0.05));
    InspectOptions low;
    low.vce_sat = 0.1;
    // Vce 0.15 V above a 0.1 V vce_sat, but the collector junction is forward biased by 0.5 V.
    CHECK(classify_region(bjt("q1", 0.65, 0.5), low).region == Region::bipolar_saturation);
    CHECK(classify_region(bjt("q1", 0.65, 0.3), low).region == Region::forward_active);
    CHECK(classify_region(bjt("q1", 0.2, -2.0), defaults).region == Region::cutoff);
    CHECK(to_string(Region::bipolar_saturation) == "saturated");  // not MOS saturation, its healthy region
    CHECK(to_string(Region::weak_inversion) == "weak-inversion");
}

namespace {

// A hand-made NMOS circuit: a simple mirror m1 -> m2 (out1), m3 (out2), and a cascode
// output m5/m6 on the same reference (as a separate mirror, for the test's sake).
struct HandMade {
    Circuit circuit;
    OpPoint op;
    std::vector<Mirror> mirrors;

    std::size_t add(const std::string& name, const std::string& d, const std::string& g, const std::string& s) {
        Device dev;
        dev.kind = DeviceKind::mosfet;
        dev.name = dev.local_name = name;
        dev.terminals = {{"d", d}, {"g", g}, {"s", s}, {"b", "0"}};
        auto model = std::make_shared<Model>();
        model->name = model->ngspice_name = "nch";
        model->type = "nmos";
        dev.model = model;
        return circuit.add_device(dev);
    }

    HandMade() {
        const auto m1 = add("m1", "ref", "ref", "0");
        const auto m2 = add("m2", "out1", "ref", "0");
        const auto m3 = add("m3", "out2", "ref", "0");
        const auto m5 = add("m5", "mid", "ref", "0");
        const auto m6 = add("m6", "out3", "bias", "mid");
        op.devices["m1"] = mos("m1", 0.9, 0.9, 0.5, 0.4, 10e-6);
        op.devices["m2"] = mos("m2", 0.9, 0.2, 0.5, 0.4, 8e-6);    // triode: error
        op.devices["m3"] = mos("m3", 0.9, 0.45, 0.5, 0.4, 12e-6);  // low margin, ratio 1.2
        op.devices["m5"] = mos("m5", 0.9, 0.9, 0.5, 0.4, 10e-6);
        // gm·ro = 5 (low intrinsic gain), gmb/gm = 0.5 (body effect)
        op.devices["m6"] = mos("m6", 0.9, 1.0, 0.6, 0.3, 10e-6, 50e-6, 10e-6, 25e-6);
        op.node_voltages = {{"ref", 0.9}, {"out1", 0.2}, {"out2", 0.45}, {"mid", 0.9}, {"out3", 1.9}};

        Mirror simple;
        simple.id = "nmos-simple:m2";
        simple.family = Family::simple;
        simple.kind = "nmos";
        simple.reference = {m1};
        simple.reference_degeneration = {std::nullopt};
        simple.reference_node = "ref";
        simple.outputs = {{"out1", {m2}, {std::nullopt}, 1.0}, {"out2", {m3}, {std::nullopt}, 1.0}};
        Mirror cascode;
        cascode.id = "nmos-current-source:m6";
        cascode.family = Family::current_source;
        cascode.kind = "nmos";
        cascode.outputs = {{"out3", {m5, m6}, {std::nullopt, std::nullopt}, std::nullopt}};
        mirrors = {simple, cascode};
    }
};

}  // namespace

TEST_CASE("findings: out of saturation first, then warnings, then information") {
    HandMade h;
    auto result = inspect_mirrors(h.circuit, h.op, h.mirrors, defaults);
    std::vector<std::string> codes;
    for (const Finding& f : result.findings) codes.push_back(std::string(to_string(f.code)) + "/" + f.subject);
    CHECK(codes == std::vector<std::string>{"out-of-saturation/m2", "low-margin/m3", "ratio-error/out1",
                                            "ratio-error/out2", "low-intrinsic-gain/m6", "body-effect/out3"});
    CHECK(result.findings.front().severity == Severity::error);
    // m2: vds 0.2 V against vdsat 0.4 V, as named values with their units
    const Finding& first = result.findings.front();
    CHECK(first.value("region")->text == "triode");
    CHECK(first.value("shortfall")->number == doctest::Approx(0.2));
    CHECK(first.value("shortfall")->unit == Unit::volt);
    CHECK(first.value("saturation_voltage")->number == doctest::Approx(0.4));
    CHECK(first.subject_is_device);
    CHECK(result.findings.back().severity == Severity::info);
}

TEST_CASE("reflection levels and formula of a stack") {
    HandMade h;
    auto result = inspect_mirrors(h.circuit, h.op, h.mirrors, defaults);
    const OutputInspection& o = result.mirrors[1].outputs[0];
    REQUIRE(o.levels.size() == 2);
    CHECK(o.levels[0].rout == doctest::Approx(1e6));
    CHECK(o.levels[1].rs == doctest::Approx(1e6));
    // ro6 + (1 + (gm6 + gmb6)·ro6)·ro5 = 1e5 + (1 + 75e-6·1e5)·1e6
    CHECK(o.reflection.value == doctest::Approx(1e5 + 8.5e6));
    CHECK(o.reflection.value_no_body == doctest::Approx(1e5 + 6e6));
    CHECK(o.reflection.formula == "ro(m6) + (1 + (gm+gmb)(m6)·ro(m6))·ro(m5)");
    CHECK_FALSE(o.family);
    CHECK_FALSE(o.ratio);
    // Headroom: V(mid) + vdsat6 = 1.2 V; the output at 1.9 V is 0.7 V above it.
    CHECK(*o.headroom.limit == doctest::Approx(1.2));
    CHECK(o.headroom.margin == doctest::Approx(0.7));
}

TEST_CASE("current ratio of the simple mirror: measured, predicted and error") {
    HandMade h;
    auto result = inspect_mirrors(h.circuit, h.op, h.mirrors, defaults);
    const CurrentRatio& r = *result.mirrors[0].outputs[1].ratio;
    CHECK(r.measured == doctest::Approx(1.2));
    CHECK(*r.error == doctest::Approx(0.2));
    // N·(1 + (0.45 - 0.9)·gds/Id of m1) = 1 - 0.45·0.1
    CHECK(*r.predicted == doctest::Approx(1.0 - 0.045));
}

TEST_CASE("a quantity missing from the op is an input error naming the device") {
    HandMade h;
    h.op.devices["m6"].values.erase("gds");
    try {
        inspect_mirrors(h.circuit, h.op, h.mirrors, defaults);
        FAIL("no error");
    } catch (const InputError& e) {
        CHECK(e.code() == "op.missing-parameters");
        CHECK(e.message().find("m6") != std::string::npos);
    }
}
