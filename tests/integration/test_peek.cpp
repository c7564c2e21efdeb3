// `mirrorcheck peek` as a user runs it: exit statuses, the table, JSON that parses, and
// the corrupt-file catalogue giving exit status 2 with its error code on stderr.
#include <cstdlib>
#include <filesystem>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/run_cli.hpp"

namespace {

using Result = mirrorcheck::test::CliResult;

Result peek(const std::string& args) { return mirrorcheck::test::run_cli("peek " + args); }

std::string data(const std::string& name) { return std::string(MIRRORCHECK_TEST_DATA) + "/" + name; }
std::string sample(const std::string& name) { return std::string(MIRRORCHECK_SOURCE_DIR) + "/samples/" + name; }

}  // namespace

TEST_CASE("peek on the shipped sample: plots, variables and a vector's value") {
    Result r = peek(sample("tamarack/bias_op.raw") + " --vector 'v(vdd)'");
    CHECK(r.status == 0);
    CHECK(r.err.empty());
    CHECK(r.out.find("Operating Point") != std::string::npos);
    CHECK(r.out.find("@mn4[gm]") != std::string::npos);
    CHECK(r.out.find("3.3") != std::string::npos);  // the sample's supply
}

TEST_CASE("peek --format json parses and carries the values read") {
    Result r = peek(data("raw/three_plots.raw") + " --format json --vector 'i(vout)' --plot ac");
    REQUIRE(r.status == 0);
    auto j = nlohmann::json::parse(r.out);
    CHECK(j["kind"] == "raw");
    REQUIRE(j["plots"].size() == 3);
    CHECK(j["plots"][2]["kind"] == "ac");
    CHECK(j["plots"][2]["complex"] == true);
    CHECK(j["plots"][2]["vectors"]["i(vout)"].size() == 3);
    CHECK(j["plots"][0]["vectors"].empty());  // op was not selected, so not decoded
}

TEST_CASE("peek on a listing lists its devices") {
    Result r = peek(sample("tamarack/bias_show.txt") + " --format json");
    REQUIRE(r.status == 0);
    auto j = nlohmann::json::parse(r.out);
    CHECK(j["kind"] == "listing");
    bool found = false;
    for (const auto& d : j["devices"])
        if (d["name"] == "mn4") found = d["model"] == "tk_n" && d["parameters"].contains("gm");
    CHECK(found);
}

TEST_CASE("usage errors exit with status 2") {
    CHECK(peek(data("raw/three_plots.raw") + " --vector 'v(nowhere)'").status == 2);
    CHECK(peek(data("raw/no-such-file.raw")).status == 2);
    CHECK(peek(data("raw/three_plots.raw") + " --format xml").status == 2);
    CHECK(peek("").status == 2);
}

TEST_CASE("every corrupt raw file: exit status 2, the error code and location on stderr, nothing on stdout") {
    std::size_t count = 0;
    for (const auto& entry : std::filesystem::directory_iterator(data("raw/corrupt"))) {
        const std::string file = entry.path().filename().string();
        CAPTURE(file);
        Result r = peek("'" + entry.path().string() + "'");
        CHECK(r.status == 2);
        CHECK(r.out.empty());
        CHECK(r.err.find(file) != std::string::npos);
        CHECK(r.err.find("error: ") != std::string::npos);
        ++count;
    }
    CHECK(count >= 15);
}
