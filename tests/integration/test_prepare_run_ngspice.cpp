// `mirrorcheck prepare` and `mirrorcheck run` with ngspice itself, on decks of our own (MOS
// and bipolar mirrors of several families, a whole amplifier):
//   - every output's simulated impedance (through the probe the deck adds) equals the
//     linearised value within 0.1 %, in both probe modes;
//   - the operating point with the probes in place equals the netlist's own, every node
//     within 1 µV (ngspice's op of the bare netlist, run by the test);
//   - run gives the same review as a testbench written by hand;
//   - ngspice missing, rejecting the netlist, or ending without results: exit 2 with the
//     end of its log.
#include <cmath>
#include <map>
#include <filesystem>
#include <sstream>
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"
#include "support/print_output.hpp"
#include "support/corpus.hpp"
#include "support/ngspice_run.hpp"
#include "support/run_cli.hpp"

namespace {

namespace fs = std::filesystem;
using nlohmann::json;

// Two NMOS mirrors (a cascode and a simple one) with resistor loads, a PMOS source, and
// NPN and PNP mirrors; no output is held by a source.
const char* mixed_bias =
    "* mixed bias block\n"
    ".model nc nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=0.45 phi=0.7\n"
    ".model pc pmos level=1 vto=-0.6 kp=80u lambda=0.08 gamma=0.4 phi=0.7\n"
    ".model qn npn is=2e-16 bf=120 vaf=60\n.model qp pnp is=1e-16 bf=60 vaf=40\n"
    "vdd vdd 0 3.3\n"
    "iref vdd top 30u\nm2 top top mid 0 nc w=10u l=1u\nm1 mid mid 0 0 nc w=10u l=1u\n"
    "m4 casc top s4 0 nc w=10u l=1u\nm3 s4 mid 0 0 nc w=10u l=1u\nrc vdd casc 40k\n"
    "m5 pg mid 0 0 nc w=10u l=1u\nmp1 pg pg vdd vdd pc w=20u l=1u\nmp2 psrc pg vdd vdd pc w=20u l=1u\n"
    "rp psrc 0 40k\n"
    "iq vdd qb 20u\nq1 qb qb 0 qn\nq2 qout qb 0 qn\nrq vdd qout 50k\n"
    "ip pb 0 20u\nq3 pb pb vdd qp\nq4 pout pb vdd qp\nrpo pout 0 50k\n"
    ".end\n";

// A five-transistor amplifier (NMOS tail mirror, PMOS mirror load) in open loop with its
// inputs at mid-supply: the output is the mirror load's output, loaded by the pair.
const char* amplifier =
    "* five-transistor amplifier\n"
    ".model nc nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=0.45 phi=0.7\n"
    ".model pc pmos level=1 vto=-0.6 kp=80u lambda=0.08 gamma=0.4 phi=0.7\n"
    "vdd vdd 0 3.3\nvinp inp 0 1.5\nvinn inn 0 1.5\n"
    "ib vdd nb 20u\nmb nb nb 0 0 nc w=10u l=2u\nmt tail nb 0 0 nc w=20u l=2u\n"
    "m1 d1 inp tail 0 nc w=20u l=1u\nm2 out inn tail 0 nc w=20u l=1u\n"
    "m3 d1 d1 vdd vdd pc w=20u l=1u\nm4 out d1 vdd vdd pc w=20u l=1u\n"
    ".end\n";

struct Ran {
    int status = 0;
    json report;
    fs::path folder;  // where the deck, log and results were kept
};

Ran run(const std::string& netlist, const std::string& options = "") {
    auto dir = mirrorcheck::test::make_temp_dir("mc-run");
    mirrorcheck::test::write_text(dir / "netlist.cir", netlist);
    auto r = mirrorcheck::test::run_cli("run netlist.cir --keep kept --format json " + options, dir);
    REQUIRE_MESSAGE(r.status != 2, r.err);
    return {r.status, json::parse(r.out), dir / "kept"};
}

std::vector<json> outputs(const json& report) {
    std::vector<json> all;
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"]) all.push_back(o);
    return all;
}

void check_simulated_equals_linearised(const json& report) {
    auto all = outputs(report);
    REQUIRE(!all.empty());
    for (const auto& o : all) {
        CAPTURE(o["node"]);
        const json& rout = o["rout"];
        REQUIRE_MESSAGE(rout["linearised"].is_number(), rout["linearised_note"]);
        REQUIRE_MESSAGE(rout["simulated"].is_number(), rout["simulated_note"]);
        CHECK(rout["simulated"].get<double>() == doctest::Approx(rout["linearised"].get<double>()).epsilon(1e-3));
    }
}

// ngspice's own op of the bare netlist, node voltages by name.
std::map<std::string, double> bare_op(const std::string& netlist) {
    std::string body = netlist.substr(0, netlist.rfind(".end"));
    auto r = mirrorcheck::test::run_ngspice(body + ".control\nop\nwrite bare.raw\nquit 0\n.endc\n.end\n", "mc-run");
    REQUIRE_MESSAGE(r.status == 0, r.output);
    auto file = mirrorcheck::raw::read_raw(r.file("bare.raw"));
    std::map<std::string, double> v;
    const auto& p = file.plots.at(0);
    for (std::size_t k = 0; k < p.variables.size(); ++k)
        if (p.variables[k].type == "voltage") v[mirrorcheck::raw::canonical_vector_name(p.variables[k].name)] = p.real[k][0];
    return v;
}

void check_op_unmoved(const std::string& netlist, const fs::path& kept) {
    auto bare = bare_op(netlist);
    auto file = mirrorcheck::raw::read_raw(kept / "review.raw");
    REQUIRE(file.plots.at(0).kind() == "op");
    const auto& p = file.plots[0];
    std::size_t compared = 0;
    for (const auto& [node, volts] : bare) {
        auto k = p.find(node);
        REQUIRE_MESSAGE(k, node);
        CAPTURE(node);
        CHECK(std::abs(p.real[*k][0] - volts) < 1e-6);
        ++compared;
    }
    CHECK(compared >= 5);
}

}  // namespace

