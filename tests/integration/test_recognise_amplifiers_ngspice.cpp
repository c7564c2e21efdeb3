// Recognition inside amplifiers and bias loops, against ngspice. The decks of
// tests/data/amplifiers (ngspice's built-in models, ground truth in each header and in the
// README there) and their planted-fault twins: find_mirrors must return exactly the
// ground-truth groups (family, reference, reference node, output nodes and devices,
// helpers, booster loads) and nothing else; ngspice's operating point, read back through the
// project's raw reader, must put each deck's devices in the state its header says.
//
// Health, as the headers state it: MOS saturated with vds - vdsat > 0.1 V (ngspice's own
// vdsat); bipolar forward-active with vce - 0.2 V > 0.1 V and the collector junction not
// forward biased by more than 0.4 V (0.2 V saturation voltage and 0.4 V junction limit:
// common practice, no source); currents Id (Ic) of the bottom output device over the bottom
// reference device within 5 % of the design ratio (Widlar outputs excepted: their ratio is
// set by the resistor).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "parsers/raw/raw.hpp"
#include "src/model/circuit_build.hpp"
#include "src/model/op_point_build.hpp"
#include "src/recognise/find_mirrors.hpp"
#include "support/ngspice_run.hpp"
#include "support/probe_simulation.hpp"

using namespace mirrorcheck;

