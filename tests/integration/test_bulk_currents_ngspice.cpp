// BSIM4 impact ionisation (src/analyse/bulk_currents.cpp) against ngspice's own numbers,
// with the open-PDK model cards of the shared corpus (gf180 3.3 V and SKY130 1.8 V, NMOS and
// PMOS, binned, M and X instances), read in place. Each device sits alone on voltage
// sources at a few biases from moderate to strong inversion and high Vds; ngspice runs `op`
// there and again with each of Vgs, Vds, Vbs moved by +-0.1 mV, so that its isub and vdsat
// give their own derivatives by central differences. Checked:
//   - Isub computed from the model card (binning, Leff, Vdseff, the SCBE factor) equals
//     ngspice's isub;
//   - the slopes gbgs, gbds, gbbs of the file's formula, given ngspice's own dVdsat/dV,
//     equal ngspice's dIsub/dV (so the formula is exact and only the slopes of Vdsat are
//     missing from the op data);
//   - the estimate of dVdsat/dVgs is within 15 % of ngspice's from 0.1 V above threshold
//     up, and ngspice's lies in the range the solve bounds it by (0 to 1) everywhere.
#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/bulk_currents.hpp"
#include "src/model/op_point_build.hpp"
#include "support/ngspice_run.hpp"

using namespace mirrorcheck;

namespace {

const std::filesystem::path corpus = std::filesystem::path(MIRRORCHECK_SOURCE_DIR) / ".." / "shared" / "corpus";
constexpr double step = 1e-4;  // volts

struct Bench {
    std::string kit;      // corpus folder
    std::string header;   // includes
    std::string element;  // the device line, terminals d g 0 b
    std::string name;     // ngspice's name of the device
    bool p_type;
    double vds, vbs;
    std::vector<double> vgs;  // device polarity
};

std::string number(double v) {
    std::ostringstream s;
    s.precision(17);
    s << v;
    return s.str();
}

std::vector<Bench> benches() {
    const std::string gf = (corpus / "gf180mcu").string(), sky = (corpus / "sky130").string();
    const std::string gf_header = ".include \"" + gf + "/design.ngspice\"\n.lib \"" + gf +
                                  "/sm141064.ngspice\" typical\n.param sw_stat_mismatch=0\n";
    auto sky_header = [&](const char* kind) {
        return ".option scale=1.0u\n.include \"" + sky + "/models/parameters/lod.spice\"\n.include \"" + sky + "/cells/" +
               kind + "_01v8/sky130_fd_pr__" + kind + "_01v8__tt.corner.spice\"\n.include \"" + sky + "/cells/" + kind +
               "_01v8/sky130_fd_pr__" + kind + "_01v8__mismatch.corner.spice\"\n";
    };
    return {
        {"gf180mcu", gf_header, "m1 d g 0 b nmos_3p3 w=10u l=1u\n", "m1", false, 2.5, -0.5, {0.95, 1.1, 1.4, 2.0}},
        {"gf180mcu", gf_header, "x1 d g 0 b pmos_3p3 w=20u l=1u nf=2\n", "m.x1.m0", true, 2.8, -0.3, {1.05, 1.2, 1.5, 2.0}},
        {"sky130", sky_header("nfet"), "x1 d g 0 b sky130_fd_pr__nfet_01v8 w=10 l=1 nf=2\n",
         "m.x1.msky130_fd_pr__nfet_01v8", false, 1.6, -0.2, {0.65, 0.8, 1.0, 1.5}},
        {"sky130", sky_header("pfet"), "x1 d g 0 b sky130_fd_pr__pfet_01v8 w=10 l=1\n", "m.x1.msky130_fd_pr__pfet_01v8",
         true, 1.7, 0.0, {1.15, 1.3, 1.5, 1.8}},
    };
}

struct Point {
    Circuit circuit;
    DeviceOp op;                        // at the bias
    double isub = 0, vdsat = 0;         // ngspice's, at the bias
    double disub[3] = {}, dvdsat[3] = {};  // d/dVgs, d/dVds, d/dVbs (device polarity)
};

// One bias point: seven op runs (the bias, then +-step on vgs, vds, vbs).
Point measure(const Bench& b, double vgs) {
    const double sign = b.p_type ? -1.0 : 1.0;
    const double bias[3] = {vgs, b.vds, b.vbs};
    const char* sources[3] = {"vg", "vd", "vb"};
    std::string control = ".control\nsave all @" + b.name + "[isub] @" + b.name + "[vdsat]";
    for (const char* q : {"id", "gm", "gds", "gmbs", "vgs", "vds", "vbs", "vth"}) control += " @" + b.name + "[" + q + "]";
    control += "\nop\nwrite run.raw\nset appendwrite\n";
    for (int k = 0; k < 3; ++k)
        for (double delta : {step, -step}) {
            control += std::string("alter ") + sources[k] + " dc = " + number(sign * (bias[k] + delta)) + "\nop\nwrite run.raw\n";
            control += std::string("alter ") + sources[k] + " dc = " + number(sign * bias[k]) + "\n";
        }
    const std::string deck = "* isub bench\n" + b.header + "vg g 0 " + number(sign * vgs) + "\nvd d 0 " +
                             number(sign * b.vds) + "\nvb b 0 " + number(sign * b.vbs) + "\n" + b.element + control +
                             "quit 0\n.endc\n.end\n";
    auto run = test::run_ngspice(deck, "mc-isub");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    raw::RawFile file = raw::read_raw(run.file("run.raw"));
    REQUIRE(file.plots.size() == 7);
    Point p;
    p.circuit = read_circuit(run.file("deck.cir"));
    OpPoint op = build_op_point(p.circuit, file, file.plots[0]);
    REQUIRE(op.device(b.name));
    p.op = *op.device(b.name);
    auto value = [&](std::size_t plot, const char* q) {
        auto i = file.plots[plot].find("@" + b.name + "[" + q + "]");
        REQUIRE(i);
        return file.plots[plot].real[*i][0];
    };
    p.isub = value(0, "isub");
    p.vdsat = value(0, "vdsat");
    for (int k = 0; k < 3; ++k) {
        p.disub[k] = (value(1 + 2 * k, "isub") - value(2 + 2 * k, "isub")) / (2 * step);
        p.dvdsat[k] = (value(1 + 2 * k, "vdsat") - value(2 + 2 * k, "vdsat")) / (2 * step);
    }
    return p;
}

}  // namespace