TEST_CASE("run on a mixed MOS and bipolar bias block: simulated equals linearised, op unmoved") {
    for (const char* mode : {"injected", "held"}) {
        CAPTURE(mode);
        Ran r = run(mixed_bias, std::string("--mode ") + mode);
        CHECK(outputs(r.report).size() == 5);
        check_simulated_equals_linearised(r.report);
        check_op_unmoved(mixed_bias, r.folder);
        for (const auto& o : outputs(r.report))
            CHECK(o["rout"]["probe_mode"] == (std::string(mode) == "held" ? "held" : "injected"));
    }
}

TEST_CASE("run on a whole amplifier: the mirror load's output, loaded by the pair") {
    Ran r = run(amplifier);
    check_simulated_equals_linearised(r.report);
    check_op_unmoved(amplifier, r.folder);
    bool loaded = false;
    for (const auto& f : r.report["findings"])
        loaded = loaded || (f["code"] == "loaded-output" && f["subject"] == "out" && f["severity"] == "info");
    CHECK(loaded);  // m2 sits on the output beside m4: information, not a defect
    for (const auto& f : r.report["findings"]) CHECK(f["code"] != "inspection-vs-own");
}

TEST_CASE("run gives the same review as a testbench written by hand") {
    Ran r = run(mixed_bias);
    // The hand testbench: the same circuit with AC current probes written into it, every
    // transistor's parameters saved, op and one AC run per output.
    std::string body = std::string(mixed_bias);
    body = body.substr(0, body.rfind(".end"));
    std::vector<std::string> nodes = {"casc", "pg", "psrc", "qout", "pout"};
    std::string deck = body, control = ".control\nsave all";
    for (const char* m : {"m1", "m2", "m3", "m4", "m5", "mp1", "mp2"})
        for (const char* q : {"id", "gm", "gds", "gmbs", "vdsat", "vds", "vgs", "vbs", "von"})
            control += std::string(" @") + m + "[" + q + "]";
    for (const char* q1 : {"q1", "q2", "q3", "q4"})
        for (const char* q : {"ic", "ib", "gm", "gpi", "gmu", "go", "vbe", "vbc"})
            control += std::string(" @") + q1 + "[" + q + "]";
    for (std::size_t k = 0; k < nodes.size(); ++k) {
        deck += "ihand" + std::to_string(k) + " 0 " + nodes[k] + " dc 0 ac 0\n";
        control += " @ihand" + std::to_string(k) + "[acmag]";
    }
    control += "\nop\nwrite tb.raw\nset appendwrite\n";
    for (std::size_t k = 0; k < nodes.size(); ++k)
        control += "alter @ihand" + std::to_string(k) + "[acmag]=1\nac dec 10 1 1g\nwrite tb.raw\nalter @ihand" +
                   std::to_string(k) + "[acmag]=0\n";
    auto tb = mirrorcheck::test::run_ngspice(deck + control + "quit 0\n.endc\n.end\n", "mc-run");
    REQUIRE_MESSAGE(tb.status == 0, tb.output);
    auto hand = mirrorcheck::test::run_cli("review deck.cir --op tb.raw --format json", tb.dir);
    REQUIRE_MESSAGE(hand.status != 2, hand.err);
    json h = json::parse(hand.out);
    CHECK(hand.status == r.status);
    auto a = outputs(r.report), b = outputs(h);
    REQUIRE(a.size() == b.size());
    for (std::size_t k = 0; k < a.size(); ++k) {
        CAPTURE(a[k]["node"]);
        CHECK(a[k]["node"] == b[k]["node"]);
        for (const char* v : {"linearised", "simulated"})
            CHECK(a[k]["rout"][v].get<double>() == doctest::Approx(b[k]["rout"][v].get<double>()).epsilon(1e-6));
        // run saves the drain junctions' gbd, which inspection puts across the output; the hand
        // testbench does not (ngspice's gmin there moves a 151 MΩ output by 1.5e-4)
        CHECK(a[k]["rout"]["inspection"].get<double>() ==
              doctest::Approx(b[k]["rout"]["inspection"].get<double>()).epsilon(1e-3));
    }
    std::vector<std::string> codes_run, codes_hand;
    for (const auto& f : r.report["findings"]) codes_run.push_back(f["code"].get<std::string>() + " " + f["subject"].get<std::string>());
    for (const auto& f : h["findings"]) codes_hand.push_back(f["code"].get<std::string>() + " " + f["subject"].get<std::string>());
    CHECK(codes_run == codes_hand);
}

