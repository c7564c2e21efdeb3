// `mirrorcheck review` as a user runs it, on decks simulated by ngspice in the test:
// exit status 1 with an out-of-saturation error when a cascode's output voltage is too
// low (its region must agree with ngspice's own vds < vdsat), exit 0 and JSON following
// the report contract (DESIGN.md, version 1) when the same mirror has headroom, the same
// review from the `show` listing as from the raw file, and exit 2 when the operating
// point lacks the device parameters, with the save line to add.
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"
#include "support/ngspice_run.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

using Result = mirrorcheck::test::CliResult;

// Runs `mirrorcheck review ARGS`; a JSON report is checked against the schema.
Result review(const std::filesystem::path& dir, const std::string& args) {
    Result r = mirrorcheck::test::run_cli("review " + args, dir);
    if (args.find("--format json") != std::string::npos && r.status < 2)
        CHECK(mirrorcheck::test::report_schema_errors(r.out) == "");
    return r;
}

std::size_t longest_line(const std::string& text) {
    std::size_t longest = 0, width = 0;
    for (char c : text) {
        if (c == '\n') {
            longest = std::max(longest, width);
            width = 0;
        } else if ((static_cast<unsigned char>(c) & 0xC0) != 0x80) {
            ++width;  // one character per UTF-8 sequence
        }
    }
    return std::max(longest, width);
}

// A level-1 NMOS cascode sink, 1:1, with its output held at `vout`.
std::string cascode_deck(double vout, bool save_parameters) {
    std::string saves = save_parameters ? "save all @m1[id] @m1[gm] @m1[gds] @m1[gmbs] @m1[vdsat] @m1[vds] @m1[vgs] "
                                          "@m1[vbs] @m1[von] @m2[id] @m2[gm] @m2[gds] @m2[gmbs] @m2[vdsat] @m2[vds] "
                                          "@m2[vgs] @m2[vbs] @m2[von] @m3[id] @m3[gm] @m3[gds] @m3[gmbs] @m3[vdsat] "
                                          "@m3[vds] @m3[vgs] @m3[vbs] @m3[von] @m4[id] @m4[gm] @m4[gds] @m4[gmbs] "
                                          "@m4[vdsat] @m4[vds] @m4[vgs] @m4[vbs] @m4[von]\n"
                                        : "save all\n";
    return "* cascode sink\n.model nc nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=0.45 phi=0.7\n"
           "vdd vdd 0 3\niref vdd top dc 40u\nm2 top top mid 0 nc w=10u l=1u\nm1 mid mid 0 0 nc w=10u l=1u\n"
           "m4 out top s4 0 nc w=10u l=1u\nm3 s4 mid 0 0 nc w=10u l=1u\nvout out 0 dc " +
           std::to_string(vout) + "\n.control\n" + saves +
           "op\nwrite op.raw\nshow all > show.txt\nquit 0\n.endc\n.end\n";
}

}  // namespace

TEST_CASE("a cascode without headroom: error finding, exit 1, region as ngspice's vds < vdsat") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(0.7, true), "mc-review");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    auto raw = mirrorcheck::raw::read_raw(run.file("op.raw"));
    const auto& op = raw.plots[0];
    double vds = op.real[*op.find("@m4[vds]")][0], vdsat = op.real[*op.find("@m4[vdsat]")][0];
    REQUIRE(vds < vdsat);  // the deck does what this case is about, by ngspice's own numbers
    Result r = review(run.dir, "deck.cir --op op.raw --format json");
    CHECK(r.status == 1);
    auto j = nlohmann::json::parse(r.out);
    bool flagged = false;
    for (const auto& f : j["findings"]) flagged = flagged || (f["code"] == "out-of-saturation" && f["subject"] == "m4");
    CHECK(flagged);
    for (const auto& d : j["devices"])
        if (d["name"] == "m4") CHECK(d["region"] != "saturation");
}

TEST_CASE("the same cascode with headroom: exit 0 and the report contract's fields") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, true), "mc-review");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    Result r = review(run.dir, "deck.cir --op op.raw --format json");
    CHECK(r.status == 0);
    auto j = nlohmann::json::parse(r.out);
    CHECK(j["schema"] == "mirrorcheck-report/1");
    REQUIRE(j["mirrors"].size() == 1);
    const auto& m = j["mirrors"][0];
    CHECK(m["family"] == "nmos-cascode");
    CHECK(m["reference"] == nlohmann::json({"m1", "m2"}));
    const auto& o = m["outputs"][0];
    CHECK(o["node"] == "out");
    CHECK(o["devices"] == nlohmann::json({"m3", "m4"}));
    CHECK(o["rout"]["inspection"].get<double>() > o["rout"]["inspection_no_body"].get<double>());
    // Nothing loads this output but the probe, which the solve removes: the whole-circuit
    // value equals the exact-for-cascodes inspection value (HANDCALC.md section 2).
    CHECK(o["rout"]["linearised"].get<double>() == doctest::Approx(o["rout"]["inspection"].get<double>()).epsilon(1e-6));
    CHECK(o["rout"]["simulated"].is_null());
    CHECK(o["headroom"]["vout"] == doctest::Approx(2.0));
    CHECK(o["headroom"]["vout_min"].get<double>() < 2.0);
    CHECK(o["current"]["ratio"] == doctest::Approx(o["current"]["out"].get<double>() / o["current"]["ref"].get<double>()));
    CHECK(j["summary"]["errors"] == 0);

    SUBCASE("the show listing gives the same resistance as the raw file, to its 6 digits") {
        Result l = review(run.dir, "deck.cir --op show.txt --format json");
        REQUIRE(l.status == 0);
        auto k = nlohmann::json::parse(l.out);
        CHECK(k["mirrors"][0]["outputs"][0]["rout"]["inspection"].get<double>() ==
              doctest::Approx(o["rout"]["inspection"].get<double>()).epsilon(1e-4));
    }
}