namespace {

std::filesystem::path deck_path(const std::string& name) {
    return std::filesystem::path(MIRRORCHECK_TEST_DATA) / "amplifiers" / (name + ".cir");
}

// One group of the ground truth, written as the deck's header writes it.
struct Group {
    std::string label;  // "nmos-simple", "pmos-current-source", ...
    std::vector<std::string> reference;
    std::string reference_node;
    std::vector<std::pair<std::string, std::vector<std::string>>> outputs;  // node, devices bottom to top
    std::vector<std::string> helpers = {};
    std::vector<std::string> helper_loads = {};
};

// What the fault twin plants: devices pushed out of saturation, or an output whose ratio
// is off by more than 5 %.
struct Fault {
    std::vector<std::string> unsaturated;
    std::vector<std::string> ratio_outputs;  // output nodes; empty when the fault is a region
};

struct Deck {
    std::string name;
    std::vector<Group> truth;
    Fault fault;
};

const std::vector<Deck>& decks() {
    static const std::vector<Deck> all = {
        {"ota_5t",
         {{"nmos-simple", {"mn5"}, "bias", {{"tail", {"mn6"}}}}, {"pmos-simple", {"mp3"}, "d1", {{"out", {"mp4"}}}}},
         {{"mn6"}, {}}},
        {"miller_two_stage",
         {{"nmos-simple", {"mn5"}, "bias", {{"tail", {"mn6"}}, {"out", {"mn8"}}}},
          {"pmos-simple", {"mp3"}, "d1", {{"d2", {"mp4"}}}}},
         {{"mn6"}, {}}},
        {"folded_cascode",
         {{"nmos-simple", {"mn12"}, "bias", {{"tail", {"mn11"}}}},
          {"nmos-wide-swing-cascode", {"mn9", "mn7"}, "a", {{"out", {"mn10", "mn8"}}}},
          {"pmos-current-source", {}, "", {{"a", {"mp3", "mp5"}}}},
          {"pmos-current-source", {}, "", {{"out", {"mp4", "mp6"}}}}},
         {{"mp3", "mp4"}, {}}},
        {"bjt_diff_pair", {{"npn-current-source", {}, "", {{"tail", {"q3"}}}}}, {{"q3"}, {}}},
        {"ptat_core",
         {{"npn-widlar", {"q1"}, "n1", {{"p", {"q2"}}}},
          {"npn-simple", {"q1"}, "n1", {{"su", {"q6"}}}},
          {"pnp-simple", {"q3"}, "p", {{"n1", {"q4"}}, {"out", {"q5"}}}}},
         {{"q5"}, {}}},
        {"constant_gm",
         {{"nmos-widlar", {"mn1"}, "n1", {{"p", {"mn2"}}}},
          {"nmos-simple", {"mn1"}, "n1", {{"su", {"mn6"}}}},
          {"pmos-simple", {"mp3"}, "p", {{"n1", {"mp4"}}, {"out", {"mp5"}}}}},
         {{}, {"n1", "out"}}},
        {"beta_helper_bias",
         {{"npn-beta-helper", {"q1"}, "x", {{"o1", {"q2"}}, {"o2", {"q3"}}}, {"q7"}},
          {"pnp-simple", {"q4"}, "o1", {{"o3", {"q5"}}}}},
         {{"q3"}, {}}},
        {"source_followers", {{"nmos-simple", {"mn1"}, "ref", {{"s1", {"mn2"}}, {"s2", {"mn3"}}}}}, {{"mn2"}, {}}},
        {"regulated_cascode",
         {{"nmos-regulated-cascode", {"mn1"}, "ref", {{"out", {"mn2", "mn4"}}}, {"mn5"}, {"mp6"}},
          {"pmos-simple", {"mp7"}, "pb", {{"ref", {"mp8"}}}}},
         {{"mn4"}, {}}},
    };
    return all;
}

std::vector<std::string> names(const Circuit& c, const std::vector<std::size_t>& devices) {
    std::vector<std::string> out;
    for (std::size_t d : devices) out.push_back(c.devices()[d].name);
    return out;
}

// One line per group, so that a difference shows which group is wrong.
std::string describe(const Group& g) {
    auto join = [](const std::vector<std::string>& v) {
        std::string s;
        for (const auto& x : v) s += (s.empty() ? "" : ",") + x;
        return s;
    };
    std::string s = g.label + " ref[" + join(g.reference) + "]@" + g.reference_node;
    for (const auto& [node, devices] : g.outputs) s += " out " + node + "[" + join(devices) + "]";
    return s + " helpers[" + join(g.helpers) + "] loads[" + join(g.helper_loads) + "]";
}

Group found_group(const Circuit& c, const Mirror& m) {
    Group g{mirror_family_label(m), names(c, m.reference), m.reference_node, {}, names(c, m.helpers),
            names(c, m.helper_loads)};
    for (const auto& o : m.outputs) g.outputs.emplace_back(o.node, names(c, o.devices));
    return g;
}

std::vector<std::string> sorted_descriptions(const std::vector<Group>& groups) {
    std::vector<std::string> out;
    for (const auto& g : groups) out.push_back(describe(g));
    std::sort(out.begin(), out.end());
    return out;
}

// Every device a deck's ground truth names.
std::vector<std::string> truth_devices(const Deck& deck) {
    std::vector<std::string> out;
    for (const auto& g : deck.truth) {
        for (const auto* list : {&g.reference, &g.helpers, &g.helper_loads}) out.insert(out.end(), list->begin(), list->end());
        for (const auto& o : g.outputs) out.insert(out.end(), o.second.begin(), o.second.end());
    }
    return out;
}

// The deck run with `op` by ngspice, every transistor quantity saved, read back.
struct Simulated {
    Circuit circuit;
    OpPoint op;
};

Simulated simulate(const std::filesystem::path& path) {
    Circuit plain = read_circuit(path);
    std::string text = test::read_text(path);
    text = text.substr(0, text.rfind(".end")) + ".control\n" + test::save_everything(plain) +
           "op\nwrite run.raw\nquit 0\n.endc\n.end\n";
    auto run = test::run_ngspice(text, "mc-amplifiers");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    Simulated s{read_circuit(run.file("deck.cir")), {}};
    raw::RawFile file = raw::read_raw(run.file("run.raw"));
    REQUIRE(file.plots.size() == 1);
    s.op = build_op_point(s.circuit, file, file.plots[0]);
    return s;
}

double get(const OpPoint& op, const std::string& device, const char* quantity) {
    const DeviceOp* d = op.device(device);
    REQUIRE_MESSAGE(d, device);
    auto v = d->get(quantity);
    REQUIRE_MESSAGE(v.has_value(), device << " " << quantity);
    return *v;
}

bool bipolar(const Circuit& c, const std::string& device) {
    const Device* d = c.find_device(device);
    REQUIRE(d);
    return d->kind == DeviceKind::bjt;
}

// Saturation margin of a MOS (vds - vdsat), or of a bipolar transistor (vce - 0.2 V, taken
// as negative when the collector junction is forward biased by more than 0.4 V).
double margin(const Simulated& s, const std::string& device) {
    if (!bipolar(s.circuit, device)) return get(s.op, device, "vds") - get(s.op, device, "vdsat");
    const double vbe = get(s.op, device, "vbe"), vbc = get(s.op, device, "vbc");
    if (vbc > 0.4) return -vbc;
    return vbe - vbc - 0.2;
}

double current(const Simulated& s, const std::string& device) {
    return std::abs(get(s.op, device, bipolar(s.circuit, device) ? "ic" : "id"));
}

// Per output with a design ratio the mirror's ratio follows: measured over design, less 1.
std::vector<std::pair<std::string, double>> ratio_errors(const Simulated& s) {
    std::vector<std::pair<std::string, double>> out;
    for (const Mirror& m : find_mirrors(s.circuit)) {
        if (m.family == Family::widlar || m.reference.empty()) continue;
        const std::string ref = s.circuit.devices()[m.reference.front()].name;
        for (const auto& o : m.outputs) {
            const std::string bottom = s.circuit.devices()[o.devices.front()].name;
            out.emplace_back(o.node, current(s, bottom) / current(s, ref) / o.design_ratio.value() - 1.0);
        }
    }
    return out;
}

}  // namespace

