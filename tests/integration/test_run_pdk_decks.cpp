// `mirrorcheck run` on open-PDK decks written the way designers write them: a title line, a
// relative `.lib` of the process kit, X instances of the PDK's wrapper subcircuits (as a
// schematic tool writes them, with `nf` and the area expressions of the line's own
// parameters), and the deck's own control block. The kits are the corpus's (sky130 and
// gf180mcu in ../shared/corpus), reached through a symbolic link in a temporary folder, so
// that the deck's names are relative. For every output the review finds, the simulated Rout
// must equal ngspice's own `.tf` output impedance of the same deck within 0.1 %; and `run`
// takes the two corpus mirror decks exactly as they are. A new deck is one row of `decks`.
//
// What this test asserts is only what `run` decides (the deck, the probes, the sources at
// AC zero, the paths); the exact solve of these BSIM4 devices is not checked here.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "support/corpus.hpp"
#include "support/ngspice_run.hpp"
#include "support/print_output.hpp"
#include "support/run_cli.hpp"

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

using mirrorcheck::test::corpus_dir;
using mirrorcheck::test::corpus_present;

// The sky130 corpus holds the cells of two devices but not the kit's own library file, so the
// test writes one in the shape of the kit's (`.lib sky130.lib.spice tt`): a section per corner.
const char* sky130_library =
    "* sky130 nfet_01v8 / pfet_01v8, typical corner, from the cells of the corpus\n"
    ".lib tt\n"
    ".option scale=1.0u\n"
    ".include \"pdk/models/parameters/lod.spice\"\n"
    ".include \"pdk/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__tt.corner.spice\"\n"
    ".include \"pdk/cells/nfet_01v8/sky130_fd_pr__nfet_01v8__mismatch.corner.spice\"\n"
    ".include \"pdk/cells/pfet_01v8/sky130_fd_pr__pfet_01v8__tt.corner.spice\"\n"
    ".include \"pdk/cells/pfet_01v8/sky130_fd_pr__pfet_01v8__mismatch.corner.spice\"\n"
    ".endl tt\n";

const char* sky130_head = ".lib \"sky130.lib\" tt\n.param vsupply=1.8\nVDD vdd 0 {vsupply}\n";
const char* gf180_head =
    ".include \"pdk/design.ngspice\"\n.lib \"pdk/sm141064.ngspice\" typical\n.param sw_stat_mismatch=0\nVDD vdd 0 3.3\n";

// A schematic tool's sky130 instance line: the diffusion geometry from the line's own W and nf.
std::string sky_fet(const std::string& name, const std::string& nodes, const std::string& type, int w, int nf,
                    int m = 1) {
    return name + " " + nodes + " sky130_fd_pr__" + type + "_01v8 L=1 W=" + std::to_string(w) +
           " nf=" + std::to_string(nf) +
           " ad='int((nf+1)/2) * W/nf * 0.29' as='int((nf+2)/2) * W/nf * 0.29'\n"
           "+ pd='2*int((nf+1)/2) * (W/nf + 0.29)' ps='2*int((nf+2)/2) * (W/nf + 0.29)'\n"
           "+ nrd='0.29 / W' nrs='0.29 / W' sa=0 sb=0 sd=0 mult=1 m=" + std::to_string(m) + "\n";
}

std::string gf_fet(const std::string& name, const std::string& nodes, const std::string& type, const std::string& w,
                   int nf = 1) {
    return name + " " + nodes + " " + type + "_3p3 w=" + w + " l=1u nf=" + std::to_string(nf) +
           " ad='w/nf*0.48u' as='w/nf*0.48u' pd='2*(w/nf+0.48u)' ps='2*(w/nf+0.48u)'\n";
}

const char* control_block = ".control\nsave all\nop\nprint all\nquit 0\n.endc\n.end\n";

struct PdkDeck {
    const char* name;
    const char* kit;      // sky130 or gf180mcu
    std::string body;     // after the title and the kit's lines, before the control block
    std::size_t outputs;  // mirror outputs the review must find
    std::string families; // the mirrors' families, as `list` names them
};

