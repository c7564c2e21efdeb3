// The open-PDK decks of the shared corpus and the raw files ngspice wrote for them, read
// as they are (../shared/corpus/gf180mcu, ../shared/corpus/sky130; skipped when absent).
// Their control blocks save id, gm, gds, vth, vdsat, vgs, vds but not vbs (nor gmbs):
//   - `mirrorcheck review` takes them without asking for vbs, derived from the node
//     voltages (sky130: the #body nodes ngspice writes for rbodymod = 1), and solves every
//     output over the whole circuit;
//   - the derived vbs equals ngspice's own @m[vbs] for the same circuit: a deck of ours
//     with the corpus deck's devices, sources and models, run by ngspice saving vbs.
#include <filesystem>
#include <string>

#include <doctest/doctest.h>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/model/op_point_build.hpp"
#include "support/ngspice_run.hpp"
#include "support/run_cli.hpp"

using namespace mirrorcheck;

namespace {

const std::filesystem::path corpus = std::filesystem::path(MIRRORCHECK_SOURCE_DIR) / ".." / "shared" / "corpus";

struct CorpusDeck {
    const char* kit;
    const char* deck;
    const char* raw;
    const char* ascii_raw;
    std::vector<std::string> devices;  // ngspice's names
    std::string circuit;               // our copy of the deck's devices and sources, includes made absolute
};

std::vector<CorpusDeck> corpus_decks() {
    const std::string gf = (corpus / "gf180mcu").string(), sky = (corpus / "sky130").string();
    return {
        {"gf180mcu", "mirror_gf180.cir", "expected/mirror_gf180_op.raw", "expected/mirror_gf180_op_ascii.raw",
         {"m1", "m2", "m.xm3.m0", "m.xm4.m0"},
         ".include \"" + gf + "/design.ngspice\"\n.lib \"" + gf + "/sm141064.ngspice\" typical\n"
         ".param sw_stat_mismatch=0\n.param wn=10u lenn=1u wp=20u lenp=1u iref=20u\n"
         "VDD vdd 0 3.3\nIREF vdd nref DC {iref}\nM1 nref nref 0 0 nmos_3p3 w={wn} l={lenn} m=1\n"
         "M2 pd   nref 0 0 nmos_3p3 w={wn} l={lenn} m=2\nXM3 pd  pd vdd vdd pmos_3p3 w={wp} l={lenp}\n"
         "XM4 out pd vdd vdd pmos_3p3 w={wp} l={lenp}\nVOUT out 0 DC 1.5\n"},
        {"sky130", "mirror_sky130.cir", "expected/mirror_sky130_op.raw", "expected/mirror_sky130_op_ascii.raw",
         {"m.xm1.msky130_fd_pr__nfet_01v8", "m.xm2.msky130_fd_pr__nfet_01v8", "m.xm3.msky130_fd_pr__pfet_01v8",
          "m.xm4.msky130_fd_pr__pfet_01v8"},
         ".option scale=1.0u\n.include \"" + sky + "/models/parameters/lod.spice\"\n.include \"" + sky +
             "/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__tt.corner.spice\"\n.include \"" + sky +
             "/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__mismatch.corner.spice\"\n.include \"" + sky +
             "/cells/pfet_01v8/sky130_fd_pr__pfet_01v8__tt.corner.spice\"\n.include \"" + sky +
             "/cells/pfet_01v8/sky130_fd_pr__pfet_01v8__mismatch.corner.spice\"\n"
             ".param wn=5 lenn=1 wp=10 lenp=1 iref=10u\nVDD vdd 0 1.8\nIREF vdd nref DC {iref}\n"
             "XM1 nref nref 0 0 sky130_fd_pr__nfet_01v8 w={wn} l={lenn}\n"
             "XM2 pd   nref 0 0 sky130_fd_pr__nfet_01v8 w={wn} l={lenn} m=2\n"
             "XM3 pd  pd vdd vdd sky130_fd_pr__pfet_01v8 w={wp} l={lenp}\n"
             "XM4 out pd vdd vdd sky130_fd_pr__pfet_01v8 w={wp} l={lenp}\nVOUT out 0 DC 0.9\n"},
    };
}

}  // namespace

TEST_CASE("the corpus raw files as they are: reviewed without asking for vbs, every output solved") {
    for (const CorpusDeck& c : corpus_decks()) {
        const std::filesystem::path dir = corpus / c.kit;
        if (!std::filesystem::exists(dir)) {
            MESSAGE("skipped: no " << dir.string());
            continue;
        }
        for (const char* raw : {c.raw, c.ascii_raw}) {
            CAPTURE(raw);
            auto r = test::run_cli("review '" + (dir / c.deck).string() + "' --op '" + (dir / raw).string() + "'");
            CHECK_MESSAGE(r.status != 2, r.err);
            CHECK(r.err.find("op.missing-parameters") == std::string::npos);
            CHECK(r.out.find("linearised          -") == std::string::npos);  // no output left without a value
            CHECK(r.out.find("the node out in the whole circuit") != std::string::npos);
            CHECK(r.out.find("the node pd in the whole circuit") != std::string::npos);
            CHECK(r.out.find("not solved as a mirror alone") == std::string::npos);  // every mirror solved alone too
        }
    }
}

TEST_CASE("the vbs derived from a corpus raw file equals ngspice's @m[vbs] for the same circuit") {
    for (const CorpusDeck& c : corpus_decks()) {
        const std::filesystem::path dir = corpus / c.kit;
        if (!std::filesystem::exists(dir)) {
            MESSAGE("skipped: no " << dir.string());
            continue;
        }
        Circuit corpus_circuit = read_circuit(dir / c.deck);
        raw::RawFile corpus_raw = raw::read_raw(dir / c.raw);
        OpPoint derived = build_op_point(corpus_circuit, corpus_raw, corpus_raw.plots.at(0));

        std::string saves = "save all";
        for (const auto& d : c.devices)
            for (const char* q : {"vbs", "vgs", "vds"}) saves += " @" + d + "[" + q + "]";
        auto run = test::run_ngspice("* corpus circuit, saving vbs\n" + c.circuit + ".control\n" + saves +
                                         "\nop\nwrite op.raw\nquit 0\n.endc\n.end\n",
                                     "mc-corpus-vbs");
        REQUIRE_MESSAGE(run.status == 0, run.output);
        raw::RawFile ours = raw::read_raw(run.file("op.raw"));
        for (const auto& d : c.devices) {
            CAPTURE(d);
            REQUIRE(derived.device(d));
            REQUIRE(derived.device(d)->get("vbs"));
            auto i = ours.plots[0].find("@" + d + "[vbs]");
            REQUIRE(i);
            const double reported = ours.plots[0].real[*i][0];
            // ngspice reports vbs normalised: NMOS v(b)-v(s), PMOS v(s)-v(b); here both 0 or
            // (sky130 #body) a few pV.
            MESSAGE(d << ": derived vbs " << *derived.device(d)->get("vbs") << ", ngspice " << reported);
            CHECK(*derived.device(d)->get("vbs") == doctest::Approx(reported).epsilon(1e-9).scale(1e-9));
        }
    }
}
