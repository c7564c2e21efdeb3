// `mirrorcheck list` as a user runs it: table and JSON on the shipped sample and on
// recognition decks, no mirrors in a circuit without any, and exit status 2 on a bad deck.
#include <cstdlib>
#include <filesystem>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/run_cli.hpp"

namespace {

using Result = mirrorcheck::test::CliResult;

Result list(const std::string& args) { return mirrorcheck::test::run_cli("list " + args); }

std::string recognise_deck(const std::string& name) {
    return std::string(MIRRORCHECK_TEST_DATA) + "/recognise/" + name;
}

}  // namespace

TEST_CASE("list on the shipped sample finds its cascode, its simple mirrors and the npn mirror") {
    Result r = list(std::string(MIRRORCHECK_SOURCE_DIR) + "/samples/tamarack/bias.cir --format json");
    REQUIRE(r.status == 0);
    auto j = nlohmann::json::parse(r.out);
    CHECK(j["schema"] == "mirrorcheck-list/1");
    bool cascode = false, npn = false;
    for (const auto& m : j["mirrors"]) {
        if (m["family"] == "nmos-cascode") {
            cascode = true;
            CHECK(m["outputs"][0]["node"] == "tail");
            CHECK(m["outputs"][0]["devices"] == nlohmann::json({"mn3", "mn4"}));
            CHECK(m["outputs"][0]["design_ratio"] == 2.0);  // w=8u over w=4u, same l
        }
        npn = npn || (m["family"] == "npn-simple" && m["outputs"][0]["node"] == "bg");
    }
    CHECK(cascode);
    CHECK(npn);
}

TEST_CASE("list as a table names the family, the reference and each output") {
    Result r = list("'" + recognise_deck("pmos_wilson.cir") + "'");
    REQUIRE(r.status == 0);
    CHECK(r.out.find("pmos-wilson:") != std::string::npos);
    CHECK(r.out.find("reference") != std::string::npos);
    CHECK(r.out.find("output") != std::string::npos);
}

TEST_CASE("a differential pair holds no mirror") {
    Result r = list("'" + recognise_deck("diff_pair.cir") + "' --format json");
    REQUIRE(r.status == 0);
    std::size_t mirrors = 0;
    const auto report = nlohmann::json::parse(r.out);  // named: a temporary would die before the loop
    for (const auto& m : report["mirrors"])
        mirrors += m["family"].get<std::string>().find("current-source") == std::string::npos;
    CHECK(mirrors == 0);
}

TEST_CASE("a deck that cannot be read: exit status 2 and the file named") {
    auto dir = mirrorcheck::test::make_temp_dir("mc-list-bad");
    mirrorcheck::test::write_text(dir / "bad.cir", "* bad\nm1 d g s nosuchmodel\n.end\n");
    Result r = list("'" + (dir / "bad.cir").string() + "'");
    CHECK(r.status == 2);
    CHECK(r.err.find("bad.cir:2") != std::string::npos);
    std::filesystem::remove_all(dir);
}

TEST_CASE("a regulated cascode lists its booster and the booster's load, and no output for the load") {
    const std::string deck = std::string(MIRRORCHECK_TEST_DATA) + "/amplifiers/regulated_cascode.cir";
    Result r = list("'" + deck + "' --format json");
    REQUIRE(r.status == 0);
    const auto j = nlohmann::json::parse(r.out);
    bool found = false;
    for (const auto& m : j["mirrors"]) {
        if (m["family"] != "nmos-regulated-cascode") continue;
        found = true;
        CHECK(m["helpers"] == nlohmann::json::array({"mn5"}));
        CHECK(m["helper_loads"] == nlohmann::json::array({"mp6"}));
    }
    CHECK(found);
    for (const auto& m : j["mirrors"])
        for (const auto& o : m["outputs"]) CHECK(o["node"] != "a");  // the booster's drain is no output
    Result table = list("'" + deck + "'");
    CHECK(table.out.find("helper load mp6") != std::string::npos);
}