TEST_CASE("an op without device parameters: exit 2 and the save line to add") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, false), "mc-review");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    Result r = review(run.dir, "deck.cir --op op.raw");
    CHECK(r.status == 2);
    CHECK(r.err.find("op.missing-parameters") != std::string::npos);
    CHECK(r.err.find("@m4[gm]") != std::string::npos);
}

TEST_CASE("option values need their unit; negative margins and tolerances are refused; all exit 2") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, true), "mc-review");
    REQUIRE(run.status == 0);
    struct Case {
        std::string options;
        const char* code;  // on stderr
        const char* hint;  // the accepted form it suggests
    };
    for (const Case& c : {Case{"--margin 100", "usage.missing-unit", "100mV"},  // once read as 100 V
                          Case{"--tolerance 10", "usage.missing-unit", "10%"},  // once read as 1000 %
                          Case{"--vce-sat 0.2", "usage.missing-unit", "0.1V"},
                          Case{"--at 10", "usage.missing-unit", "1kHz"},
                          Case{"--margin 100m", "usage.missing-unit", "100mV"},
                          Case{"--margin 100mA", "usage.bad-quantity", "100mV"},
                          Case{"--margin -50mV", "usage.negative-value", "0 or more"},
                          Case{"--tolerance -10%", "usage.negative-value", "0 or more"},
                          Case{"--ratio-tolerance -5%", "usage.negative-value", "0 or more"},
                          // a hostile probe: these once switched the check off or were ignored
                          Case{"--margin nanV", "usage.not-finite", "not a finite number"},
                          Case{"--tolerance inf%", "usage.not-finite", "not a finite number"},
                          Case{"--probe nonode=vout", "usage.probe", "no node `nonode`"},
                          Case{"--probe out=vnosuch", "usage.probe", "no source `vnosuch`"}}) {
        CAPTURE(c.options);
        Result r = review(run.dir, "deck.cir --op op.raw " + c.options);
        CHECK(r.status == 2);
        CHECK(r.out.empty());
        CHECK(r.err.find(c.code) != std::string::npos);
        CHECK(r.err.find(c.hint) != std::string::npos);
    }
    CHECK(review(run.dir, "deck.cir --op op.raw --margin 50mV --tolerance 10% --vce-sat 0.2V").status == 0);
    CHECK(review(run.dir, "deck.cir --op op.raw --fail-on info").status == 2);
    CHECK(review(run.dir, "deck.cir --op op.raw --format xml").status == 2);
}

TEST_CASE("--fail-on warning fails on a warning that error severity lets pass") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, true), "mc-review");
    REQUIRE(run.status == 0);
    // A margin asked for above every device's: low-margin warnings, no error.
    Result pass = review(run.dir, "deck.cir --op op.raw --margin 2V --format json");
    CHECK(pass.status == 0);
    auto j = nlohmann::json::parse(pass.out);
    CHECK(j["summary"]["warnings"].get<int>() > 0);
    CHECK(j["summary"]["errors"] == 0);
    CHECK(j["summary"]["passed"] == true);
    CHECK(j["mirrors"][0]["outputs"][0]["status"] == "pass");
    Result fail = review(run.dir, "deck.cir --op op.raw --margin 2V --fail-on warning --format json");
    CHECK(fail.status == 1);
    auto k = nlohmann::json::parse(fail.out);
    CHECK(k["settings"]["fail_on"] == "warning");
    CHECK(k["summary"]["passed"] == false);
    CHECK(k["mirrors"][0]["outputs"][0]["status"] == "fail");
}

TEST_CASE("the table: the verdict and the summary first, --summary alone, no line wider than 120") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(0.7, true), "mc-review");
    REQUIRE(run.status == 0);
    Result full = review(run.dir, "deck.cir --op op.raw");
    CHECK(full.status == 1);
    // line 2 is the verdict, then the summary table's header and the output's row
    const std::size_t verdict = full.out.find('\n') + 1;
    CHECK(full.out.substr(verdict, 4) == "fail");
    const std::size_t header = full.out.find("output  status");
    REQUIRE(header != std::string::npos);
    CHECK(header < full.out.find("nmos-cascode:m4,"));  // before the mirror's block
    CHECK(full.out.find("\nout     fail") != std::string::npos);
    CHECK(longest_line(full.out) <= 120);  // stdout is a file here, not a terminal
    CHECK(full.out.find('\x1b') == std::string::npos);  // no colour outside a terminal

    Result summary = review(run.dir, "deck.cir --op op.raw --summary");
    CHECK(summary.status == 1);
    CHECK(summary.out == full.out.substr(0, summary.out.size()));
    CHECK(summary.out.find("nmos-cascode:m4,") == std::string::npos);
    CHECK(summary.out.find("out-of-saturation") == std::string::npos);
}