std::vector<PdkDeck> decks() {
    const std::string n = "nfet", p = "pfet";
    return {
        {"sky130 simple 1:3 (m=3 on the X line, nf=2) and a PMOS source 1:1", "sky130",
         "IREF vdd nref 10u\n" + sky_fet("XM1", "nref nref 0 0", n, 10, 2) + sky_fet("XM2", "pd nref 0 0", n, 10, 2, 3) +
             sky_fet("XM3", "pd pd vdd vdd", p, 20, 2) + sky_fet("XM4", "out pd vdd vdd", p, 20, 2) + "RL out 0 40k\n",
         2, "nmos-simple pmos-simple"},
        {"sky130 standard cascode", "sky130",
         "IREF vdd n1 10u\n" + sky_fet("XM1", "n2 n2 0 0", n, 5, 1) + sky_fet("XM3", "n1 n1 n2 0", n, 5, 1) +
             sky_fet("XM2", "s4 n2 0 0", n, 5, 1) + sky_fet("XM4", "out n1 s4 0", n, 5, 1) + "VOUT out 0 1.5\n",
         1, "nmos-cascode"},
        {"sky130 wide-swing cascode", "sky130",
         "IREF vdd ref 10u\nIB vdd vb 10u\n" + sky_fet("XM5", "vb vb 0 0", n, 1, 1) + sky_fet("XM1", "x ref 0 0", n, 10, 2) +
             sky_fet("XM3", "ref vb x 0", n, 10, 2) + sky_fet("XM2", "mid ref 0 0", n, 10, 2) +
             sky_fet("XM4", "out vb mid 0", n, 10, 2) + "VOUT out 0 1.2\n",
         1, "nmos-wide-swing-cascode"},
        {"sky130 Wilson", "sky130",
         "IREF vdd y 10u\n" + sky_fet("XM2", "g g 0 0", n, 5, 1) + sky_fet("XM1", "y g 0 0", n, 5, 1) +
             sky_fet("XM3", "out y g 0", n, 5, 1) + "VOUT out 0 1.2\n",
         1, "nmos-wilson"},
        {"gf180 simple 1:3 (m=3 on the M line, nf=2) and a PMOS source 1:1 of X instances", "gf180mcu",
         "IREF vdd nref 20u\nM1 nref nref 0 0 nmos_3p3 w=20u l=1u nf=2\nM2 pd nref 0 0 nmos_3p3 w=20u l=1u nf=2 m=3\n" +
             gf_fet("XM3", "pd pd vdd vdd", "pmos", "40u", 2) + gf_fet("XM4", "out pd vdd vdd", "pmos", "40u", 2) +
             "VOUT out 0 1.5\n",
         2, "nmos-simple pmos-simple"},
        {"gf180 standard cascode", "gf180mcu",
         "IREF vdd n1 20u\n" + gf_fet("XM1", "n2 n2 0 0", "nmos", "10u") + gf_fet("XM3", "n1 n1 n2 0", "nmos", "10u") +
             gf_fet("XM2", "s4 n2 0 0", "nmos", "10u") + gf_fet("XM4", "out n1 s4 0", "nmos", "10u") + "VOUT out 0 2.2\n",
         1, "nmos-cascode"},
        {"gf180 wide-swing cascode", "gf180mcu",
         "IREF vdd ref 20u\nIB vdd vb 20u\n" + gf_fet("XM5", "vb vb 0 0", "nmos", "2u") +
             gf_fet("XM1", "x ref 0 0", "nmos", "20u", 2) + gf_fet("XM3", "ref vb x 0", "nmos", "20u", 2) +
             gf_fet("XM2", "mid ref 0 0", "nmos", "20u", 2) + gf_fet("XM4", "out vb mid 0", "nmos", "20u", 2) +
             "VOUT out 0 1.5\n",
         1, "nmos-wide-swing-cascode"},
        {"gf180 Wilson", "gf180mcu",
         "IREF vdd y 20u\n" + gf_fet("XM2", "g g 0 0", "nmos", "10u") + gf_fet("XM1", "y g 0 0", "nmos", "10u") +
             gf_fet("XM3", "out y g 0", "nmos", "10u") + "VOUT out 0 2.2\n",
         1, "nmos-wilson"},
    };
}

// A folder holding the deck beside a link to the kit, as a designer's project holds it.
fs::path project(const PdkDeck& d, std::string& deck_text) {
    fs::path dir = mirrorcheck::test::make_temp_dir("mirrorcheck-pdk-deck");
    fs::create_directory_symlink(fs::canonical(corpus_dir() / d.kit), dir / "pdk");
    const bool sky = std::string(d.kit) == "sky130";
    if (sky) mirrorcheck::test::write_text(dir / "sky130.lib", sky130_library);
    deck_text = std::string(d.name) + "\n" + (sky ? sky130_head : gf180_head) + d.body;
    mirrorcheck::test::write_text(dir / "deck.cir", deck_text + control_block);
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
    return dir;
}

// ngspice's `.tf` impedance at an output of the deck (its lines without the control block):
// through the netlist's own voltage source holding it, or at the node itself.
double tf_impedance(const fs::path& dir, const std::string& body, const json& output) {
    const std::string node = output["node"];
    const std::string probe = output["rout"]["probe"];
    const bool own_source = output["rout"]["probe_mode"] == "held" && probe.rfind("vmc_probe", 0) != 0;
    std::string deck = body, vector;
    if (own_source) {
        deck += ".control\ntf i(" + probe + ") " + probe + "\nprint all\nquit 0\n.endc\n.end\n";
        vector = probe + "#input_impedance";
    } else {
        deck += "itf_probe 0 " + node + " dc 0\n.control\ntf v(" + node + ") itf_probe\nprint all\nquit 0\n.endc\n.end\n";
        vector = "output_impedance_at_v(" + node + ")";
    }
    mirrorcheck::test::write_text(dir / "tf.cir", deck);
    const int status = std::system(("cd '" + dir.string() + "' && ngspice -b tf.cir > tf.log 2>&1").c_str());
    const std::string log = mirrorcheck::test::read_text(dir / "tf.log");
    REQUIRE_MESSAGE(status == 0, log);
    auto printed = mirrorcheck::test::parse_print_output(log);
    auto it = printed.find(vector);
    REQUIRE_MESSAGE(it != printed.end(), vector << " not in\n" << log);
    return it->second.at(0).real();
}

