// The JUnit XML back end on a review of a deck simulated by ngspice in the test, read back
// by an XML parser that is not ours (Python's xml.etree.ElementTree, from Debian's
// python3): the document is well-formed, has one test case per mirror output, a <failure>
// for each unwaived error finding of that output and nothing else, counts that agree with
// its elements, and names with XML's special characters (a device `mp<2>&x` on node
// `o<u>t&b`, which ngspice accepts) come back as written. A waived error stops failing.
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <map>
#include <set>
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "parsers/waivers/waivers.hpp"
#include "src/analyse/build_review_tree.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/model/op_point_build.hpp"
#include "src/report/finding_text.hpp"
#include "src/report/junit_report.hpp"
#include "support/ngspice_run.hpp"

using namespace mirrorcheck;
using nlohmann::json;

namespace {

const std::vector<std::string> transistors = {"m1", "m2", "m3", "m4", "mp1", "mp<2>&x", "mp3"};

// An NMOS cascode sink whose output is held at 0.7 V, too low for m4 to stay saturated, and
// a healthy PMOS source with two outputs (1:1 and 1:2), the first with an odd name. The
// parameters are saved with a `.save` card: in a `.control` block `save @mp<2>&x[gm]` would
// be cut at `<`, which ngspice's control language reads as a redirection.
std::string deck() {
    std::string saves = ".save all";
    for (const auto& m : transistors)
        for (const char* p : {"id", "gm", "gds", "gmbs", "vdsat", "vds", "vgs", "vbs", "von"})
            saves += " @" + m + "[" + p + "]";
    return "* junit back end test bench\n"
           ".model nc nmos level=1 vto=0.5 kp=200u lambda=0.06 gamma=0.45 phi=0.7\n"
           ".model pc pmos level=1 vto=-0.5 kp=80u lambda=0.08 gamma=0.4 phi=0.7\n"
           "vdd vdd 0 3\n"
           "iref vdd top dc 40u\n"
           "m2 top top mid 0 nc w=10u l=1u\n"
           "m1 mid mid 0 0 nc w=10u l=1u\n"
           "m4 out top s4 0 nc w=10u l=1u\n"
           "m3 s4 mid 0 0 nc w=10u l=1u\n"
           "vout out 0 dc 0.7\n"
           "mp1 pg pg vdd vdd pc w=20u l=1u\n"
           "ipref pg 0 dc 20u\n"
           "mp<2>&x o<u>t&b pg vdd vdd pc w=20u l=1u\n"
           "mp3 out3 pg vdd vdd pc w=40u l=1u\n"
           "vo2 o<u>t&b 0 dc 1.5\n"
           "vo3 out3 0 dc 1.5\n" +
           saves + "\n.control\nop\nwrite op.raw\nquit 0\n.endc\n.end\n";
}

// Reads the XML with ElementTree and prints what the checks need as JSON: the root's and
// the suite's attributes, the properties, every test case with its failures, error and
// skipped elements and its system-out text, and the suite's own system-out.
const char* const read_junit_py = R"PY(
import json, sys
import xml.etree.ElementTree as ET
root = ET.parse(sys.argv[1]).getroot()
def attrs(e): return dict(e.attrib)
out = {"root": root.tag, "root_attrs": attrs(root), "suites": []}
for s in root:
    suite = {"tag": s.tag, "attrs": attrs(s), "properties": {}, "cases": [], "system_out": None}
    for child in s:
        if child.tag == "properties":
            for p in child: suite["properties"][p.get("name")] = p.get("value")
        elif child.tag == "testcase":
            suite["cases"].append({
                "attrs": attrs(child),
                "failures": [{"type": f.get("type"), "message": f.get("message"), "text": f.text or ""}
                             for f in child.findall("failure")],
                "errors": len(child.findall("error")),
                "skipped": len(child.findall("skipped")),
                "system_out": "".join(o.text or "" for o in child.findall("system-out")),
                "tags": [c.tag for c in child]})
        elif child.tag == "system-out":
            suite["system_out"] = child.text or ""
        else:
            suite.setdefault("other", []).append(child.tag)
    out["suites"].append(suite)
json.dump(out, sys.stdout)
)PY";

struct Bench {
    test::NgspiceRun run;
    Circuit circuit;
    OpPoint op;
    ReviewTree review;
    ReviewInputs inputs{"deck<&>.cir", "op.raw: Operating Point", {"ac \"1\".raw"}};