// A deck as a designer writes it: a title, options, a temperature, a parameter override,
// a relative .include whose .lib names the corner library from the deck's folder, an AC
// stimulus that reaches an output (rf: 100 Ω from the driven input), analyses and output
// requests of every kind in any case, and its own control block.
const char* designer_deck =
    "Two mirrors and a loaded output, as a designer writes them\n"  // 1
    ".option scale=1e-6\n"                                            // 2
    ".options gmin=1e-13\n"                                           // 3
    ".temp 50\n"                                                      // 4
    ".include \"models/models.inc\"\n"                                // 5
    ".param iref=20u wout=20\n"                                       // 6
    ".param wout=10\n"                                                // 7
    "vdd vdd 0 3.3\n"                                                 // 8
    "vin in 0 dc 1.2 ac 1\n"                                          // 9
    "iref vdd ref {iref}\n"                                           // 10
    "m1 ref ref 0 0 nch w=10 l=1\n"                                   // 11
    "m2 out ref 0 0 nch w={wout} l=1\n"                               // 12
    "rl vdd out 50k\nrf in out 100\n"                                 // 13 14
    "m3 p ref 0 0 nch w=10 l=1\nmp1 p p vdd vdd pch w=20 l=1\nmp2 pout p vdd vdd pch w=20 l=1\nrp pout 0 40k\n"  // 15-18
    ".OP\n"                                                           // 19
    ".ac dec 10 1 1meg\n"                                             // 20
    ".Tran 1n\n+ 100n\n"                                              // 21 22
    ".dc vdd 0 3.3 0.1\n"                                             // 23
    ".tf v(out) vin\n"                                                // 24
    ".noise v(out) vin dec 10 1 1k\n"                                 // 25
    ".pz in 0 out 0 vol pz\n"                                         // 26
    ".meas tran vmax max v(out)\n"                                    // 27
    ".four 1meg v(out)\n"                                             // 28
    ".save all\n"                                                     // 29
    ".probe i(rl)\n"                                                  // 30
    ".print dc v(out)\n"                                              // 31
    ".control\n"                                                      // 32
    "save all\nop\nwrite own.raw\n"                                   // 33-35
    "quit 0\n"                                                        // 36
    ".endc\n"                                                         // 37
    ".end\n";                                                         // 38

