// The exact small-signal solve against ngspice on current mirrors built from the open-PDK
// model cards of the shared corpus, read in place: SKY130 (BSIM4 with rbodymod = 1, its five
// body resistors and gbmin) and GF180MCU (3.3 V BSIM4, binned, with impact ionisation at
// high Vds). Each deck is ours, written for the test; ngspice runs it with `op` (saving
// what a review deck saves), then `.tf` and a one-point AC analysis at 1 Hz per probe. The
// linearised resistance must match ngspice's AC value at 1 Hz (real part) and `.tf` within
// 1e-6, or within the range the solve states for what the op data leaves open (the
// impact-ionisation slopes) widened by 1e-6. Every expected value is ngspice's.
//
// The decks use plain `w= l= nf= m=` values on the X lines (the netlist reader does not yet
// take a line's own parameters inside its other expressions).
#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "src/analyse/linearise.hpp"
#include "support/probe_simulation.hpp"

using namespace mirrorcheck;

namespace {

constexpr double tolerance = 1e-6;

const std::filesystem::path corpus = std::filesystem::path(MIRRORCHECK_SOURCE_DIR) / ".." / "shared" / "corpus";

bool corpus_present(const char* kit) {
    if (std::filesystem::exists(corpus / kit)) return true;
    MESSAGE("skipped: no " << (corpus / kit).string());
    return false;
}

std::string sky130_header(const std::string& title) {
    const std::string dir = (corpus / "sky130").string();
    return "* " + title + "\n.option scale=1.0u\n.include \"" + dir + "/models/parameters/lod.spice\"\n.include \"" + dir +
           "/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__tt.corner.spice\"\n.include \"" + dir +
           "/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__mismatch.corner.spice\"\n.include \"" + dir +
           "/cells/pfet_01v8/sky130_fd_pr__pfet_01v8__tt.corner.spice\"\n.include \"" + dir +
           "/cells/pfet_01v8/sky130_fd_pr__pfet_01v8__mismatch.corner.spice\"\n";
}

std::string gf180_header(const std::string& title) {
    const std::string dir = (corpus / "gf180mcu").string();
    return "* " + title + "\n.include \"" + dir + "/design.ngspice\"\n.lib \"" + dir +
           "/sm141064.ngspice\" typical\n.param sw_stat_mismatch=0\n";
}

// The worst relative difference seen per family, printed at the end of each case.
double relative(double a, double b) { return a / b - 1; }

// Checks each probe's linearised value against ngspice; returns the worst relative
// difference against AC and .tf.
double check(const test::ProbeSimulation& sim, const std::vector<std::string>& nodes,
             const std::vector<std::string>& probes) {
    LinearisedSolve solve = compute_linearised_impedances(sim.circuit, sim.op, nodes);
    for (const auto& n : solve.notes) MESSAGE("note: " << n.text);
    double worst = 0;
    for (std::size_t k = 0; k < nodes.size(); ++k) {
        const LinearisedImpedance& r = solve.outputs[k];
        const test::ProbeAnswer& ng = sim.probes.at(probes[k]);
        REQUIRE_MESSAGE(r.resistance, r.note);
        CHECK(r.scope == "whole circuit");
        const double z = *r.resistance;
        const double lo = r.resistance_low.value_or(z), hi = r.resistance_high.value_or(z);
        MESSAGE(r.node << ": linearised " << z << " ohm (range " << lo << " .. " << hi << "); ngspice ac "
                       << ng.ac.real() << " (" << relative(z, ng.ac.real()) << "), tf " << ng.tf << " ("
                       << relative(z, ng.tf) << ")");
        for (double reference : {ng.ac.real(), ng.tf}) {
            CHECK(reference >= lo * (1 - tolerance));
            CHECK(reference <= hi * (1 + tolerance));
            worst = std::max(worst, std::abs(relative(z, reference)));
        }
    }
    return worst;
}

}  // namespace

const char* nfet = "sky130_fd_pr__nfet_01v8";
const char* pfet = "sky130_fd_pr__pfet_01v8";

std::string x(const std::string& name, const std::string& d, const std::string& g, const std::string& s,
              const std::string& b, const std::string& kind, const std::string& size) {
    return name + " " + d + " " + g + " " + s + " " + b + " " + kind + " " + size + "\n";
}

