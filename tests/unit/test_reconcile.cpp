// Reconciliation without a linearised value (src/analyse/reconcile.cpp), on a hand-made
// circuit shaped like the sky130 corpus deck's output `pd`: an NMOS mirror output that also
// carries a PMOS diode. When the exact solve cannot be had, the netlist still shows the
// diode the formula leaves out: the output is reported as loaded (information), naming the
// diode, and the data is not blamed. With nothing else on the node the data is what is
// left, and that stays a warning (the formula may be the one at fault). The numbers are illustrative: ro = 1 MΩ
// by inspection against a node that measures 6.4 kΩ, about 1/gm of the diode.
#include <memory>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "src/analyse/reconcile.hpp"
#include "src/report/finding_text.hpp"

using namespace mirrorcheck;

namespace {

DeviceOp nmos_op(const std::string& name, double id) {
    DeviceOp d;
    d.name = name;
    d.values = {{"id", id},    {"vgs", 0.9}, {"vds", 0.9}, {"vbs", 0.0}, {"vth", 0.5},
                {"vdsat", 0.4}, {"gm", 1e-4}, {"gds", 1e-6}, {"gmb", 2e-5}};
    return d;
}

struct Bench {
    Circuit circuit;
    OpPoint op;
    std::vector<Mirror> mirrors;

    std::size_t add(const std::string& name, const std::string& type, const std::string& d, const std::string& g,
                    const std::string& s, const std::string& b) {
        Device dev;
        dev.kind = DeviceKind::mosfet;
        dev.name = dev.local_name = name;
        dev.terminals = {{"d", d}, {"g", g}, {"s", s}, {"b", b}};
        auto model = std::make_shared<Model>();
        model->name = model->ngspice_name = type == "nmos" ? "nch" : "pch";
        model->type = type;
        dev.model = model;
        return circuit.add_device(dev);
    }

    explicit Bench(bool diode_on_output) {
        const auto m1 = add("xm1", "nmos", "nref", "nref", "0", "0");
        const auto m2 = add("xm2", "nmos", "pd", "nref", "0", "0");
        if (diode_on_output) add("xm3", "pmos", "pd", "pd", "vdd", "vdd");
        op.devices["xm1"] = nmos_op("xm1", 10e-6);
        op.devices["xm2"] = nmos_op("xm2", 10e-6);
        op.node_voltages = {{"nref", 0.9}, {"pd", 0.9}, {"vdd", 1.8}};
        Mirror m;
        m.id = "nmos-simple:xm2";
        m.family = Family::simple;
        m.kind = "nmos";
        m.reference = {m1};
        m.reference_degeneration = {std::nullopt};
        m.reference_node = "nref";
        m.outputs = {{"pd", {m2}, {std::nullopt}, 1.0}};
        mirrors = {m};
    }

    Reconciliation reconcile() const {
        const InspectionResult inspection = inspect_mirrors(circuit, op, mirrors, InspectOptions{});
        LinearisedImpedance none;  // the solve was refused (e.g. a model with internal nodes)
        none.node = "pd";
        none.note = "the whole circuit could not be linearised";
        SimulatedImpedance simulated;
        simulated.node = "pd";
        simulated.probe = "vpd";
        simulated.probe_mode = "held";
        simulated.values = {{6.4e3, 0.0, 1.0, "run.raw: AC Analysis, v(pd)/(-i(vpd)) at 1 Hz"}};
        ReconcileOptions options;
        options.simulation_given = true;
        return reconcile_resistances(circuit, mirrors, inspection, {}, {}, {none}, {simulated}, options);
    }
};

const Finding* with_code(const Reconciliation& r, FindingCode code) {
    for (const auto& f : r.findings)
        if (f.code == code) return &f;
    return nullptr;
}

}  // namespace

TEST_CASE("no solve, a PMOS diode on the output: reported as loaded, naming the diode, not blaming the data") {
    const Reconciliation r = Bench(true).reconcile();
    CHECK_FALSE(with_code(r, FindingCode::inspection_vs_simulated));
    const Finding* f = with_code(r, FindingCode::loaded_output);
    REQUIRE(f);
    CHECK(f->severity == Severity::info);
    const std::string sentence = report::finding_sentence(*f, {});
    CHECK(sentence.find("with xm3 in parallel") != std::string::npos);
    CHECK(sentence.find("6.4 kΩ") != std::string::npos);
    CHECK(sentence.find("by inspection") != std::string::npos);
    CHECK(with_code(r, FindingCode::not_linearised));  // and the missing solve is said once
}

TEST_CASE("no solve and nothing else on the output: the data is blamed, as a warning") {
    const Reconciliation r = Bench(false).reconcile();
    const Finding* f = with_code(r, FindingCode::inspection_vs_simulated);
    REQUIRE(f);
    CHECK(f->severity == Severity::warning);
    REQUIRE(f->cause);
    CHECK(f->cause->code == CauseCode::data_mismatch);
}