std::vector<json> outputs(const json& report) {
    std::vector<json> all;
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"]) all.push_back(o);
    return all;
}

}  // namespace

TEST_CASE("run on sky130 and gf180 decks as designers write them: simulated Rout equals ngspice's .tf") {
    if (!corpus_present()) return;
    for (const PdkDeck& d : decks()) {
        SUBCASE(d.name) {
            std::string body;
            const fs::path dir = project(d, body);
            const fs::path kept = dir.string() + "-kept";
            auto r = mirrorcheck::test::run_cli("run deck.cir --keep '" + kept.string() + "' --format json", dir);
            REQUIRE_MESSAGE(r.status != 2, r.err);
            const json report = json::parse(r.out);
            CHECK(report["inputs"]["netlist"] == "deck.cir");
            const std::size_t control_line = static_cast<std::size_t>(std::count(body.begin(), body.end(), '\n')) + 1;
            CHECK(report["inputs"]["left_out"] ==
                  json::array({"deck.cir:" + std::to_string(control_line) + ": .control ... .endc"}));
            const auto all = outputs(report);
            CHECK(all.size() == d.outputs);
            std::string families;
            for (const auto& m : report["mirrors"]) families += (families.empty() ? "" : " ") + m["family"].get<std::string>();
            CHECK(families == d.families);
            // the decks are healthy mirrors: every transistor saturated
            for (const auto& f : report["findings"]) {
                CAPTURE(f["message"]);
                CHECK(f["code"] != "out-of-saturation");
                CHECK(f["code"] != "cutoff");
            }
            for (const json& o : all) {
                CAPTURE(o["node"]);
                REQUIRE_MESSAGE(o["rout"]["simulated"].is_number(), o["rout"]["simulated_note"]);
                const double tf = tf_impedance(dir, body, o);
                const double simulated = o["rout"]["simulated"].get<double>();
                MESSAGE(std::string(d.name) << ", " << o["node"].get<std::string>() << ": simulated " << simulated
                                            << " Ω, .tf " << tf << " Ω, relative difference "
                                            << std::abs(simulated - tf) / tf);
                CHECK(simulated == doctest::Approx(tf).epsilon(1e-3));
            }
            std::error_code ec;
            fs::remove_all(dir, ec);
            fs::remove_all(kept, ec);
        }
    }
}

TEST_CASE("run on the corpus mirror decks exactly as they are") {
    if (!corpus_present()) return;
    // Copied to a temporary folder only because their control blocks write files when
    // ngspice runs them; `run` itself writes nothing beside them (checked below).
    for (const auto& [kit, deck] : {std::pair{"sky130", "mirror_sky130.cir"}, {"gf180mcu", "mirror_gf180.cir"}}) {
        CAPTURE(deck);
        const fs::path dir = mirrorcheck::test::make_temp_dir("mirrorcheck-pdk-deck");
        fs::copy(corpus_dir() / kit, dir / kit, fs::copy_options::recursive);
        mirrorcheck::test::write_text(dir / kit / ".spiceinit", "set num_threads=1\n");
        std::vector<fs::path> before;
        for (const auto& e : fs::recursive_directory_iterator(dir)) before.push_back(e.path());
        auto r = mirrorcheck::test::run_cli(std::string("run ") + kit + "/" + deck + " --format json", dir);
        REQUIRE_MESSAGE(r.status != 2, r.err);
        std::vector<fs::path> after;
        for (const auto& e : fs::recursive_directory_iterator(dir)) after.push_back(e.path());
        CHECK(after == before);
        const json report = json::parse(r.out);
        CHECK(report["inputs"]["netlist"] == std::string(kit) + "/" + deck);
        CHECK(report["inputs"]["left_out"].size() == 1);
        const auto all = outputs(report);
        CHECK(all.size() == 2);
        for (const json& o : all) {
            CAPTURE(o["node"]);
            CHECK(o["rout"]["simulated"].is_number());
            // the testbench of the mirror alone, with the kit's cells kept whole, in ngspice
            REQUIRE_MESSAGE(o["rout"]["own_simulated"].is_number(), o["rout"]["own_simulated_note"]);
            CHECK(o["rout"]["own_simulated"].get<double>() ==
                  doctest::Approx(o["rout"]["own"].get<double>()).epsilon(1e-6));
        }
        std::error_code ec;
        fs::permissions(dir, fs::perms::owner_all, fs::perm_options::add, ec);
        for (const auto& e : fs::recursive_directory_iterator(dir, ec))
            fs::permissions(e.path(), fs::perms::owner_all, fs::perm_options::add, ec);
        fs::remove_all(dir, ec);
    }
}