    Bench() : run(test::run_ngspice(deck(), "mc-junit")) {
        REQUIRE_MESSAGE(run.status == 0, run.output);
        circuit = read_circuit(run.file("deck.cir"));
        raw::RawFile file = raw::read_raw(run.file("op.raw"));
        REQUIRE(!file.plots.empty());
        op = build_op_point(circuit, file, file.plots[0]);
        review_with(ReviewSettings{});
    }

    void review_with(const ReviewSettings& settings) { review = run_review(circuit, op, {}, settings, inputs); }

    double op_value(const std::string& vector) const {
        raw::RawFile file = raw::read_raw(run.file("op.raw"));
        auto i = file.plots[0].find(vector);
        REQUIRE_MESSAGE(i, "missing " << vector);
        return file.plots[0].real[*i][0];
    }

    // Renders the review as JUnit and reads it back through ElementTree.
    json junit() const {
        const std::string xml = report::review_to_junit(review);
        test::write_text(run.file("junit.xml"), xml);
        test::write_text(run.file("read_junit.py"), read_junit_py);
        const std::string cmd =
            "python3 '" + run.file("read_junit.py").string() + "' '" + run.file("junit.xml").string() + "' 2>&1";
        std::string text;
        FILE* pipe = popen(cmd.c_str(), "r");
        REQUIRE(pipe);
        char buffer[4096];
        for (std::size_t n; (n = fread(buffer, 1, sizeof buffer, pipe)) > 0;) text.append(buffer, n);
        const int status = pclose(pipe);
        REQUIRE_MESSAGE(status == 0, "ElementTree rejects the document: " << text << "\n" << xml);
        return json::parse(text);
    }
};

const json& only_suite(const json& doc) {
    REQUIRE(doc["root"] == "testsuites");
    REQUIRE(doc["suites"].size() == 1);
    REQUIRE(doc["suites"][0]["tag"] == "testsuite");
    return doc["suites"][0];
}

std::size_t count_attr(const json& attrs, const char* name) { return std::stoul(attrs.at(name).get<std::string>()); }

// tests/failures/errors/skipped of the suite and of the root agree with the elements.
void check_counts(const json& doc) {
    const json& suite = only_suite(doc);
    std::size_t failed = 0, errors = 0, skipped = 0;
    for (const auto& c : suite["cases"]) {
        failed += c["failures"].empty() ? 0 : 1;
        errors += c["errors"].get<std::size_t>() ? 1 : 0;
        skipped += c["skipped"].get<std::size_t>() ? 1 : 0;
    }
    for (const json* attrs : {&suite["attrs"], &doc["root_attrs"]}) {
        CHECK(count_attr(*attrs, "tests") == suite["cases"].size());
        CHECK(count_attr(*attrs, "failures") == failed);
        CHECK(count_attr(*attrs, "errors") == errors);
        CHECK(count_attr(*attrs, "skipped") == skipped);
    }
}

// The test case of an output, by its mirror and node.
const json& find_case(const json& suite, const std::string& mirror, const std::string& node) {
    for (const auto& c : suite["cases"])
        if (c["attrs"]["classname"] == mirror && c["attrs"]["name"] == "output " + node) return c;
    FAIL("no test case for " << mirror << " output " << node);
    return suite;
}

// Every test case against the review: one per output, in order, and its failures exactly the
// unwaived findings at the failing severity that the tree places under the output (as type
// and message, in the review's order).
void check_cases_against_review(const json& suite, const Bench& b) {
    std::size_t k = 0;
    for (const ReviewMirror& m : b.review.mirrors)
        for (const ReviewOutput& o : m.outputs) {
            REQUIRE(k < suite["cases"].size());
            const json& c = suite["cases"][k++];
            CHECK(c["attrs"]["classname"] == m.label);
            CHECK(c["attrs"]["name"] == "output " + o.node);
            json expected = json::array();
            for (std::size_t i : o.findings) {
                const Finding& f = b.review.findings[i];
                if (fails_review(f, b.review.settings.fail_on))
                    expected.push_back({{"type", to_string(f.code)},
                                        {"message", report::finding_sentence(f, b.review.display_names)}});
            }
            json found = json::array();
            for (const auto& f : c["failures"]) found.push_back({{"type", f["type"]}, {"message", f["message"]}});
            CHECK(found == expected);
        }
    // Extra test cases only for errors that concern no output; there are none here.
    CHECK(k == suite["cases"].size());
}

}  // namespace

