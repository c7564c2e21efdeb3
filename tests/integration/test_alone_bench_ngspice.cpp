// The testbench of each mirror alone that `prepare` and `run` write (src/deck/alone_deck.cpp)
// against the exact solve of the mirror alone (src/analyse/own_resistance.cpp): ngspice runs
// the bench, the designer's deck with every element but the mirror's left out and each net
// of the mirror at the circuit's operating voltage, and its value must be the exact solve's
// within 1e-6 (the same small-signal network at the same operating point). On every deck of
// tests/data/amplifiers (healthy and faulty), on a hierarchical OTA whose mirrors sit in a
// subcircuit and a nested one, and through `prepare` run by hand as its printout says.
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

using nlohmann::json;
namespace fs = std::filesystem;

const fs::path data = fs::path(MIRRORCHECK_SOURCE_DIR) / "tests" / "data";

json run_json(const std::string& args, const fs::path& cwd = {}) {
    const auto r = mirrorcheck::test::run_cli(args + " --format json", cwd);
    REQUIRE_MESSAGE(r.status != 2, args << ": " << r.err);
    CHECK(mirrorcheck::test::report_schema_errors(r.out) == "");
    return json::parse(r.out);
}

// Every output's own resistance against ngspice's run of its mirror alone.
void check_alone_equals_own(const json& report, const std::string& deck) {
    std::size_t outputs = 0;
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"]) {
            CAPTURE(deck);
            CAPTURE(m["id"]);
            CAPTURE(o["node"]);
            const json& rout = o["rout"];
            REQUIRE(rout["own"].is_number());
            REQUIRE_MESSAGE(rout["own_simulated"].is_number(), rout["own_simulated_note"]);
            CHECK(rout["own_simulated"].get<double>() == doctest::Approx(rout["own"].get<double>()).epsilon(1e-6));
            bool compared = false;
            for (const auto& c : rout["comparisons"])
                if (c["pair"] == "own-vs-simulated-alone") compared = c["agrees"].get<bool>();
            CHECK(compared);
            ++outputs;
        }
    CHECK(outputs > 0);
    for (const auto& f : report["findings"]) CHECK(f["code"] != "own-vs-simulated");
}

std::vector<std::string> amplifier_decks() {
    std::vector<std::string> decks;
    for (const auto& e : fs::directory_iterator(data / "amplifiers"))
        if (e.path().extension() == ".cir") decks.push_back(e.path().filename().string());
    std::sort(decks.begin(), decks.end());
    return decks;
}

}  // namespace

TEST_CASE("the mirror alone in ngspice equals the exact solve of the mirror alone, on every amplifier deck") {
    const auto decks = amplifier_decks();
    CHECK(decks.size() == 18);
    for (const std::string& deck : decks)
        check_alone_equals_own(run_json("run '" + (data / "amplifiers" / deck).string() + "'"), deck);
}

TEST_CASE("mirrors inside a subcircuit and a nested one: the bench copies both, keeping only the mirror") {
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-alone");
    const std::string deck = mirrorcheck::test::read_text(data / "alone" / "ota_in_subcircuits.cir");
    mirrorcheck::test::write_text(dir / "ota.cir", deck);
    check_alone_equals_own(run_json("run ota.cir --keep kept", dir), "ota_in_subcircuits.cir");
    CHECK(mirrorcheck::test::read_text(dir / "ota.cir") == deck);

    // The tail sink's bench: the OTA and the sink copied, the leakage resistor and every
    // OTA device left out, the mirror's lines as written (the continuation too).
    const std::string bench = mirrorcheck::test::read_text(dir / "kept" / "review.alone1.cir");
    const std::string why = "*(not part of nmos-simple:m.x1.xs.m6) ";
    CHECK(bench.find("x1 inp inn out vdd ota_mc_alone1_1 wl=10u\n") != std::string::npos);
    CHECK(bench.find(".subckt ota_mc_alone1_1 inp inn out vdd wl=10u\n" + why + "xs tail nb sink\n"
                     "xs tail nb sink_mc_alone1_2\n" + why + "iref vdd nb 20u\n") != std::string::npos);
    CHECK(bench.find(".subckt sink_mc_alone1_2 tail nb\nm5 nb nb 0 0 nch w=4u l=1u\n" + why +
                     "rleak tail 0 10meg\nm6 tail nb 0 0 nch\n+ w=8u l=1u\n.ends sink\n") != std::string::npos);
    CHECK(bench.find(why + "x1 inp inn out vdd ota wl=10u\n") != std::string::npos);
    CHECK(bench.find(why + "rl out 0 1meg\n") != std::string::npos);
    CHECK(bench.find(why + "vdd vdd 0 1.8\n") != std::string::npos);
    // its reference is free (an inductor to its voltage), its output held by the measuring source
    CHECK(bench.find("lmc_fix1 mc_fix1 x1.nb 1e18\n") != std::string::npos);
    CHECK(bench.find("vmc_own1 x1.tail 0 dc 0 ac 0\n") != std::string::npos);
    fs::remove_all(dir);
}

TEST_CASE("prepare writes the benches beside its deck and lists them; ngspice run by hand gives the same values") {
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-alone");
    fs::copy_file(data / "amplifiers" / "folded_cascode.cir", dir / "fc.cir");
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
    auto r = mirrorcheck::test::run_cli("prepare fc.cir -o work/fc_review.cir", dir);
    REQUIRE_MESSAGE(r.status == 0, r.err);
    for (int n = 1; n <= 4; ++n) {
        const fs::path bench = fs::canonical(dir) / "work" / ("fc_review.alone" + std::to_string(n) + ".cir");
        CHECK(fs::exists(bench));
        CHECK(r.out.find(bench.string()) != std::string::npos);
    }
    CHECK(!fs::exists(dir / "work" / "fc_review.alone5.cir"));
    const std::string cmd = "cd '" + dir.string() + "' && ngspice -b work/fc_review.cir > /dev/null 2>&1";
    REQUIRE(std::system(cmd.c_str()) == 0);
    check_alone_equals_own(run_json("review work/fc_review.cir --op work/fc_review.raw", dir), "folded_cascode.cir");
    fs::remove_all(dir);
}

TEST_CASE("--no-alone: no bench, no value of the mirror alone from ngspice, and nothing said about it") {
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-alone");
    fs::copy_file(data / "amplifiers" / "ota_5t.cir", dir / "ota.cir");
    const json report = run_json("run ota.cir --no-alone --keep kept", dir);
    CHECK(!fs::exists(dir / "kept" / "review.alone1.cir"));
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"]) {
            CHECK(o["rout"]["own_simulated"].is_null());
            CHECK(o["rout"]["own_simulated_note"] == "");
            CHECK(o["rout"]["own"].is_number());
        }
    for (const auto& f : report["findings"]) CHECK(f["code"] != "not-simulated");
    fs::remove_all(dir);
}
