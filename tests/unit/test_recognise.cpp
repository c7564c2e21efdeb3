// Unit tests of the recognition pass: every family in NMOS, PMOS, NPN and PNP form (decks in
// tests/data/recognise/, written by generate_decks.py there), several outputs of one
// reference, hierarchy, circuits without mirrors, and a 10,000-transistor circuit.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "src/model/circuit_build.hpp"
#include "support/mirror_blocks.hpp"
#include "support/ngspice_run.hpp"
#include "src/recognise/find_mirrors.hpp"

using mirrorcheck::Circuit;
using mirrorcheck::Family;
using mirrorcheck::Mirror;
using mirrorcheck::find_mirrors;

namespace {

// A deck of the test's own: the models, then `body`.
Circuit read_text_deck(const std::string& body) {
    auto dir = mirrorcheck::test::make_temp_dir("mc-recognise-unit");
    mirrorcheck::test::write_text(dir / "deck.cir",
                                  "* unit deck\n.model nch nmos (level=1 vto=0.5 kp=200u)\n"
                                  ".model pch pmos (level=1 vto=-0.5 kp=80u)\n.model qn npn (bf=150)\n" +
                                      body + ".end\n");
    Circuit c = mirrorcheck::read_circuit(dir / "deck.cir");
    std::filesystem::remove_all(dir);
    return c;
}

Circuit read_deck(const std::string& name) {
    return mirrorcheck::read_circuit(std::string(MIRRORCHECK_TEST_DATA) + "/recognise/" + name + ".cir");
}

std::vector<std::string> names(const Circuit& c, const std::vector<std::size_t>& devices) {
    std::vector<std::string> out;
    for (std::size_t d : devices) out.push_back(c.devices()[d].name);
    return out;
}

// What a test expects of a mirror, with devices named by number ("1" is m1 or q1).
struct ExpectedOutput {
    std::string node;
    std::vector<int> devices;
    std::optional<double> ratio;
};

struct Expected {
    std::string family;
    std::vector<int> reference;
    std::string reference_node;
    std::vector<ExpectedOutput> outputs;
    std::vector<int> helpers = {};
};

std::vector<std::string> numbered(const std::string& kind, const std::vector<int>& numbers) {
    std::string letter = kind == "nmos" || kind == "pmos" ? "m" : "q";
    std::vector<std::string> out;
    for (int n : numbers) out.push_back(letter + std::to_string(n));
    return out;
}

void check_mirror(const Circuit& c, const Mirror& m, const std::string& kind, const Expected& e) {
    CHECK(mirror_family_label(m) == kind + "-" + e.family);
    CHECK(m.kind == kind);
    CHECK(names(c, m.reference) == numbered(kind, e.reference));
    CHECK(m.reference.size() == m.reference_degeneration.size());
    CHECK(m.reference_node == e.reference_node);
    CHECK(names(c, m.helpers) == numbered(kind, e.helpers));
    REQUIRE(m.outputs.size() == e.outputs.size());
    for (std::size_t i = 0; i < e.outputs.size(); ++i) {
        const auto& out = m.outputs[i];
        CHECK(out.node == e.outputs[i].node);
        CHECK(names(c, out.devices) == numbered(kind, e.outputs[i].devices));
        CHECK(out.degeneration.size() == out.devices.size());
        REQUIRE(out.design_ratio.has_value() == e.outputs[i].ratio.has_value());
        if (out.design_ratio) CHECK(*out.design_ratio == doctest::Approx(*e.outputs[i].ratio));
    }
    CHECK(m.id == mirror_family_label(m) + ":" + c.devices()[m.outputs.front().devices.back()].name);
}

const std::vector<std::pair<std::string, Expected>>& family_decks() {
    static const std::vector<std::pair<std::string, Expected>> decks = {
        {"simple", {"simple", {1}, "ref", {{"out1", {2}, 2.0}, {"out2", {3}, 4.0}}}},
        {"degenerated", {"degenerated", {1}, "ref", {{"out", {2}, 2.0}}}},
        {"widlar", {"widlar", {1}, "ref", {{"out", {2}, 1.0}}}},
        {"cascode", {"cascode", {1, 3}, "ref", {{"out", {2, 4}, 1.0}}}},
        {"wide_swing", {"wide-swing-cascode", {1, 3}, "ref", {{"out", {2, 4}, 1.0}}}},
        {"wide_swing_diode", {"wide-swing-cascode", {1, 3}, "ref", {{"out", {2, 4}, 1.0}}}},
        {"wilson", {"wilson", {1}, "y", {{"out", {2, 3}, 1.0}}}},
        {"improved_wilson", {"improved-wilson", {1, 4}, "y", {{"out", {2, 3}, 1.0}}}},
        {"regulated_cascode", {"regulated-cascode", {1}, "ref", {{"out", {2, 4}, 1.0}}, {5}}},
        {"beta_helper", {"beta-helper", {1}, "x", {{"out", {2}, 2.0}}, {6}}},
        {"stack", {"current-source", {}, "", {{"out", {1, 2}, std::nullopt}}}},
    };
    return decks;
}

}  // namespace

