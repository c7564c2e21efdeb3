// The simulated-impedance pass (src/analyse/simulated_impedance.cpp) on AC and .tf results
// that ngspice writes in the test. Its sign conventions are checked against ngspice's own
// `.tf` of the same deck: the AC value read through a probe must equal the .tf resistance
// (`SRC#input_impedance`, `output_impedance_at_v(N)`) that ngspice computes by itself, for
// every probe orientation and kind.
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "parsers/common/input_error.hpp"
#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/simulated_impedance.hpp"
#include "src/model/simulation_plots_build.hpp"
#include "support/ngspice_run.hpp"

using namespace mirrorcheck;

namespace {

// A level-1 NMOS mirror whose output node `out` is probed by the lines `probe`. The
// control block writes every analysis into run.raw, one plot after another.
struct Simulated {
    test::NgspiceRun run;
    Circuit circuit;
    std::vector<SimulationPlot> plots;
};

Simulated simulate(const std::string& probe, const std::string& analyses) {
    const std::string deck =
        "* probe conventions\n.model nd nmos level=1 vto=0.5 kp=200u lambda=0.08 gamma=0.5 phi=0.7\n"
        "vdd vdd 0 3\niref vdd g 20u\nm1 g g 0 0 nd w=4u l=1u\nm2 out g 0 0 nd w=4u l=1u\nrload vdd out 100k\n" +
        probe + ".control\nset appendwrite\n" + analyses + "quit 0\n.endc\n.end\n";
    Simulated s{test::run_ngspice(deck, "mc-simulated"), {}, {}};
    REQUIRE_MESSAGE(s.run.status == 0, s.run.output);
    s.circuit = read_circuit(s.run.file("deck.cir"));
    s.plots = simulation_plots_from_raw(raw::read_raw(s.run.file("run.raw")));
    return s;
}

// ngspice's own .tf value of `vector` in the plot of that kind.
double tf_value(const Simulated& s, const std::string& vector) {
    for (const auto& p : s.plots)
        if (p.kind == "tf")
            if (auto v = p.find(vector)) return (*v)[0].real();
    FAIL("no " << vector);
    return 0;
}

SimulatedImpedance one(const Simulated& s, const SimulatedOptions& options = {}) {
    auto r = find_simulated_impedances(s.circuit, s.plots, {"out"}, options);
    REQUIRE(r.size() == 1);
    return r[0];
}

}  // namespace

TEST_CASE("held by a voltage source with ac 1, + on the node: -v/i equals .tf's input impedance") {
    auto s = simulate("vout out 0 dc 1.5 ac 1\n", "ac dec 1 1 10\nwrite run.raw\ntf i(vout) vout\nwrite run.raw\n");
    auto r = one(s);
    REQUIRE_MESSAGE(r.best(), r.note);
    CHECK(r.probe == "vout");
    CHECK(r.probe_mode == "held");
    REQUIRE(r.values.size() == 2);  // AC first, then .tf
    CHECK(r.values[0].frequency == doctest::Approx(1.0));
    CHECK(r.values[0].magnitude == doctest::Approx(tf_value(s, "vout#input_impedance")).epsilon(1e-6));
    CHECK(std::abs(r.values[0].phase_degrees) < 0.01);
    CHECK(r.values[1].magnitude == doctest::Approx(tf_value(s, "vout#input_impedance")).epsilon(1e-12));
    CHECK(r.values[1].source.find("vout#input_impedance") != std::string::npos);
}

TEST_CASE("held with the source the other way round: the sign still comes out positive") {
    auto s = simulate("vout 0 out dc -1.5 ac 1\n", "ac dec 1 1 10\nwrite run.raw\ntf i(vout) vout\nwrite run.raw\n");
    auto r = one(s);
    REQUIRE_MESSAGE(r.best(), r.note);
    CHECK(r.values[0].magnitude == doctest::Approx(tf_value(s, "vout#input_impedance")).epsilon(1e-6));
    CHECK(std::abs(r.values[0].phase_degrees) < 0.01);  // a negative resistance would read 180°
}

TEST_CASE("injected by a current source: v/I equals .tf's output impedance at the node, both orientations") {
    for (const char* line : {"iin 0 out dc 0 ac 1\n", "iin out 0 dc 0 ac 2\n"}) {
        CAPTURE(line);
        auto s = simulate(line, "ac dec 1 1 10\nwrite run.raw\ntf v(out) iin\nwrite run.raw\n");
        auto r = one(s);
        REQUIRE_MESSAGE(r.best(), r.note);
        CHECK(r.probe_mode == "injected");
        // the node as it is: the mirror's ro in parallel with rload (ngspice's .tf)
        CHECK(r.values[0].magnitude == doctest::Approx(tf_value(s, "output_impedance_at_v(out)")).epsilon(1e-6));
        CHECK(std::abs(r.values[0].phase_degrees) < 0.01);
        CHECK(r.values[1].magnitude == doctest::Approx(tf_value(s, "output_impedance_at_v(out)")).epsilon(1e-12));
    }
}