TEST_CASE("impact ionisation: Isub from the card, its slopes given dVdsat/dV, and the dVdsat/dVgs estimate") {
    for (const Bench& b : benches()) {
        if (!std::filesystem::exists(corpus / b.kit)) {
            MESSAGE("skipped: no " << (corpus / b.kit).string());
            continue;
        }
        for (double vgs : b.vgs) {
            CAPTURE(b.name);
            CAPTURE(vgs);
            Point p = measure(b, vgs);
            const Device* d = p.circuit.find_device(b.name);
            REQUIRE(d);
            REQUIRE(p.isub > 0);

            auto computed = impact_ionisation_current(*d, p.op);
            REQUIRE(computed);
            CHECK(*computed == doctest::Approx(p.isub).epsilon(1e-6));

            auto slopes = impact_ionisation_slopes(*d, p.op, p.dvdsat[0], p.dvdsat[2], p.dvdsat[1]);
            REQUIRE(slopes);
            MESSAGE(b.name << " vgs " << vgs << ": isub " << p.isub << " (card " << *computed << "); gbgs "
                           << slopes->g << " vs " << p.disub[0] << ", gbds " << slopes->d << " vs " << p.disub[1]
                           << ", gbbs " << slopes->b << " vs " << p.disub[2] << "; dVdsat/dVgs " << p.dvdsat[0]);
            CHECK(slopes->g == doctest::Approx(p.disub[0]).epsilon(1e-3));
            CHECK(slopes->d == doctest::Approx(p.disub[1]).epsilon(1e-3));
            CHECK(slopes->b == doctest::Approx(p.disub[2]).epsilon(1e-3).scale(std::abs(p.disub[0])));

            BulkCurrents bulk = find_bulk_currents(*d, p.op);
            REQUIRE(bulk.impact);
            CHECK(p.dvdsat[0] >= 0.0);
            CHECK(p.dvdsat[0] <= 1.0);
            // Near threshold the estimate is only bounded (Vdsat there is a few vt, its slope half the estimate's).
            if (vgs - *p.op.get("vth") >= 0.1)
                CHECK(bulk.impact->gate_slope_estimate == doctest::Approx(p.dvdsat[0]).epsilon(0.15));
        }
    }
}