TEST_CASE("every family is found in NMOS, PMOS, NPN and PNP form") {
    for (const std::string kind : {"nmos", "pmos", "npn", "pnp"}) {
        for (const auto& [deck, expected] : family_decks()) {
            CAPTURE(kind);
            CAPTURE(deck);
            Circuit c = read_deck(kind + "_" + deck);
            auto mirrors = find_mirrors(c);
            REQUIRE(mirrors.size() == 1);
            check_mirror(c, mirrors.front(), kind, expected);
        }
    }
}

TEST_CASE("degeneration resistors are reported per device") {
    Circuit c = read_deck("npn_degenerated");
    auto m = find_mirrors(c).at(0);
    REQUIRE(m.reference_degeneration.at(0).has_value());
    CHECK(c.devices()[*m.reference_degeneration[0]].name == "r1");
    REQUIRE(m.outputs.at(0).degeneration.at(0).has_value());
    CHECK(c.devices()[*m.outputs[0].degeneration[0]].name == "r2");

    Circuit w = read_deck("pmos_widlar");
    auto widlar = find_mirrors(w).at(0);
    CHECK_FALSE(widlar.reference_degeneration.at(0).has_value());
    CHECK(w.devices()[widlar.outputs.at(0).degeneration.at(0).value()].name == "r2");

    Circuit s = read_deck("nmos_cascode");
    auto cascode = find_mirrors(s).at(0);
    for (const auto& r : cascode.outputs.at(0).degeneration) CHECK_FALSE(r.has_value());
}

TEST_CASE("several outputs of one reference form one mirror") {
    Circuit c = read_deck("pnp_simple");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    CHECK(mirrors[0].outputs.size() == 2);
    CHECK(mirrors[0].id == "pnp-simple:q2");
}

TEST_CASE("a mirror inside a subcircuit instantiated twice gives two mirrors with ngspice's names") {
    Circuit c = read_deck("subckt_twice");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 2);
    for (std::size_t i = 0; i < 2; ++i) {
        std::string x = "x" + std::to_string(i + 1);
        CAPTURE(x);
        CHECK(mirror_family_label(mirrors[i]) == "nmos-simple");
        CHECK(names(c, mirrors[i].reference) == std::vector<std::string>{"m." + x + ".m1"});
        CHECK(mirrors[i].reference_node == "r" + std::to_string(i + 1));
        REQUIRE(mirrors[i].outputs.size() == 1);
        CHECK(names(c, mirrors[i].outputs[0].devices) == std::vector<std::string>{"m." + x + ".m2"});
        CHECK(mirrors[i].outputs[0].node == "o" + std::to_string(i + 1));
        CHECK(mirrors[i].outputs[0].design_ratio.value() == doctest::Approx(2.0));
        CHECK(mirrors[i].id == "nmos-simple:m." + x + ".m2");
    }
}