TEST_CASE("every amplifier deck and its fault twin: exactly the ground-truth mirrors and current sources") {
    for (const Deck& deck : decks()) {
        for (const std::string& name : {deck.name, deck.name + "_fault"}) {
            CAPTURE(name);
            Circuit c = read_circuit(deck_path(name));
            std::vector<Group> found;
            for (const Mirror& m : find_mirrors(c)) found.push_back(found_group(c, m));
            CHECK(sorted_descriptions(found) == sorted_descriptions(deck.truth));
        }
    }
}

TEST_CASE("ngspice: every ground-truth device of a healthy deck saturated with margin, ratios within 5 %") {
    for (const Deck& deck : decks()) {
        CAPTURE(deck.name);
        Simulated s = simulate(deck_path(deck.name));
        for (const auto& d : truth_devices(deck)) {
            CAPTURE(d);
            CHECK(current(s, d) > 1e-6);
            CHECK(margin(s, d) > 0.1);
        }
        for (const auto& [node, error] : ratio_errors(s)) {
            CAPTURE(node);
            CHECK(std::abs(error) < 0.05);
        }
    }
}

TEST_CASE("ngspice: each fault twin holds the fault its header names, and only that one") {
    for (const Deck& deck : decks()) {
        CAPTURE(deck.name);
        Simulated s = simulate(deck_path(deck.name + "_fault"));
        for (const auto& d : truth_devices(deck)) {
            CAPTURE(d);
            const bool planted = std::find(deck.fault.unsaturated.begin(), deck.fault.unsaturated.end(), d) !=
                                 deck.fault.unsaturated.end();
            if (planted)
                CHECK(margin(s, d) < 0.0);
            else
                CHECK(margin(s, d) > 0.1);
        }
        for (const auto& [node, error] : ratio_errors(s)) {
            CAPTURE(node);
            const auto& named = deck.fault.ratio_outputs;
            if (std::find(named.begin(), named.end(), node) != named.end())
                CHECK(std::abs(error) > 0.05);
            else if (deck.fault.unsaturated.empty())
                CHECK(std::abs(error) < 0.05);
        }
    }
}