void write_designer_folder(const fs::path& dir) {
    fs::create_directories(dir / "models");
    mirrorcheck::test::write_text(dir / "deck.cir", designer_deck);
    mirrorcheck::test::write_text(dir / "models" / "models.inc",
                                  "* the corner library, named from the deck's folder as ngspice does\n"
                                  ".lib 'corner.lib' typ\n");
    const std::string corner = ".lib typ\n.model nch nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=0.45 phi=0.7\n"
                               ".model pch pmos level=1 vto=-0.6 kp=80u lambda=0.08 gamma=0.4 phi=0.7\n.endl\n";
    mirrorcheck::test::write_text(dir / "corner.lib", corner);
    // beside the include: ngspice does not look here, so neither may the review
    mirrorcheck::test::write_text(dir / "models" / "corner.lib", ".lib typ\n.model nch nmos level=1 vto=0.9\n"
                                                                 ".model pch pmos level=1 vto=-0.9\n.endl\n");
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
}

// Every file under `dir` with its contents.
std::map<std::string, std::string> folder_contents(const fs::path& dir) {
    std::map<std::string, std::string> files;
    for (const auto& e : fs::recursive_directory_iterator(dir))
        if (e.is_regular_file()) files[fs::relative(e.path(), dir).string()] = mirrorcheck::test::read_text(e.path());
    return files;
}

std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> lines;
    std::istringstream in(text);
    for (std::string line; std::getline(in, line);) lines.push_back(line);
    return lines;
}

// ngspice's .tf output impedance at `node`, with `source` as the input, of the deck's circuit.
double tf_output_impedance(const fs::path& dir, const std::string& deck_body, const std::string& node,
                           const std::string& source) {
    mirrorcheck::test::write_text(dir / "tf.cir", deck_body + ".control\ntf v(" + node + ") " + source +
                                                      "\nprint all\nquit 0\n.endc\n.end\n");
    const int status = std::system(("cd '" + dir.string() + "' && ngspice -b tf.cir > tf.log 2>&1").c_str());
    const std::string log = mirrorcheck::test::read_text(dir / "tf.log");
    REQUIRE_MESSAGE(status == 0, log);
    auto printed = mirrorcheck::test::parse_print_output(log);
    auto it = printed.find("output_impedance_at_v(" + node + ")");
    REQUIRE_MESSAGE(it != printed.end(), log);
    return it->second.at(0).real();
}

