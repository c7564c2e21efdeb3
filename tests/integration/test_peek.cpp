// `mirrorcheck peek` as a user runs it: exit statuses, the short summary by default, a
// plot's variables on request, a vector's values alone with their unit, JSON that parses
// with every digit, and the corrupt-file catalogue giving exit status 2 with its error code.
#include <cstdlib>
#include <filesystem>
#include <sstream>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/run_cli.hpp"

namespace {

using Result = mirrorcheck::test::CliResult;

Result peek(const std::string& args) { return mirrorcheck::test::run_cli("peek " + args); }

std::string data(const std::string& name) { return std::string(MIRRORCHECK_TEST_DATA) + "/" + name; }
std::string sample(const std::string& name) { return std::string(MIRRORCHECK_SOURCE_DIR) + "/samples/" + name; }

std::size_t lines(const std::string& text) {
    std::size_t n = 0;
    for (char c : text) n += c == '\n';
    return n;
}

}  // namespace

TEST_CASE("peek on the shipped sample: one line per plot, no variable tables") {
    Result r = peek(sample("tamarack/bias_op.raw"));
    CHECK(r.status == 0);
    CHECK(r.err.empty());
    CHECK(lines(r.out) == 1 + 17 + 1);  // the file, 17 plots, the hint
    CHECK(r.out.find("plot 1: Operating Point [op], real, 1 point, 221 variables") != std::string::npos);
    CHECK(r.out.find("4 points from 1 Hz to 1 kHz") != std::string::npos);
    CHECK(r.out.find("@mn4[gm]") == std::string::npos);
}

TEST_CASE("peek --plot lists the variables of those plots only") {
    Result r = peek(sample("tamarack/bias_op.raw") + " --plot op");
    CHECK(r.status == 0);
    CHECK(r.out.find("@mn4[gm]") != std::string::npos);
    CHECK(r.out.find("plot 1: Operating Point") != std::string::npos);
    CHECK(r.out.find("AC Analysis") == std::string::npos);
}

TEST_CASE("peek --vector prints the value alone, with its unit and an SI prefix") {
    // The README's example: mn4's Vds in the op plot (ngspice wrote 0.2468...)
    Result r = peek(sample("tamarack/bias_op.raw") + " --plot op --vector '@mn4[vds]'");
    CHECK(r.status == 0);
    CHECK(r.out == "@mn4[vds] = 247 mV  (plot 1, Operating Point)\n");
    Result supply = peek(sample("tamarack/bias_op.raw") + " --plot op --vector 'v(vdd)'");
    CHECK(supply.out == "v(vdd) = 3.3 V  (plot 1, Operating Point)\n");
    Result gm = peek(sample("tamarack/bias_op.raw") + " --plot op --vector '@mn4[gm]'");
    CHECK(gm.out.find("190 µS") != std::string::npos);
    // an AC vector: one line per frequency, magnitude and phase
    Result ac = peek(data("raw/three_plots.raw") + " --plot ac --vector 'v(out)'");
    CHECK(ac.status == 0);
    CHECK(ac.out.find("v(out) in plot 3") == 0);
    CHECK(lines(ac.out) == 1 + 3);
    CHECK(ac.out.find("∠") != std::string::npos);
}

TEST_CASE("peek --format json parses and carries the values read, in full precision") {
    Result r = peek(data("raw/three_plots.raw") + " --format json --vector 'i(vout)' --plot ac");
    REQUIRE(r.status == 0);
    auto j = nlohmann::json::parse(r.out);
    CHECK(j["kind"] == "raw");
    REQUIRE(j["plots"].size() == 3);
    CHECK(j["plots"][2]["kind"] == "ac");
    CHECK(j["plots"][2]["complex"] == true);
    CHECK(j["plots"][2]["vectors"]["i(vout)"].size() == 3);
    CHECK(j["plots"][0]["vectors"].empty());  // op was not selected, so not decoded
    Result vds = peek(sample("tamarack/bias_op.raw") + " --format json --plot op --vector '@mn4[vds]'");
    auto k = nlohmann::json::parse(vds.out);
    const double value = k["plots"][0]["vectors"]["@mn4[vds]"][0];
    CHECK(value == doctest::Approx(0.2468).epsilon(1e-3));
    CHECK(value != doctest::Approx(0.247).epsilon(1e-9));  // not rounded to the table's digits
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

// A hostile probe's minimal input: a 4-byte title followed by byte 0xDD, not UTF-8.
TEST_CASE("peek and list --format json of a netlist whose names are not UTF-8: U+FFFD, not an internal error") {
    for (const std::string command : {"peek ", "list "}) {
        Result r = mirrorcheck::test::run_cli(command + data("netlist/title_not_utf8.cir") + " --format json");
        CHECK(r.status == 0);
        const auto j = nlohmann::json::parse(r.out);
        CHECK(j["title"] == "{a}\xEF\xBF\xBD");
    }
}

// Names with a byte that is not UTF-8 (0xFF) and a terminal escape (ESC c resets the
// terminal): the tables show them as \xNN, so a terminal or CI log is not garbled.
TEST_CASE("peek and list tables escape names that are not UTF-8 or hold control bytes") {
    for (const std::string command : {"peek ", "list "}) {
        CAPTURE(command);
        Result r = mirrorcheck::test::run_cli(command + data("netlist/names_not_utf8.cir"));
        CHECK(r.status == 0);
        CHECK(r.out.find('\xff') == std::string::npos);
        CHECK(r.out.find('\x1b') == std::string::npos);
        if (command == "peek ") {
            CHECK(r.out.find("d\\xff") != std::string::npos);
            CHECK(r.out.find("o\\x1bc") != std::string::npos);
        }
    }
}
