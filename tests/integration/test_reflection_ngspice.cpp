// The reflection rule against ngspice: for a degenerated MOS device, a MOS cascode (level 1
// and BSIM4) and a degenerated bipolar device (base held stiff, and through a resistor),
// the rule evaluated with ngspice's own operating-point gm, gmb, gds (gpi, go) must give
// the resistance that ngspice's `.tf` reports at the drain or collector, within 1 %
// (HANDCALC.md section 1 calls the rule exact for the small-signal model).
#include <string>

#include <doctest/doctest.h>

#include "parsers/raw/raw.hpp"
#include "src/analyse/reflection.hpp"
#include "support/ngspice_run.hpp"

using namespace mirrorcheck;

namespace {

// Runs the circuit with `op` and `.tf i(vout) vout`, both plots written to one raw file.
struct TfRun {
    test::NgspiceRun run;
    raw::RawFile file;

    TfRun(const std::string& circuit, const std::string& saves) {
        run = test::run_ngspice("* reflection rule\n" + circuit + ".control\nsave all " + saves +
                                    "\nop\nwrite run.raw\nset appendwrite\ntf i(vout) vout\nwrite run.raw\nquit 0\n"
                                    ".endc\n.end\n",
                                "mc-reflect");
        REQUIRE_MESSAGE(run.status == 0, run.output);
        file = raw::read_raw(run.file("run.raw"));
        REQUIRE(file.plots.size() == 2);
    }

    double op(const std::string& vector) const {
        auto i = file.plots[0].find(vector);
        REQUIRE_MESSAGE(i, "missing " << vector);
        return file.plots[0].real[*i][0];
    }

    // The resistance the output source sees: the drain's (collector's) output resistance.
    double rout() const {
        auto i = file.plots[1].find("vout#input_impedance");
        REQUIRE(i);
        return file.plots[1].real[*i][0];
    }
};

const char* level1 = ".model nd nmos level=1 vto=0.5 kp=200u lambda=0.08 gamma=0.5 phi=0.7\n";
const char* bsim4 = ".model n4 nmos level=14 version=4.8.0\n";
const char* npn = ".model qd npn is=1e-16 bf=100 vaf=40\n";

}  // namespace

TEST_CASE("degenerated MOS, level 1: ro + (1 + (gm+gmb)ro)Rs, body effect included") {
    TfRun t(std::string(level1) + "vg g 0 1.2\nm1 out g s 0 nd w=4u l=1u\nrs s 0 5k\nvout out 0 dc 2.5\n",
            "@m1[gm] @m1[gmbs] @m1[gds]");
    double with_body = reflect_mos(t.op("@m1[gm]"), t.op("@m1[gmbs]"), t.op("@m1[gds]"), 5e3);
    double without_body = reflect_mos(t.op("@m1[gm]"), 0.0, t.op("@m1[gds]"), 5e3);
    CHECK(with_body == doctest::Approx(t.rout()).epsilon(0.01));
    // The source sits above ground, so the body effect matters: leaving it out is visibly low.
    CHECK(without_body < 0.97 * t.rout());
}

TEST_CASE("MOS cascode, level 1 and BSIM4: the lower device's ro reflected through the upper one") {
    for (const char* model : {level1, bsim4}) {
        const std::string name = model == level1 ? "nd" : "n4";
        const std::string geometry = model == level1 ? " w=4u l=1u\n" : " w=2u l=0.5u\n";
        TfRun t(std::string(model) + "vb1 g1 0 0.9\nvb2 g2 0 1.6\nm1 mid g1 0 0 " + name + geometry +
                    "m2 out g2 mid 0 " + name + geometry + "vout out 0 dc 2.4\n",
                "@m1[gds] @m2[gm] @m2[gmbs] @m2[gds]");
        CAPTURE(name);
        double rout = reflect_mos(t.op("@m2[gm]"), t.op("@m2[gmbs]"), t.op("@m2[gds]"), 1.0 / t.op("@m1[gds]"));
        CHECK(rout == doctest::Approx(t.rout()).epsilon(0.01));
    }
}

TEST_CASE("degenerated bipolar: ro + Re(1 + gm ro rpi/(rpi+rb)), Re = RE || (rpi + rb)") {
    for (double rb : {0.0, 20e3}) {
        CAPTURE(rb);
        std::string base = rb == 0.0 ? "vb b 0 0.9\n" : "vb bs 0 0.9\nrb bs b " + std::to_string(rb) + "\n";
        TfRun t(std::string(npn) + base + "q1 out b e qd\nre e 0 2k\nvout out 0 dc 3\n", "@q1[gm] @q1[gpi] @q1[go]");
        double rout = reflect_bjt(t.op("@q1[gm]"), t.op("@q1[gpi]"), t.op("@q1[go]"), 2e3, rb);
        CHECK(rout == doctest::Approx(t.rout()).epsilon(0.01));
    }
}

TEST_CASE("with no degeneration the rule gives ro") {
    // Consistency of the formulas' limits (no simulator needed): Rs = 0 leaves ro.
    CHECK(reflect_mos(1e-3, 2e-4, 1e-5, 0.0) == doctest::Approx(1e5));
    CHECK(reflect_bjt(4e-3, 4e-5, 1e-5, 0.0) == doctest::Approx(1e5));
    // A large emitter resistance gives ro + rpi(1 + gm·ro) = (beta + 1)·ro + rpi, about
    // beta·ro: the base-current limit (Gray, Hurst, Lewis, Meyer: output resistance of the
    // degenerated bipolar stage). Here beta = gm/gpi = 100, ro = 100 kOhm, rpi = 25 kOhm.
    CHECK(reflect_bjt(4e-3, 4e-5, 1e-5, 1e12) == doctest::Approx(101 * 1e5 + 25e3).epsilon(1e-6));
}