TEST_CASE("a reference at the top level and outputs inside subcircuits form one mirror") {
    Circuit c = read_deck("bias_distribution");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    const Mirror& m = mirrors[0];
    CHECK(mirror_family_label(m) == "pmos-simple");
    CHECK(names(c, m.reference) == std::vector<std::string>{"mref"});
    REQUIRE(m.outputs.size() == 2);
    CHECK(names(c, m.outputs[0].devices) == std::vector<std::string>{"m.xa.mo"});
    CHECK(names(c, m.outputs[1].devices) == std::vector<std::string>{"m.xb.mo"});
    CHECK(m.outputs[0].node == "oa");
    CHECK(m.outputs[1].design_ratio.value() == doctest::Approx(2.0));
}

TEST_CASE("transistors wrapped one per subcircuit are seen through") {
    Circuit c = read_deck("pdk_wrapped");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    const Mirror& m = mirrors[0];
    CHECK(mirror_family_label(m) == "nmos-cascode");
    CHECK(names(c, m.reference) == std::vector<std::string>{"m.xbias.xm1.m0", "m.xbias.xm3.m0"});
    CHECK(m.reference_node == "ref");
    REQUIRE(m.outputs.size() == 1);
    CHECK(names(c, m.outputs[0].devices) == std::vector<std::string>{"m.xbias.xm2.m0", "m.xbias.xm4.m0"});
    CHECK(m.outputs[0].node == "out");
    CHECK(m.outputs[0].design_ratio.value() == doctest::Approx(3.0));
}

TEST_CASE("bipolar lines with a substrate node are read the same") {
    Circuit c = read_deck("npn_substrate");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    check_mirror(c, mirrors[0], "npn", {"simple", {1}, "ref", {{"out", {2}, 3.0}}});
}

TEST_CASE("outputs of one reference in different families form one mirror per family") {
    Circuit c = read_deck("mixed_outputs");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 3);
    check_mirror(c, mirrors[0], "nmos", {"simple", {1}, "ref", {{"o2", {2}, 1.0}, {"o6", {6}, 0.5}}});
    check_mirror(c, mirrors[1], "nmos", {"widlar", {1}, "ref", {{"o3", {3}, 3.0}}});
    check_mirror(c, mirrors[2], "nmos", {"wide-swing-cascode", {1}, "ref", {{"o5", {4, 5}, 2.0}}});
}

TEST_CASE("a five-transistor OTA has a tail mirror and a load mirror, and the pair is in neither") {
    Circuit c = read_deck("ota_5t");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 2);
    check_mirror(c, mirrors[0], "nmos", {"simple", {5}, "bias", {{"tail", {6}, 2.0}}});
    check_mirror(c, mirrors[1], "pmos", {"simple", {3}, "d1", {{"out", {4}, 1.0}}});
}

TEST_CASE("a follower driven by a signal is not a cascode on the mirror output below it") {
    Circuit c = read_deck("follower_on_sink");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    check_mirror(c, mirrors[0], "nmos", {"simple", {1}, "ref", {{"out", {2}, 1.0}}});
}

TEST_CASE("transistors that mirror nothing but stand on a fixed gate voltage are current sources; an amplifier device is not") {
    Circuit c = read_deck("stacks");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 2);
    check_mirror(c, mirrors[0], "pmos", {"current-source", {}, "", {{"out1", {1}, std::nullopt}}});
    check_mirror(c, mirrors[1], "nmos", {"current-source", {}, "", {{"out3", {3}, std::nullopt}}});
    CHECK(mirrors[0].id == "pmos-current-source:m1");
}

TEST_CASE("small access resistors inside one-transistor wrappers are read as wires") {
    Circuit c = read_deck("pdk_parasitic");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    const Mirror& m = mirrors[0];
    CHECK(mirror_family_label(m) == "nmos-cascode");
    CHECK(names(c, m.reference) == std::vector<std::string>{"m.xbias.xm1.m0", "m.xbias.xm3.m0"});
    CHECK(m.reference_node == "ref");
    REQUIRE(m.outputs.size() == 1);
    CHECK(names(c, m.outputs[0].devices) == std::vector<std::string>{"m.xbias.xm2.m0", "m.xbias.xm4.m0"});
    CHECK(m.outputs[0].node == "out");
    CHECK_FALSE(m.outputs[0].degeneration[0].has_value());
}