TEST_CASE("run takes a designer's deck as it is: title, its own analyses and control block, relative .include and .lib") {
    auto dir = mirrorcheck::test::make_temp_dir("mc-run");
    write_designer_folder(dir);
    const auto before = folder_contents(dir);
    const fs::path kept = dir.string() + "-kept";
    auto r = mirrorcheck::test::run_cli("run deck.cir --keep '" + kept.string() + "' --format json", dir);
    REQUIRE_MESSAGE(r.status != 2, r.err);
    CHECK(folder_contents(dir) == before);  // nothing edited, nothing written beside the user's files
    json report = json::parse(r.out);
    CHECK(report["inputs"]["netlist"] == "deck.cir");
    const std::vector<std::string> left_out = {
        "deck.cir:19: .OP", "deck.cir:20: .ac dec 10 1 1meg", "deck.cir:21: .Tran 1n  100n",
        "deck.cir:23: .dc vdd 0 3.3 0.1", "deck.cir:24: .tf v(out) vin", "deck.cir:25: .noise v(out) vin dec 10 1 1k",
        "deck.cir:26: .pz in 0 out 0 vol pz", "deck.cir:27: .meas tran vmax max v(out)",
        "deck.cir:28: .four 1meg v(out)", "deck.cir:30: .probe i(rl)", "deck.cir:31: .print dc v(out)",
        "deck.cir:32: .control ... .endc"};
    CHECK(report["inputs"]["left_out"].get<std::vector<std::string>>() == left_out);
    CHECK(outputs(report).size() == 3);
    check_simulated_equals_linearised(report);
    // the derived deck: the user's lines, line for line; left-out lines and .end commented;
    // the include names a copy, since its relative .lib is found through the deck's folder
    const auto user = lines_of(designer_deck), derived = lines_of(mirrorcheck::test::read_text(kept / "review.cir"));
    REQUIRE(derived.size() > user.size());
    for (std::size_t n = 1; n <= user.size(); ++n) {
        CAPTURE(n);
        if (n == 5) CHECK(derived[n - 1] == ".include \"" + (kept / "include1-models.inc").string() + "\"");
        else if (n == 38) CHECK(derived[n - 1] == "*(the review's lines follow) .end");
        else if (n >= 19 && n != 29) CHECK(derived[n - 1] == "*(left out for the review) " + user[n - 1]);
        else CHECK(derived[n - 1] == user[n - 1]);
    }
    CHECK(mirrorcheck::test::read_text(kept / "include1-models.inc")
              .find(".lib \"" + (fs::canonical(dir) / "corner.lib").string() + "\" typ") != std::string::npos);

    // the operating point is the one of the user's own run of the deck, in its own folder
    auto own = mirrorcheck::test::make_temp_dir("mc-run");
    write_designer_folder(own);
    REQUIRE(std::system(("cd '" + own.string() + "' && ngspice -b deck.cir > own.log 2>&1").c_str()) == 0);
    auto theirs = mirrorcheck::raw::read_raw(own / "own.raw"), ours = mirrorcheck::raw::read_raw(kept / "review.raw");
    const auto& a = theirs.plots.at(0);
    const auto& b = ours.plots.at(0);
    for (const char* node : {"ref", "out", "p", "pout", "in"}) {
        CAPTURE(node);
        auto ka = a.find(std::string("v(") + node + ")"), kb = b.find(std::string("v(") + node + ")");
        REQUIRE((ka && kb));
        CHECK(std::abs(a.real[*ka][0] - b.real[*kb][0]) < 1e-6);
    }
    // the AC stimulus at vin reaches `out` through rf; the probe runs hold it at zero, so the
    // simulated value is ngspice's own .tf output impedance of the deck (which ignores AC values)
    std::string body = designer_deck;
    body = body.substr(0, body.find(".OP\n"));
    for (const auto& o : outputs(report))
        if (o["node"] == "out")
            CHECK(o["rout"]["simulated"].get<double>() ==
                  doctest::Approx(tf_output_impedance(own, body, "out", "vin")).epsilon(1e-3));
    fs::remove_all(own);
    fs::remove_all(kept);
    fs::remove_all(dir);
}

TEST_CASE("run holds an AC stimulus inside a subcircuit at zero too, by the name ngspice gives it") {
    // The stimulus reaches the output through 100 Ω: left on, it adds about 1 Ω to the
    // probe's 99.8 Ω (1 V of stimulus per 1 A of probe current).
    const std::string deck =
        "stimulus in a subcircuit\n.model nc nmos level=1 vto=0.5 kp=200u lambda=0.06\n"
        ".subckt drive n\nvsig n 0 dc 1.2 ac 1\n.ends\n"
        "vdd vdd 0 3.3\niref vdd ref 20u\nm1 ref ref 0 0 nc w=10u l=1u\nm2 out ref 0 0 nc w=10u l=1u\n"
        "rl vdd out 50k\nxsrc in drive\nrf in out 100\n.end\n";
    for (const char* mode : {"injected", "held"}) {
        CAPTURE(mode);
        Ran r = run(deck, std::string("--mode ") + mode);
        CHECK(outputs(r.report).size() == 1);
        check_simulated_equals_linearised(r.report);
        CHECK(mirrorcheck::test::read_text(r.folder / "review.cir").find("alter @v.xsrc.vsig[acmag]=0\n") !=
              std::string::npos);
    }
}

