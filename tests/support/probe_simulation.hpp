// Test support: runs a deck of our own with ngspice, saving what a review deck saves for
// every transistor (ngspice_save_names: what a review needs, the capacitances and the
// conductances the exact solve uses), then for each probe source `tf i(probe) probe` and a
// one-point AC analysis at 1 Hz with only that probe driven. Hands back the Circuit read
// from the same deck, the OpPoint of its op plot, and ngspice's answer for each probe:
// `.tf`'s input impedance and -1/i(probe) at 1 Hz (ngspice's branch current is positive
// flowing into the probe's + node).
#pragma once

#include <complex>
#include <filesystem>
#include <map>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/model/op_point_build.hpp"
#include "support/ngspice_run.hpp"

namespace mirrorcheck::test {

struct ProbeAnswer {
    double tf = 0;             // <probe>#input_impedance
    std::complex<double> ac;   // -1/i(<probe>) at 1 Hz
};

struct ProbeSimulation {
    NgspiceRun run;
    Circuit circuit;
    raw::RawFile raw;
    OpPoint op;
    std::map<std::string, ProbeAnswer> probes;
};

// Every `save` name of every transistor of `circuit` (raw-file spelling, `@dev[param]`), and
// `extra` names.
inline std::string save_everything(const Circuit& circuit, const std::vector<std::string>& extra = {}) {
    std::string line = "save all";
    for (const Device& d : circuit.devices()) {
        if (d.kind != DeviceKind::mosfet && d.kind != DeviceKind::bjt) continue;
        SaveNames names = ngspice_save_names(d);
        for (const auto* list : {&names.required, &names.optional})
            for (const auto& n : *list) line += " @" + d.name + "[" + n + "]";
    }
    for (const auto& e : extra) line += " " + e;
    return line + "\n";
}

// `deck` is a whole deck without `.control` and `.end` (title line first); `probes` are its
// probe voltage sources, each written `dc V ac 0`.
inline ProbeSimulation simulate_probes(const std::string& deck, const std::vector<std::string>& probes,
                                       const std::vector<std::string>& extra_saves = {}) {
    ProbeSimulation sim;
    // The Circuit first, to know what to save.
    const std::filesystem::path dir = make_temp_dir("mc-probe-netlist");
    write_text(dir / "netlist.cir", deck + ".end\n");
    Circuit first = read_circuit(dir / "netlist.cir");
    std::filesystem::remove_all(dir);

    std::string control = ".control\n" + save_everything(first, extra_saves) + "op\nwrite run.raw\nset appendwrite\n";
    for (const auto& p : probes) {
        control += "tf i(" + p + ") " + p + "\nwrite run.raw\n";
        for (const auto& other : probes) control += "alter @" + other + "[acmag] = " + (other == p ? "1" : "0") + "\n";
        control += "ac lin 1 1 1\nwrite run.raw\n";
    }
    sim.run = run_ngspice(deck + control + "quit 0\n.endc\n.end\n", "mc-probe");
    REQUIRE_MESSAGE(sim.run.status == 0, sim.run.output);
    sim.circuit = read_circuit(sim.run.file("deck.cir"));
    sim.raw = raw::read_raw(sim.run.file("run.raw"));
    REQUIRE(sim.raw.plots.size() == 1 + 2 * probes.size());
    const raw::Plot& op_plot = sim.raw.plots[0];
    REQUIRE(op_plot.kind() == "op");
    sim.op = build_op_point(sim.circuit, sim.raw, op_plot);
    for (std::size_t k = 0; k < probes.size(); ++k) {
        const raw::Plot& tf = sim.raw.plots[1 + 2 * k];
        const raw::Plot& ac = sim.raw.plots[2 + 2 * k];
        REQUIRE(tf.kind() == "tf");
        REQUIRE(ac.kind() == "ac");
        auto z = tf.find(probes[k] + "#input_impedance");
        auto i = ac.find("i(" + probes[k] + ")");
        REQUIRE(z);
        REQUIRE(i);
        sim.probes[probes[k]] = {tf.real[*z][0], -1.0 / ac.cplx[*i][0]};
    }
    return sim;
}

// The value of a vector of the op plot.
inline std::optional<double> op_value(const ProbeSimulation& sim, const std::string& vector) {
    auto i = sim.raw.plots[0].find(vector);
    if (!i) return std::nullopt;
    return sim.raw.plots[0].real[*i][0];
}

}  // namespace mirrorcheck::test