TEST_CASE("one AC run per probe in one raw file: each output is read from the run that drives its probe") {
    // Two injected probes switched on one at a time with `alter`, their magnitudes saved
    // as vectors (`@iin[acmag]`), as a generated deck does. In the run driving iin2, out
    // still moves (a transfer impedance through the shared node), which must not be taken.
    const std::string deck =
        "* two probes\n.model nd nmos level=1 vto=0.5 kp=200u lambda=0.08 gamma=0.5 phi=0.7\n"
        "vdd vdd 0 3\niref vdd g 20u\nm1 g g 0 0 nd w=4u l=1u\nm2 out g 0 0 nd w=4u l=1u\nm3 out2 g 0 0 nd w=8u l=1u\n"
        "rload vdd out 100k\nr2 vdd out2 50k\nrx out out2 1meg\niin 0 out dc 0 ac 0\niin2 0 out2 dc 0 ac 0\n"
        ".control\nset appendwrite\nsave all @iin[acmag] @iin2[acmag]\n"
        "alter @iin[acmag]=1\nac dec 1 1 10\nwrite run.raw\n"
        "alter @iin[acmag]=0\nalter @iin2[acmag]=1\nac dec 1 1 10\nwrite run.raw\n"
        "tf v(out) iin\nwrite run.raw\ntf v(out2) iin2\nwrite run.raw\nquit 0\n.endc\n.end\n";
    auto run = test::run_ngspice(deck, "mc-simulated");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    Circuit c = read_circuit(run.file("deck.cir"));
    auto plots = simulation_plots_from_raw(raw::read_raw(run.file("run.raw")));
    REQUIRE(plots.size() == 4);
    auto r = find_simulated_impedances(c, plots, {"out", "out2"}, {});
    REQUIRE(r.size() == 2);
    REQUIRE_MESSAGE(r[0].best(), r[0].note);
    REQUIRE_MESSAGE(r[1].best(), r[1].note);
    CHECK(r[0].best()->source.find("plot 1") != std::string::npos);
    CHECK(r[1].best()->source.find("plot 2") != std::string::npos);
    CHECK(r[0].best()->magnitude == doctest::Approx(plots[2].find("output_impedance_at_v(out)")->at(0).real()).epsilon(1e-6));
    CHECK(r[1].best()->magnitude == doctest::Approx(plots[3].find("output_impedance_at_v(out2)")->at(0).real()).epsilon(1e-6));
}

TEST_CASE("--at picks the AC point nearest the frequency asked; the default is the lowest") {
    auto s = simulate("vout out 0 dc 1.5 ac 1\ncout out 0 10p\n", "ac dec 10 1 1g\nwrite run.raw\n");
    auto low = one(s);
    REQUIRE(low.best());
    CHECK(*low.best()->frequency == doctest::Approx(1.0));
    SimulatedOptions at;
    at.at = 1.1e6;
    auto high = one(s, at);
    REQUIRE(high.best());
    CHECK(*high.best()->frequency == doctest::Approx(1e6).epsilon(1e-9));  // grid point nearest 1.1 MHz
    CHECK(high.best()->source.find("nearest point") != std::string::npos);
    // the 10 pF capacitor shunts the output: lower |Z| and a phase near -90° at 1 MHz
    CHECK(high.best()->magnitude < low.best()->magnitude);
    CHECK(high.best()->phase_degrees < -45);
}

TEST_CASE("--at outside the sweep is refused, not moved to the nearest end") {
    auto s = simulate("vout out 0 dc 1.5 ac 1\n", "ac dec 10 1 1g\nwrite run.raw\n");
    SimulatedOptions at;
    at.at = 1e9;  // the sweep's last point: inside
    CHECK(one(s, at).best());
    for (double outside : {2e9, 0.5}) {
        CAPTURE(outside);
        at.at = outside;
        try {
            one(s, at);
            FAIL("no error");
        } catch (const InputError& e) {
            CHECK(e.code() == "usage.at-outside-sweep");
            CHECK(e.message().find("1 Hz to 1 GHz") != std::string::npos);
        }
    }
}

TEST_CASE("no probe, an ambiguous probe, and --probe naming the source") {
    auto s = simulate("vout out 0 dc 1.5 ac 1\niin 0 out dc 0 ac 1\n", "ac dec 1 1 10\nwrite run.raw\n");
    auto ambiguous = one(s);
    CHECK_FALSE(ambiguous.best());
    CHECK(ambiguous.note.find("--probe out=SOURCE") != std::string::npos);
    SimulatedOptions chosen;
    chosen.probes = {{"out", "vout"}};
    auto r = one(s, chosen);
    REQUIRE_MESSAGE(r.best(), r.note);
    CHECK(r.probe == "vout");
    chosen.probes = {{"out", "vdd"}};
    CHECK_THROWS_AS(one(s, chosen), InputError);
    chosen.probes = {{"out", "nothing"}};
    CHECK_THROWS_AS(one(s, chosen), InputError);

    auto bare = simulate("cout out 0 1p\n", "op\nac dec 1 1 10\nwrite run.raw\n");
    auto none = one(bare);
    CHECK_FALSE(none.best());
    CHECK(none.note.find("no probe source on out") != std::string::npos);
}