TEST_CASE("an included file with its own control block and analyses gets a derived copy; ngspice never runs them") {
    auto dir = mirrorcheck::test::make_temp_dir("mc-run");
    // ngspice runs an included file's .control block too, and its quit ends the run
    // (checked: `echo` inside it prints, and the top deck's block never starts).
    mirrorcheck::test::write_text(dir / "bench.inc", "* a testbench include\nrb vdd casc 40k\n.tran 1n 10n\n"
                                                     ".control\nop\nwrite marker.raw\nquit 0\n.endc\n");
    std::string deck = std::string(mixed_bias);
    deck = deck.substr(0, deck.find("rc vdd casc 40k")) + ".include bench.inc\n" +
           deck.substr(deck.find("rc vdd casc 40k") + 16);
    mirrorcheck::test::write_text(dir / "deck.cir", deck);
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
    const auto before = folder_contents(dir);
    auto r = mirrorcheck::test::run_cli("run deck.cir --keep kept --format json", dir);
    REQUIRE_MESSAGE(r.status != 2, r.err);
    CHECK_FALSE(fs::exists(dir / "marker.raw"));
    CHECK_FALSE(fs::exists(dir / "kept" / "marker.raw"));
    json report = json::parse(r.out);
    const auto bench = (fs::canonical(dir) / "bench.inc").string();
    CHECK(report["inputs"]["left_out"].get<std::vector<std::string>>() ==
          std::vector<std::string>{bench + ":3: .tran 1n 10n", bench + ":4: .control ... .endc"});
    CHECK(outputs(report).size() == 5);
    check_simulated_equals_linearised(report);
    CHECK(mirrorcheck::test::read_text(dir / "kept" / "include1-bench.inc").find("*(left out for the review) quit 0") !=
          std::string::npos);
    auto after = folder_contents(dir);
    for (const auto& [name, text] : before) CHECK(after.at(name) == text);
    fs::remove_all(dir);
}

TEST_CASE("errors in the user's deck are found before ngspice runs, with the user's file and line") {
    auto dir = mirrorcheck::test::make_temp_dir("mc-run");
    // a stand-in ngspice that leaves a mark if it is ever started
    mirrorcheck::test::write_text(dir / "marks.sh", "#!/bin/sh\ntouch \"$(dirname \"$0\")/started\"\nexit 0\n");
    fs::permissions(dir / "marks.sh", fs::perms::owner_all);
    mirrorcheck::test::write_text(dir / "corner.lib", ".lib tt\n.endl\n");
    struct Bad {
        const char* deck;
        const char* code;
        const char* where;
    };
    const std::vector<Bad> bad = {
        {"title\n.lib corner.lib ff\nvdd vdd 0 1\n", "netlist.missing-lib-section", "deck.cir:2:1"},
        {"title\nvdd vdd 0 1\n.include models/none.inc\n", "netlist.missing-include", "deck.cir:3:1"},
        {"title\nvdd vdd 0 1\n.control\nop\n", "netlist.unterminated", "deck.cir:3:1"},
    };
    for (const Bad& b : bad) {
        CAPTURE(b.code);
        mirrorcheck::test::write_text(dir / "deck.cir", b.deck);
        auto r = mirrorcheck::test::run_cli("run deck.cir --ngspice \"" + (dir / "marks.sh").string() + "\"", dir);
        CHECK(r.status == 2);
        CHECK(r.err.find(b.where) != std::string::npos);
        CHECK(r.err.find(b.code) != std::string::npos);
        CHECK_FALSE(fs::exists(dir / "started"));
        auto p = mirrorcheck::test::run_cli("prepare deck.cir -o d.cir", dir);
        CHECK(p.status == 2);
        CHECK(p.err.find(b.where) != std::string::npos);
    }
    fs::remove_all(dir);
}

TEST_CASE("run on one of ngspice's own example decks as it is: a title line, .options, .tran, .print, .plot") {
    if (!mirrorcheck::test::corpus_present()) return;
    const auto source = mirrorcheck::test::corpus_dir() / "ngspice/examples/xspice/original-examples/mosamp2.in";
    auto dir = mirrorcheck::test::make_temp_dir("mc-run");
    fs::copy_file(source, dir / "mosamp2.in");  // ngspice would write nothing; the copy keeps the corpus read-only
    auto r = mirrorcheck::test::run_cli("run mosamp2.in --format json", dir);
    REQUIRE_MESSAGE(r.status != 2, r.err);
    json report = json::parse(r.out);
    CHECK(report["inputs"]["left_out"].get<std::vector<std::string>>() ==
          std::vector<std::string>{"mosamp2.in:3: .tran 0.1us 10us", "mosamp2.in:40: .print tran v(20) v(66)",
                                   "mosamp2.in:41: .plot  tran v(20) v(66)"});
    CHECK(outputs(report).size() == 4);
    check_simulated_equals_linearised(report);
    std::error_code ec;
    fs::permissions(dir / "mosamp2.in", fs::perms::owner_write, fs::perm_options::add, ec);
    fs::remove_all(dir, ec);
}