TEST_CASE("a real resistor in a one-transistor cell stays a degeneration resistor") {
    Circuit c = read_deck("cell_degenerated");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    CHECK(mirror_family_label(mirrors[0]) == "pnp-degenerated");
    CHECK(names(c, mirrors[0].reference) == std::vector<std::string>{"q.xq1.q0"});
    CHECK(names(c, {mirrors[0].reference_degeneration.at(0).value()}) == std::vector<std::string>{"r.xq1.re"});
    CHECK(mirrors[0].outputs.at(0).node == "out");
}

TEST_CASE("circuits without mirrors give none") {
    for (const std::string deck :
         {"diff_pair", "inverter_chain", "cs_amp", "cs_diode_load", "source_follower", "ce_amp"}) {
        CAPTURE(deck);
        Circuit c = read_deck(deck);
        auto mirrors = find_mirrors(c);
        CHECK(mirrors.empty());
        for (const auto& m : mirrors) MESSAGE(m.id);
    }
}

TEST_CASE("a device from a mirror output to the supply is a follower even with its gate on a DC source") {
    // m3's gate is held by a quiet source (a bias by the rules), but its drain is the supply.
    Circuit c = read_text_deck(
        "vdd vdd 0 dc 3.3\niref vdd ref 20u\nvin in 0 dc 2\n"
        "m1 ref ref 0 0 nch w=10u l=1u\nm2 out ref 0 0 nch w=10u l=1u\nm3 vdd in out 0 nch w=10u l=1u\n");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    check_mirror(c, mirrors[0], "nmos", {"simple", {1}, "ref", {{"out", {2}, 1.0}}});
}

TEST_CASE("a cascode whose drain is held by its own probe source is still a cascode") {
    // vout holds only out: a rail, but not a supply.
    Circuit c = read_text_deck(
        "vdd vdd 0 dc 3.3\nvb b 0 dc 1.2\nvout out 0 dc 2\nr1 vdd g 100k\nr2 g 0 30k\n"
        "m1 mid g 0 0 nch w=10u l=1u\nm2 out b mid 0 nch w=10u l=1u\n");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    check_mirror(c, mirrors[0], "nmos", {"current-source", {}, "", {{"out", {1, 2}, std::nullopt}}});
}

TEST_CASE("a cascode on a bias is stacked through a fold node that carries another branch; a pair is not") {
    // x carries m1's drain, the input device m5 and the cascode m2; tail carries two sources.
    Circuit c = read_text_deck(
        "vdd vdd 0 dc 3.3\nvbp vbp 0 dc 2.5\nvcp vcp 0 dc 1.8\nvin in 0 dc 1.5 ac 1\n"
        "m1 x vbp vdd vdd pch w=10u l=1u\nm2 a vcp x vdd pch w=10u l=1u\nm5 x in t 0 nch w=10u l=1u\n"
        "r5 t 0 20k\nra a 0 50k\n"
        "vb nb 0 dc 0.8\nm6 tail nb 0 0 nch w=10u l=1u\nm7 d7 in tail 0 nch w=10u l=1u\n"
        "m8 d8 in tail 0 nch w=10u l=1u\nr7 vdd d7 10k\nr8 vdd d8 10k\n");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 2);
    check_mirror(c, mirrors[0], "pmos", {"current-source", {}, "", {{"a", {1, 2}, std::nullopt}}});
    check_mirror(c, mirrors[1], "nmos", {"current-source", {}, "", {{"tail", {6}, std::nullopt}}});
}

TEST_CASE("a divider between two rails is a fixed gate voltage; a resistor to a signal net is not") {
    Circuit c = read_text_deck(
        "vcc vcc 0 dc 5\nr1 vcc b 30k\nr2 b 0 10k\nq1 o1 b e1 qn\nre e1 0 1k\nro1 vcc o1 5k\n"
        "vin in 0 dc 1 ac 1\nr3 in b2 10k\nr4 b2 0 10k\nq2 o2 b2 0 qn\nro2 vcc o2 5k\n"
        "r5 vcc b3 10k\nr6 b3 vcc 10k\nq3 o3 b3 0 qn\nro3 vcc o3 5k\n");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 1);
    check_mirror(c, mirrors[0], "npn", {"current-source", {}, "", {{"o1", {1}, std::nullopt}}});
    REQUIRE(mirrors[0].outputs[0].degeneration[0].has_value());
    CHECK(c.devices()[*mirrors[0].outputs[0].degeneration[0]].name == "re");
}