TEST_CASE("--help names every exit status, 3 for an internal error") {
    Result help = mirrorcheck::test::run_cli("review --help");
    CHECK(help.status == 0);
    for (const char* status : {"0 no unwaived finding", "1 some", "2 bad usage", "3 an internal error"})
        CHECK(help.out.find(status) != std::string::npos);
}

// From a hostile probe: +Inf and NaN in an op raw file read as "saturation, margin inf V"
// and as cutoff. ngspice writes the op here; the test puts the bad value into a copy.
TEST_CASE("a non-finite value in the op (binary raw, ASCII raw, listing): exit 2 at its place") {
    auto run = mirrorcheck::test::run_ngspice(cascode_deck(2.0, true), "mc-review");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    auto raw = mirrorcheck::raw::read_raw(run.file("op.raw"));
    const auto& op = raw.plots[0];
    const std::size_t gm = *op.find("@m4[gm]");
    const auto where = mirrorcheck::raw::value_location(raw, op, gm, 0);
    REQUIRE(where.byte_offset);
    {
        std::string bytes = mirrorcheck::test::read_text(run.file("op.raw"));
        const double inf = HUGE_VAL;
        bytes.replace(*where.byte_offset, 8, reinterpret_cast<const char*>(&inf), 8);
        mirrorcheck::test::write_text(run.dir / "inf.raw", bytes);
    }
    Result r = review(run.dir, "deck.cir --op inf.raw");
    CHECK(r.status == 2);
    CHECK(r.err.find("inf.raw: byte " + std::to_string(*where.byte_offset)) != std::string::npos);
    CHECK(r.err.find("`@m4[gm]`") != std::string::npos);
    CHECK(r.err.find("+infinity") != std::string::npos);
    CHECK(r.err.find("[op.not-finite]") != std::string::npos);

    // ngspice's listing with one value written as `nan`
    std::string listing = mirrorcheck::test::read_text(run.file("show.txt"));
    const auto row = listing.find(" gm ");  // `         gm           0.000408315 ...`
    REQUIRE(row != std::string::npos);
    const auto value = listing.find_first_not_of(' ', row + 3);
    const auto end = listing.find(' ', value);
    listing.replace(value, end - value, "nan");
    mirrorcheck::test::write_text(run.dir / "nan.txt", listing);
    Result l = review(run.dir, "deck.cir --op nan.txt");
    CHECK(l.status == 2);
    CHECK(l.err.find("gm` in the plot `show listing` is not a number (NaN)") != std::string::npos);
    CHECK(l.err.find("nan.txt: error:") != std::string::npos);
    CHECK(l.err.find("[op.not-finite]") != std::string::npos);
}

// From the same probe: AC plots at NaN or negative frequencies were read, and the impedance
// reported "at -1 Hz". The sample's results file (ngspice's) with one frequency spoiled.
TEST_CASE("an AC plot at a negative or NaN frequency: exit 2 naming the plot, point and byte") {
    const std::string source = std::string(MIRRORCHECK_SOURCE_DIR) + "/samples/tamarack/";
    auto raw = mirrorcheck::raw::read_raw(source + "bias_op.raw");
    std::size_t k = 0;
    while (k < raw.plots.size() && raw.plots[k].kind() != "ac") ++k;
    REQUIRE(k < raw.plots.size());
    const auto& ac = raw.plots[k];
    REQUIRE(ac.variables[0].type == "frequency");
    const auto where = mirrorcheck::raw::value_location(raw, ac, 0, 1);
    REQUIRE(where.byte_offset);
    const auto dir = mirrorcheck::test::make_temp_dir("mc-review-ac");
    std::filesystem::copy_file(source + "bias.cir", dir / "bias.cir");
    for (const double bad : {-1.0, std::nan("")}) {
        std::string bytes = mirrorcheck::test::read_text(source + "bias_op.raw");
        bytes.replace(*where.byte_offset, 8, reinterpret_cast<const char*>(&bad), 8);
        mirrorcheck::test::write_text(dir / "bad.raw", bytes);
        Result r = review(dir, "bias.cir --op bad.raw");
        CHECK(r.status == 2);
        CHECK(r.err.find("bad.raw: byte " + std::to_string(*where.byte_offset)) != std::string::npos);
        CHECK(r.err.find("point 2 of the plot `" + ac.name + "`") != std::string::npos);
        CHECK(r.err.find("[ac.bad-frequency]") != std::string::npos);
    }
    std::filesystem::remove_all(dir);
}