TEST_CASE("a cascode in triode fails its output's test case; a healthy mirror passes") {
    Bench b;
    // The deck does what this case is about, by ngspice's own numbers.
    REQUIRE(b.op_value("@m4[vds]") < b.op_value("@m4[vdsat]"));
    REQUIRE(std::abs(b.op_value("@mp<2>&x[vds]")) > std::abs(b.op_value("@mp<2>&x[vdsat]")));
    REQUIRE(b.review.mirrors.size() == 2);

    const json doc = b.junit();
    const json& suite = only_suite(doc);
    CHECK(suite["attrs"]["name"] == "mirrorcheck review");
    CHECK(!suite.contains("other"));
    check_counts(doc);
    check_cases_against_review(suite, b);

    SUBCASE("one test case per output, named as written in the netlist") {
        REQUIRE(suite["cases"].size() == 3);
        const json& cascode = find_case(suite, "nmos-cascode:m4", "out");
        const json& odd = find_case(suite, "pmos-simple:mp<2>&x", "o<u>t&b");
        const json& wide = find_case(suite, "pmos-simple:mp<2>&x", "out3");
        bool m4_in_triode = false;
        for (const auto& f : cascode["failures"])
            m4_in_triode = m4_in_triode || (f["type"] == "out-of-saturation" &&
                                            f["message"].get<std::string>().find("m4") != std::string::npos);
        CHECK(m4_in_triode);
        CHECK(odd["failures"].empty());
        CHECK(wide["failures"].empty());
        CHECK(count_attr(suite["attrs"], "failures") == 1);
    }

    SUBCASE("the failure's text says what and what to do; properties name the inputs") {
        const json& cascode = find_case(suite, "nmos-cascode:m4", "out");
        REQUIRE(!cascode["failures"].empty());
        const std::string text = cascode["failures"][0]["text"];
        CHECK(text.find("nmos-cascode:m4") != std::string::npos);
        CHECK(text.find(std::string(catalogue_row(FindingCode::out_of_saturation).action)) != std::string::npos);
        CHECK(suite["properties"]["netlist"] == "deck<&>.cir");
        CHECK(suite["properties"]["op"] == "op.raw: Operating Point");
        CHECK(suite["properties"]["simulation-1"] == "ac \"1\".raw");
    }

    SUBCASE("the same review renders to the same bytes") {
        CHECK(report::review_to_junit(b.review) == report::review_to_junit(b.review));
    }
}

TEST_CASE("a waived error no longer fails; its reason and unused waivers are in system-out") {
    Bench b;
    const std::string reason = "held low only in reset & <standby>, see \"R&D\" note 'B'";
    ReviewSettings settings;
    settings.waivers = waivers::parse_waivers("NMOS-Cascode:M4 out-of-saturation " + reason +
                                                  "\nmp9 cutoff stale line\n",
                                              "waivers.txt", finding_code_names());
    b.review_with(settings);

    const json doc = b.junit();
    const json& suite = only_suite(doc);
    check_counts(doc);
    check_cases_against_review(suite, b);
    const json& cascode = find_case(suite, "nmos-cascode:m4", "out");
    bool other_errors = false;
    for (const Finding& f : b.review.findings)
        other_errors = other_errors || (fails_review(f) && f.mirror == "nmos-cascode:m4");
    if (!other_errors) {
        CHECK(cascode["failures"].empty());
        CHECK(count_attr(suite["attrs"], "failures") == 0);
    }
    for (const auto& f : cascode["failures"]) CHECK(f["type"] != "out-of-saturation");
    const std::string out = cascode["system_out"];
    CHECK(out.find("error out-of-saturation at m4 (waived: " + reason + ")") != std::string::npos);
    // The stale waiver concerns no output: it is a note of the suite.
    REQUIRE(suite["system_out"].is_string());
    CHECK(suite["system_out"].get<std::string>().find("waiver-unused at waivers.txt:2") != std::string::npos);
}

