// The mirror's own output resistance (src/analyse/own_resistance.cpp) against ngspice, on
// mirrors that sit inside circuits: an OTA's active load and tail, a Wilson fed by another
// mirror and loaded, a regulated cascode whose booster has a current-source load.
//
// For each, `mirrorcheck run` reviews the circuit as it is; then the test writes the
// testbench of the mirror alone from what the review says it solved (its devices, copied
// line for line from the deck, every net it held driven by a voltage source at its
// operating voltage, the reference fed by an ideal current source carrying the reference
// current of the operating point, the output held by a probe at its voltage) and ngspice's
// `.tf` of that testbench gives the reference value. The operating point of the testbench
// is the circuit's, so the two are the same small-signal network: within 1e-5.
#include <cmath>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "parsers/common/text.hpp"
#include "parsers/raw/raw.hpp"
#include "support/ngspice_run.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

using nlohmann::json;
namespace test = mirrorcheck::test;

const char* models =
    ".model nch nmos level=1 vto=0.5 kp=200u lambda=0.05 gamma=0.4 phi=0.7\n"
    ".model pch pmos level=1 vto=-0.5 kp=80u lambda=0.08 gamma=0.4 phi=0.7\n";

struct Case {
    const char* name;
    std::string deck;          // without .end
    std::string node;          // the output checked
    std::string family;        // of the mirror driving it
    std::string feed;          // the reference's ideal source: "{ref}" and "{i}" filled in
    std::string feed_current;  // the vector holding the reference current at the op
};

// The first token of each element line, lower case, and the line.
std::map<std::string, std::string> element_lines(const std::string& deck) {
    std::map<std::string, std::string> lines;
    std::istringstream in(deck);
    std::string line;
    while (std::getline(in, line)) {
        if (line.empty() || line[0] == '*' || line[0] == '.') continue;
        lines[mirrorcheck::to_lower(line.substr(0, line.find(' ')))] = line;
    }
    return lines;
}

const json* output_of(const json& report, const std::string& node, const std::string& family) {
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"])
            if (o["node"] == node && m["family"] == family) return &o;
    return nullptr;
}

const json* mirror_of(const json& report, const std::string& node, const std::string& family) {
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"])
            if (o["node"] == node && m["family"] == family) return &m;
    return nullptr;
}

double value(const mirrorcheck::raw::RawFile& raw, const std::string& vector) {
    for (const auto& plot : raw.plots)
        if (auto k = plot.find(vector)) return plot.real[*k][0];
    FAIL("no vector " << vector);
    return 0;
}

// ngspice's Rout of the mirror alone, built from what the review solved.
double alone_by_ngspice(const Case& c, const json& report) {
    const json* out = output_of(report, c.node, c.family);
    const json* mirror = mirror_of(report, c.node, c.family);
    REQUIRE(out);
    const json& rout = (*out)["rout"];
    // the circuit's operating point: every node voltage and the reference current
    auto op = test::run_ngspice(std::string("* op\n") + models + c.deck +
                                    ".control\nsave all " + c.feed_current + "\nop\nwrite op.raw\nquit 0\n.endc\n.end\n",
                                "mc-own-op");
    REQUIRE_MESSAGE(op.status == 0, op.output);
    const auto raw = mirrorcheck::raw::read_raw(op.file("op.raw"));
    auto v = [&](const std::string& net) { return value(raw, "v(" + net + ")"); };

    const auto lines = element_lines(c.deck);
    std::string bench = std::string("* ") + c.name + ": the mirror alone\n" + models;
    for (const auto& d : rout["own_devices"]) {
        auto it = lines.find(d.get<std::string>());
        REQUIRE_MESSAGE(it != lines.end(), d);
        bench += it->second + "\n";
    }
    int k = 0;
    for (const auto& net : rout["own_held"])
        bench += fmt::format("vheld{} {} 0 dc {:.17g}\n", k++, net.get<std::string>(), v(net.get<std::string>()));
    std::string feed = c.feed;
    const std::string ref = (*mirror)["reference_node"].is_string() ? (*mirror)["reference_node"].get<std::string>() : "";
    if (!ref.empty()) {
        feed.replace(feed.find("{ref}"), 5, ref);
        feed.replace(feed.find("{i}"), 3, fmt::format("{:.17g}", std::abs(value(raw, c.feed_current))));
        bench += feed + "\n";
    }
    bench += fmt::format("vprobe {} 0 dc {:.17g}\n", c.node, v(c.node));
    bench += ".control\nop\ntf v(" + c.node + ") vprobe\nwrite tf.raw\nquit 0\n.endc\n.end\n";
    auto tf = test::run_ngspice(bench, "mc-own-tf");
    REQUIRE_MESSAGE(tf.status == 0, tf.output << bench);
    return std::abs(value(mirrorcheck::raw::read_raw(tf.file("tf.raw")), "vprobe#input_impedance"));
}