TEST_CASE("a booster's load goes with its regulated cascode, not to the mirror on its gate line") {
    // mp6 shares the PMOS diode mp7's gate line with the output mp8, and comes first in the
    // netlist's nets: it is still the booster's load.
    Circuit c = mirrorcheck::read_circuit(std::string(MIRRORCHECK_TEST_DATA) + "/amplifiers/regulated_cascode.cir");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 2);
    const Mirror& pmos = mirrors[0].kind == "pmos" ? mirrors[0] : mirrors[1];
    const Mirror& reg = mirrors[0].kind == "pmos" ? mirrors[1] : mirrors[0];
    CHECK(mirror_family_label(reg) == "nmos-regulated-cascode");
    CHECK(names(c, reg.helpers) == std::vector<std::string>{"mn5"});
    CHECK(names(c, reg.helper_loads) == std::vector<std::string>{"mp6"});
    REQUIRE(pmos.outputs.size() == 1);
    CHECK(names(c, pmos.outputs[0].devices) == std::vector<std::string>{"mp8"});
}

TEST_CASE("the device feeding a Wilson's input is no booster load: a Wilson is not a regulated cascode") {
    // m1 (gated by the diode line g) drives m3's gate like a booster; its drain y is fed by
    // the PMOS mirror output mp2, which stays a mirror output.
    Circuit c = read_text_deck(
        "vdd vdd 0 dc 3.3\nrp pg 0 130k\nmp1 pg pg vdd vdd pch w=10u l=1u\nmp2 y pg vdd vdd pch w=10u l=1u\n"
        "m1 y g 0 0 nch w=10u l=1u\nm2 g g 0 0 nch w=10u l=1u\nm3 out y g 0 nch w=10u l=1u\nvout out 0 dc 2\n");
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 2);
    std::vector<std::string> labels;
    for (const auto& m : mirrors) labels.push_back(m.id);
    std::sort(labels.begin(), labels.end());
    CHECK(labels == std::vector<std::string>{"nmos-wilson:m3", "pmos-simple:mp2"});
    for (const auto& m : mirrors) CHECK(m.helper_loads.empty());
}

TEST_CASE("family names") {
    CHECK(mirrorcheck::to_string(Family::wide_swing_cascode) == "wide-swing-cascode");
    CHECK(mirrorcheck::to_string(Family::improved_wilson) == "improved-wilson");
    CHECK(mirrorcheck::to_string(Family::beta_helper) == "beta-helper");
    CHECK(mirrorcheck::to_string(Family::current_source) == "current-source");
    Mirror m;
    m.kind = "npn";
    m.family = Family::wilson;
    CHECK(mirror_family_label(m) == "npn-wilson");
}

TEST_CASE("a circuit of 10000 transistors: every mirror is found, with its family") {
    mirrorcheck::test::BlockBuilder b;
    for (std::size_t i = 0; i < 625; ++i) b.block(i);
    const Circuit& c = b.circuit;
    REQUIRE(c.devices().size() == 10000);
    auto mirrors = find_mirrors(c);
    REQUIRE(mirrors.size() == 2500);
    std::map<std::string, std::size_t> by_family;
    for (const auto& m : mirrors) ++by_family[mirror_family_label(m) + "/" + std::to_string(m.outputs.size())];
    CHECK(by_family == std::map<std::string, std::size_t>{{"nmos-cascode/1", 625},
                                                          {"nmos-wilson/1", 625},
                                                          {"nmos-simple/2", 625},
                                                          {"nmos-regulated-cascode/1", 625}});
    auto last = std::find_if(mirrors.begin(), mirrors.end(), [](const Mirror& m) { return m.id == "nmos-wilson:mw3_624"; });
    REQUIRE(last != mirrors.end());
    CHECK(names(c, last->reference) == std::vector<std::string>{"mw1_624"});
    CHECK(names(c, last->outputs.at(0).devices) == std::vector<std::string>{"mw2_624", "mw3_624"});
}