TEST_CASE("sky130 NMOS mirror 1:4 (m=2 on the X line, nf > 1), rbodymod = 1") {
    if (!corpus_present("sky130")) return;
    auto sim = test::simulate_probes(sky130_header("sky130 simple mirror") + "vdd vdd 0 1.8\niref vdd nref 10u\n" +
                                         x("xm1", "nref", "nref", "0", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm2", "out", "nref", "0", "0", nfet, "w=20 l=1 nf=4 m=2") +
                                         "vout out 0 dc 0.9 ac 0\n",
                                     {"vout"});
    MESSAGE("worst " << check(sim, {"out"}, {"vout"}));
}

TEST_CASE("sky130 NMOS cascode, stacked diode reference; and a PMOS mirror feeding it") {
    if (!corpus_present("sky130")) return;
    auto sim = test::simulate_probes(sky130_header("sky130 cascode") + "vdd vdd 0 1.8\niref vdd g2 10u\n" +
                                         x("xm4", "g2", "g2", "g1", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm3", "g1", "g1", "0", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm1", "mid", "g1", "0", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm2", "out", "g2", "mid", "0", nfet, "w=10 l=1 nf=2") +
                                         "vout out 0 dc 1.3 ac 0\n"
                                         "iref2 pg 0 10u\n" +
                                         x("xm5", "pg", "pg", "vdd", "vdd", pfet, "w=10 l=1") +
                                         x("xm6", "pout", "pg", "vdd", "vdd", pfet, "w=10 l=1 m=3") +
                                         "vpout pout 0 dc 0.6 ac 0\n",
                                     {"vout", "vpout"});
    MESSAGE("worst " << check(sim, {"out", "pout"}, {"vout", "vpout"}));
}

TEST_CASE("sky130 wide-swing NMOS cascode: the cascode gates from a separate bias diode") {
    if (!corpus_present("sky130")) return;
    auto sim = test::simulate_probes(sky130_header("sky130 wide-swing cascode") +
                                         "vdd vdd 0 1.8\niref vdd g1 10u\nibias vdd vb 10u\n" +
                                         x("xm5", "vb", "vb", "0", "0", nfet, "w=2 l=1") +
                                         x("xm4", "g1", "vb", "r1", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm3", "r1", "g1", "0", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm1", "mid", "g1", "0", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm2", "out", "vb", "mid", "0", nfet, "w=10 l=1 nf=2") +
                                         "vout out 0 dc 0.8 ac 0\n",
                                     {"vout"});
    MESSAGE("worst " << check(sim, {"out"}, {"vout"}));
}

TEST_CASE("sky130 NMOS and PMOS Wilson mirrors") {
    if (!corpus_present("sky130")) return;
    auto sim = test::simulate_probes(sky130_header("sky130 wilson") + "vdd vdd 0 1.8\niref vdd x 10u\n" +
                                         x("xm1", "x", "y", "0", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm2", "y", "y", "0", "0", nfet, "w=10 l=1 nf=2") +
                                         x("xm3", "out", "x", "y", "0", nfet, "w=10 l=1 nf=2") +
                                         "vout out 0 dc 1.4 ac 0\n"
                                         "iref2 px 0 10u\n" +
                                         x("xm4", "px", "py", "vdd", "vdd", pfet, "w=10 l=1") +
                                         x("xm5", "py", "py", "vdd", "vdd", pfet, "w=10 l=1") +
                                         x("xm6", "pout", "px", "py", "vdd", pfet, "w=10 l=1") +
                                         "vpout pout 0 dc 0.3 ac 0\n",
                                     {"vout", "vpout"});
    MESSAGE("worst " << check(sim, {"out", "pout"}, {"vout", "vpout"}));
}

TEST_CASE("gf180 NMOS mirror 1:2 of binned M instances, PMOS mirror of X instances (the corpus deck's shape)") {
    if (!corpus_present("gf180mcu")) return;
    auto sim = test::simulate_probes(gf180_header("gf180 simple mirrors") +
                                         "vdd vdd 0 3.3\niref vdd nref 20u\n"
                                         "m1 nref nref 0 0 nmos_3p3 w=10u l=1u\nm2 pd nref 0 0 nmos_3p3 w=10u l=1u m=2\n"
                                         "xm3 pd pd vdd vdd pmos_3p3 w=20u l=1u\nxm4 out pd vdd vdd pmos_3p3 w=20u l=1u\n"
                                         "vout out 0 dc 1.5 ac 0\n",
                                     {"vout"});
    MESSAGE("worst " << check(sim, {"out"}, {"vout"}));
}

TEST_CASE("gf180 NMOS cascode and PMOS cascode (X instances, nf = 2)") {
    if (!corpus_present("gf180mcu")) return;
    auto sim = test::simulate_probes(gf180_header("gf180 cascodes") +
                                         "vdd vdd 0 3.3\niref vdd g2 20u\n"
                                         "m4 g2 g2 g1 0 nmos_3p3 w=10u l=1u\nm3 g1 g1 0 0 nmos_3p3 w=10u l=1u\n"
                                         "m1 mid g1 0 0 nmos_3p3 w=10u l=1u\nm2 out g2 mid 0 nmos_3p3 w=10u l=1u\n"
                                         "vout out 0 dc 2.0 ac 0\n"
                                         "iref2 p2 0 20u\n"
                                         "xm8 p2 p2 p1 vdd pmos_3p3 w=20u l=1u nf=2\nxm7 p1 p1 vdd vdd pmos_3p3 w=20u l=1u nf=2\n"
                                         "xm5 pmid p1 vdd vdd pmos_3p3 w=20u l=1u nf=2\nxm6 pout p2 pmid vdd pmos_3p3 w=20u l=1u nf=2\n"
                                         "vpout pout 0 dc 1.2 ac 0\n",
                                     {"vout", "vpout"});
    MESSAGE("worst " << check(sim, {"out", "pout"}, {"vout", "vpout"}));
}

TEST_CASE("gf180 NMOS Wilson at 3.3 V, the output at high Vds (impact ionisation)") {
    if (!corpus_present("gf180mcu")) return;
    auto sim = test::simulate_probes(gf180_header("gf180 wilson") +
                                         "vdd vdd 0 3.3\niref vdd x 20u\n"
                                         "m1 x y 0 0 nmos_3p3 w=10u l=1u\nm2 y y 0 0 nmos_3p3 w=10u l=1u\n"
                                         "m3 out x y 0 nmos_3p3 w=10u l=1u\nvout out 0 dc 3.3 ac 0\n",
                                     {"vout"});
    MESSAGE("worst " << check(sim, {"out"}, {"vout"}));
    // Isub computed from the model card (binning, Leff, Vdseff, the SCBE factor) against ngspice's.
    for (const char* name : {"m1", "m3"}) {
        OpPoint without_isub = sim.op;
        without_isub.devices.at(name).values.erase("isub");
        CAPTURE(name);
        // (the comparison of the isub values themselves is in test_bulk_currents)
    }
}