json run_review(const Case& c) {
    const auto dir = test::make_temp_dir("mc-own-run");
    test::write_text(dir / "deck.cir", std::string("* ") + c.name + "\n" + models + c.deck + ".end\n");
    auto r = test::run_cli("run deck.cir --format json", dir);
    std::filesystem::remove_all(dir);
    REQUIRE_MESSAGE(r.status != 2, r.err);
    CHECK(test::report_schema_errors(r.out) == "");
    return json::parse(r.out);
}

const std::vector<Case> cases = {
    // A five-transistor OTA: the PMOS load's output `out` also carries m2's drain; the
    // tail's output carries the pair's sources.
    {"ota pmos load",
     "vdd vdd 0 1.8\nvinp inp 0 dc 0.9\nvinn inn 0 dc 0.9\niref vdd nb 20u\n"
     "m5 nb nb 0 0 nch w=4u l=1u\nm6 tail nb 0 0 nch w=8u l=1u\n"
     "m1 d1 inp tail 0 nch w=10u l=1u\nm2 out inn tail 0 nch w=10u l=1u\n"
     "m3 d1 d1 vdd vdd pch w=10u l=1u\nm4 out d1 vdd vdd pch w=10u l=1u\n",
     "out", "pmos-simple", "ialone {ref} 0 dc {i}", "@m1[id]"},
    {"ota tail",
     "vdd vdd 0 1.8\nvinp inp 0 dc 0.9\nvinn inn 0 dc 0.9\niref vdd nb 20u\n"
     "m5 nb nb 0 0 nch w=4u l=1u\nm6 tail nb 0 0 nch w=8u l=1u\n"
     "m1 d1 inp tail 0 nch w=10u l=1u\nm2 out inn tail 0 nch w=10u l=1u\n"
     "m3 d1 d1 vdd vdd pch w=10u l=1u\nm4 out d1 vdd vdd pch w=10u l=1u\n",
     "tail", "nmos-simple", "ialone vdd {ref} dc {i}", "@m5[id]"},
    // An NMOS Wilson whose reference comes from a PMOS mirror output, its output loaded by
    // a resistor and held by a source: the feedback through the reference node counts.
    {"wilson in a circuit",
     "vdd vdd 0 3\nibias pg 0 10u\nmp1 pg pg vdd vdd pch w=10u l=2u\nmp2 ref pg vdd vdd pch w=10u l=2u\n"
     "mw1 ref x 0 0 nch w=10u l=2u\nmw2 x x 0 0 nch w=10u l=2u\nmw3 wout ref x 0 nch w=10u l=2u\n"
     "rload wout vdd 500k\nvwout wout 0 dc 2\n",
     "wout", "nmos-wilson", "ialone vdd {ref} dc {i}", "@mw1[id]"},
    // A regulated cascode: the booster ma's gain is gm·(ro(ma) ∥ ro(mpl)), its load mpl
    // being part of the mirror alone.
    {"regulated cascode with a booster load",
     "vdd vdd 0 3\niref vdd nb 20u\nmb nb nb 0 0 nch w=10u l=2u\nm1 s1 nb 0 0 nch w=10u l=2u\n"
     "m2 out g2 s1 0 nch w=10u l=1u\nma g2 s1 0 0 nch w=4u l=1u\n"
     "ipb pb 0 5u\nmpb pb pb vdd vdd pch w=4u l=2u\nmpl g2 pb vdd vdd pch w=4u l=2u\nvout out 0 dc 2\n",
     "out", "nmos-regulated-cascode", "ialone vdd {ref} dc {i}", "@mb[id]"},
};

}  // namespace

TEST_CASE("the mirror's own output resistance equals ngspice's for the mirror alone") {
    for (const Case& c : cases) {
        CAPTURE(c.name);
        const json report = run_review(c);
        const json* out = output_of(report, c.node, c.family);
        REQUIRE_MESSAGE(out, "no " << c.family << " output at " << c.node);
        const json& rout = (*out)["rout"];
        REQUIRE(rout["own"].is_number());
        const double own = rout["own"].get<double>();
        CHECK(own == doctest::Approx(alone_by_ngspice(c, report)).epsilon(1e-5));
        // the reference node is fed (an ideal current), never held; nor is the output
        const json* mirror = mirror_of(report, c.node, c.family);
        for (const auto& net : rout["own_held"]) {
            CHECK(net != (*mirror)["reference_node"]);
            CHECK(net != c.node);
        }
        // in the circuit the node is loaded: the two quantities are reported apart
        REQUIRE(rout["linearised"].is_number());
        CHECK(rout["linearised"].get<double>() == doctest::Approx(rout["simulated"].get<double>()).epsilon(1e-3));
    }
}

TEST_CASE("the booster's load is part of the regulated cascode alone: without it the gain would be gm·ro") {
    const Case& c = cases.back();
    const json report = run_review(c);
    const json* out = output_of(report, c.node, c.family);
    REQUIRE(out);
    bool has_load = false;
    for (const auto& d : (*out)["rout"]["own_devices"]) has_load = has_load || d == "mpl";
    CHECK(has_load);
}