TEST_CASE("warnings and notes go to system-out; reference-side findings reach every output") {
    Bench b;
    // A hand-made finding on the reference diode of the PMOS mirror, with text XML 1.0
    // cannot carry as it is: control characters, a byte that is not UTF-8, and `]]>`.
    const std::string mirror = "pmos-simple:mp<2>&x";
    b.review.findings.push_back(make_finding(FindingCode::not_simulated, Severity::warning, mirror, "mp1",
                                             {FindingValue::words("node", "mp1"),
                                              FindingValue::words("note", "odd\x01 is odd\x1b[0m \xff ]]> <b>&amp;</b>")}));
    join_findings(b.review);
    const json doc = b.junit();
    const json& suite = only_suite(doc);
    check_counts(doc);
    for (const std::string node : {"o<u>t&b", "out3"}) {
        const std::string out = find_case(suite, mirror, node)["system_out"];
        CHECK(out.find("warning not-simulated at mp1: The output at mp1 is odd\xEF\xBF\xBD is odd\xEF\xBF\xBD[0m "
                       "\xEF\xBF\xBD ]]> <b>&amp;</b>.\n") != std::string::npos);
    }
    CHECK(find_case(suite, "nmos-cascode:m4", "out")["system_out"].get<std::string>().find("mp1") == std::string::npos);

    SUBCASE("an error about a reference device fails every output of its mirror") {
        Finding cut = make_finding(FindingCode::cutoff, mirror, "mp1", {FindingValue::names("device", {"mp1"})});
        b.review.findings.push_back(cut);
        join_findings(b.review);
        const json again = b.junit();
        const json& s = only_suite(again);
        check_counts(again);
        check_cases_against_review(s, b);
        for (const std::string node : {"o<u>t&b", "out3"}) {
            const json& c = find_case(s, mirror, node);
            REQUIRE(c["failures"].size() == 1);
            CHECK(c["failures"][0]["message"] ==
                  "mp1 is cut off, so it carries no mirrored current and every formula above it is wrong.");
        }
    }

    SUBCASE("an error of no output fails one extra test case") {
        b.review.findings.push_back(
            make_finding(FindingCode::cutoff, "", "m9\tx", {FindingValue::names("device", {"a finding of\nno mirror"})}));
        join_findings(b.review);
        const json again = b.junit();
        const json& s = only_suite(again);
        check_counts(again);
        REQUIRE(s["cases"].size() == 4);
        const json& extra = s["cases"][3];
        CHECK(extra["attrs"]["classname"] == "mirrorcheck");
        REQUIRE(extra["failures"].size() == 1);
        CHECK(extra["failures"][0]["message"] ==
              "a finding of\nno mirror is cut off, so it carries no mirrored current and every formula above it is "
              "wrong.");  // line end kept in an attribute
    }
}

TEST_CASE("--fail-on warning: a warning fails its test case, which error severity leaves green") {
    Bench b;
    const std::string mirror = "pmos-simple:mp<2>&x";
    auto add_warning = [&](Bench& bench) {
        bench.review.findings.push_back(make_finding(FindingCode::low_margin, mirror, "mp1",
                                                     {FindingValue::names("device", {"mp1"}),
                                                      FindingValue::of("margin", 0.05, Unit::volt),
                                                      FindingValue::of("margin_asked", 0.1, Unit::volt)}));
        join_findings(bench.review);
    };
    add_warning(b);
    const json lenient = b.junit();
    check_counts(lenient);
    for (const std::string node : {"o<u>t&b", "out3"}) {
        const json& c = find_case(only_suite(lenient), mirror, node);
        CHECK(c["failures"].empty());
        CHECK(c["system_out"].get<std::string>().find("warning low-margin at mp1") != std::string::npos);
    }

    ReviewSettings strict;
    strict.fail_on = Severity::warning;
    b.review_with(strict);
    add_warning(b);
    const json doc = b.junit();
    const json& suite = only_suite(doc);
    check_counts(doc);
    check_cases_against_review(suite, b);
    CHECK(suite["properties"]["fail-on"] == "warning");
    for (const std::string node : {"o<u>t&b", "out3"}) {
        const json& c = find_case(suite, mirror, node);
        REQUIRE(c["failures"].size() >= 1);
        CHECK(c["failures"][0]["type"] == "low-margin");
        CHECK(c["failures"][0]["text"].get<std::string>().find("What to do: check the margin") != std::string::npos);
    }
}