// The lines `prepare` printed to run after it, as a shell would run them.
std::vector<std::string> printed_commands(const std::string& out) {
    std::vector<std::string> commands;
    std::istringstream in(out);
    for (std::string line; std::getline(in, line);)
        if (line.rfind("  cd ", 0) == 0 || line.rfind("  mirrorcheck ", 0) == 0) commands.push_back(line.substr(2));
    return commands;
}

TEST_CASE("prepare writes the deck and says how to run it; the netlist is left as it was") {
    auto dir = mirrorcheck::test::make_temp_dir("mc-run");
    mirrorcheck::test::write_text(dir / "netlist.cir", mixed_bias);
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
    fs::create_directories(dir / "work");
    auto r = mirrorcheck::test::run_cli("prepare netlist.cir -o work/review_deck.cir", dir);
    REQUIRE_MESSAGE(r.status == 0, r.err);
    CHECK(mirrorcheck::test::read_text(dir / "netlist.cir") == mixed_bias);
    const std::string deck = mirrorcheck::test::read_text(dir / "work" / "review_deck.cir");
    CHECK(deck.rfind("* mixed bias block\n", 0) == 0);  // the netlist's title first
    // the printed commands work as printed: ngspice in the netlist's folder, then the review
    auto commands = printed_commands(r.out);
    REQUIRE(commands.size() == 2);
    CHECK(commands[0].find("cd " + fs::canonical(dir).string() + " && ngspice -b ") == 0);
    CHECK(std::system((commands[0] + " > /dev/null 2>&1").c_str()) == 0);
    CHECK(fs::exists(dir / "work" / "review_deck.raw"));
    auto review = mirrorcheck::test::run_cli(commands[1].substr(std::string("mirrorcheck ").size()) + " --format json");
    REQUIRE_MESSAGE(review.status != 2, review.err);
    check_simulated_equals_linearised(json::parse(review.out));
    fs::remove_all(dir);
}

TEST_CASE("errors: ngspice missing, a netlist ngspice rejects, a run that ends without results") {
    auto dir = mirrorcheck::test::make_temp_dir("mc-run");
    mirrorcheck::test::write_text(dir / "netlist.cir", mixed_bias);

    auto backwards = mirrorcheck::test::run_cli("prepare netlist.cir -o d.cir --from 1MHz --to 1Hz", dir);
    CHECK(backwards.status == 2);
    CHECK_FALSE(fs::exists(dir / "d.cir"));

    auto over = mirrorcheck::test::run_cli("prepare netlist.cir -o netlist.cir", dir);
    CHECK(over.status == 2);
    CHECK(over.err.find("usage.output") != std::string::npos);

    auto missing = mirrorcheck::test::run_cli("run netlist.cir --ngspice /nonexistent/ngspice", dir);
    CHECK(missing.status == 2);
    CHECK(missing.err.find("ngspice.missing") != std::string::npos);

    // a MOS level this ngspice does not have: our reader accepts the deck, ngspice does not
    mirrorcheck::test::write_text(dir / "rejected.cir",
                                  "* rejected\n.model nd nmos level=77\nvdd vdd 0 3\nm1 a a 0 0 nd\ni1 vdd a 1m\n.end\n");
    auto rejected = mirrorcheck::test::run_cli("run rejected.cir", dir);
    CHECK(rejected.status == 2);
    CHECK(rejected.err.find("ngspice.failed") != std::string::npos);
    // the end of its log, a line each (not escaped into one line)
    CHECK(rejected.err.find("The end of its log:\n    ") != std::string::npos);
    CHECK(rejected.err.find("level") != std::string::npos);  // the end of ngspice's log names the cause

    // ngspice 39 recovered from every non-converging deck we tried (gmin and source stepping,
    // then a transient op), so a stand-in executable plays a run that gives up: it logs a
    // message, writes no results and exits 0, as a deck ending in `quit 0` does.
    mirrorcheck::test::write_text(dir / "gives-up.sh", "#!/bin/sh\necho 'op simulation failed: no convergence'\nexit 0\n");
    fs::permissions(dir / "gives-up.sh", fs::perms::owner_all);
    auto gave_up = mirrorcheck::test::run_cli("run netlist.cir --ngspice ./gives-up.sh", dir);
    CHECK(gave_up.status == 2);
    CHECK(gave_up.err.find("no convergence") != std::string::npos);
    CHECK(mirrorcheck::test::read_text(dir / "netlist.cir") == mixed_bias);
    fs::remove_all(dir);
}
