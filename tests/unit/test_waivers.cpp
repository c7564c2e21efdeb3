// Waiver files: the reader (parsers/waivers) on checked-in and in-test files, each error
// with its code, line and column; and apply_waivers on hand-built findings.
#include <filesystem>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "parsers/waivers/waivers.hpp"
#include "src/analyse/apply_waivers.hpp"
#include "support/ngspice_run.hpp"

using namespace mirrorcheck;

namespace {

std::filesystem::path fixture(const std::string& name) {
    return std::filesystem::path(MIRRORCHECK_TEST_DATA) / "waivers" / name;
}

// The InputError that `read` throws; it must throw one.
template <typename Read>
InputError error_of(Read read) {
    try {
        read();
    } catch (const InputError& e) {
        return e;
    }
    FAIL("no error");
    return InputError("", Location(), "");
}

InputError parse_error(const std::string& text) {
    CAPTURE(text);
    return error_of([&] { waivers::parse_waivers(text, "w.txt", finding_code_names()); });
}

InputError read_error(const std::string& name) {
    return error_of([&] { waivers::read_waivers(fixture(name), finding_code_names()); });
}

void check_error(const std::string& text, const std::string& code, std::size_t line, std::size_t column) {
    CAPTURE(text);
    const InputError e = parse_error(text);
    CHECK(e.code() == code);
    CHECK(e.where().file == "w.txt");
    CHECK(e.where().line == line);
    CHECK(e.where().column == column);
}

Finding finding(Severity severity, const std::string& code, const std::string& mirror, const std::string& subject) {
    return make_finding(*parse_finding_code(code), severity, mirror, subject, {});
}

waivers::Waiver waiver(const std::string& subject, const std::string& code, const std::string& reason,
                       std::size_t line) {
    return {subject, code, reason, Location("w.txt", line, 1)};
}

}  // namespace

TEST_CASE("reader: fields, comments, blank lines, tabs, case and trailing blanks") {
    const waivers::Waivers w = waivers::read_waivers(fixture("accepted.txt"), finding_code_names());
    REQUIRE(w.size() == 4);
    CHECK(w[0].subject == "nmos-cascode:m4");
    CHECK(w[0].code == "out-of-saturation");
    CHECK(w[0].reason == "the output only swings this low during reset");
    CHECK(w[0].where.line == 3);
    CHECK(w[0].where.file == fixture("accepted.txt").string());
    CHECK(w[1].subject == "m.x1.m2");  // lower case, as the circuit stores names
    CHECK(w[1].code == "low-margin");
    CHECK(w[1].reason == "40 mV is enough here: the corner runs are in the log, see issue #12");
    CHECK(w[2].subject == "out");
    CHECK(w[2].reason == "the load trims the ratio on purpose");
    CHECK(w[2].where.column == 4);
    CHECK(w[3].subject == "*");
    CHECK(w[3].code == "body-effect");
    CHECK(w[3].reason == "bulk on the rail by design; a # inside the reason is kept");
}

TEST_CASE("reader: empty files, comment-only files, CRLF line ends and a byte-order mark") {
    CHECK(waivers::parse_waivers("", "w.txt", finding_code_names()).empty());
    CHECK(waivers::parse_waivers("# nothing waived yet\n\n   \t\n", "w.txt", finding_code_names()).empty());
    const auto w = waivers::parse_waivers("\xEF\xBB\xBFm4 cutoff no current needed in standby\r\n* * all\r\n", "w.txt",
                                          finding_code_names());
    REQUIRE(w.size() == 2);
    CHECK(w[0].subject == "m4");
    CHECK(w[0].reason == "no current needed in standby");
    CHECK(w[1].code == "*");
    CHECK(w[1].where.line == 2);
}

TEST_CASE("reader: each error with its code, line and column") {
    check_error("# ok\nm4 no-such-code because\n", "waiver.unknown-code", 2, 4);
    check_error("m4   cutoff\n", "waiver.missing-reason", 1, 12);
    check_error("m4 cutoff   # only a comment\n", "waiver.missing-reason", 1, 13);
    check_error("\n\n  m4\n", "waiver.missing-code", 3, 5);
    check_error("m4 # a comment where the code goes\n", "waiver.missing-code", 1, 4);
    check_error("m* cutoff a pattern\n", "waiver.bad-subject", 1, 1);
    check_error("m4 cutoff ok\nm5 cutoff also\x1b[0m ok\n", "waiver.binary-data", 2, 15);
    check_error(std::string("m4 cutoff ok\n\n  \0", 17), "waiver.binary-data", 3, 3);
}

TEST_CASE("reader: an unknown code's message lists the known codes") {
    const InputError e = parse_error("m4 out-of-saturaton typo\n");
    CHECK(e.message().find("out-of-saturaton") != std::string::npos);
    for (const auto& c : finding_catalogue()) CHECK(e.message().find(std::string(c.name)) != std::string::npos);
    CHECK(std::string(e.what()).rfind("w.txt:1:4: error:", 0) == 0);
}

TEST_CASE("reader: checked-in files with errors, and files that cannot be read") {
    const InputError nul = read_error("nul_byte.txt");
    CHECK(nul.code() == "waiver.binary-data");
    CHECK(nul.where().line == 2);
    CHECK(nul.where().column == 17);
    const InputError crlf = read_error("unknown_code_crlf.txt");
    CHECK(crlf.code() == "waiver.unknown-code");
    CHECK(crlf.where().line == 2);
    CHECK(crlf.where().column == 4);
    CHECK(read_error("no_such_file.txt").code() == "input.cannot-open");
    CHECK(read_error("").code() == "input.cannot-open");  // the folder itself
}

TEST_CASE("reader: the input file is not modified") {
    const auto dir = test::make_temp_dir("mc-waivers");
    const std::string text = "M4 Cutoff  reason with trailing blanks   \r\n";
    test::write_text(dir / "w.txt", text);
    const auto before = std::filesystem::last_write_time(dir / "w.txt");
    CHECK(waivers::read_waivers(dir / "w.txt", finding_code_names()).size() == 1);
    CHECK(test::read_text(dir / "w.txt") == text);
    CHECK(std::filesystem::last_write_time(dir / "w.txt") == before);
    std::filesystem::remove_all(dir);
}

TEST_CASE("apply_waivers: by mirror, device, node and wildcard; fails_review ignores waived errors") {
    std::vector<Finding> findings = {
        finding(Severity::error, "out-of-saturation", "nmos-cascode:m4", "m4"),
        finding(Severity::warning, "low-margin", "nmos-cascode:m4", "m3"),
        finding(Severity::warning, "ratio-error", "pmos-simple:m.x1.m2", "out2"),
        finding(Severity::info, "body-effect", "nmos-cascode:m4", "out"),
        finding(Severity::error, "cutoff", "pmos-simple:m.x1.m2", "m.x1.m2"),
        finding(Severity::error, "out-of-saturation", "npn-wilson:q3", "q3"),
    };
    const waivers::Waivers w = {
        waiver("nmos-cascode:m4", "out-of-saturation", "by mirror id", 1),
        waiver("m3", "low-margin", "by device", 2),
        waiver("out2", "ratio-error", "by node", 3),
        waiver("*", "body-effect", "any subject", 4),
        waiver("m.x1.m2", "*", "any code", 5),
    };
    apply_waivers(findings, w);
    REQUIRE(findings.size() == 6);
    CHECK(findings[0].waiver == "by mirror id");
    CHECK(findings[1].waiver == "by device");
    CHECK(findings[2].waiver == "by node");
    CHECK(findings[3].waiver == "any subject");
    CHECK(findings[4].waiver == "any code");
    for (std::size_t k = 0; k < 5; ++k) {
        CHECK(findings[k].waived);
        CHECK_FALSE(fails_review(findings[k]));
    }
    CHECK_FALSE(findings[5].waived);
    CHECK(findings[5].waiver.empty());
    CHECK(fails_review(findings[5]));
}

TEST_CASE("apply_waivers: names compare without case, and the first matching line wins") {
    std::vector<Finding> findings = {finding(Severity::error, "cutoff", "nmos-simple:m.x1.m2", "m.x1.m2")};
    // The reader stores lower case; a waiver built by hand may not.
    const waivers::Waivers w = {waiver("M.X1.M2", "cutoff", "first", 1), waiver("*", "*", "second", 2)};
    apply_waivers(findings, w);
    REQUIRE(findings.size() == 2);
    CHECK(findings[0].waived);
    CHECK(findings[0].waiver == "first");
    // The catch-all line took nothing: it is reported as unused.
    CHECK(findings[1].code == FindingCode::waiver_unused);
    CHECK(findings[1].subject == "w.txt:2");
}

TEST_CASE("apply_waivers: each unused waiver is an info finding naming file and line") {
    std::vector<Finding> findings = {finding(Severity::warning, "low-margin", "nmos-cascode:m4", "m3")};
    const waivers::Waivers w = {waiver("m9", "cutoff", "stale: m9 was removed", 7),
                                waiver("m3", "out-of-saturation", "right device, wrong code", 9)};
    apply_waivers(findings, w);
    REQUIRE(findings.size() == 3);
    CHECK_FALSE(findings[0].waived);
    for (std::size_t k = 1; k < 3; ++k) {
        CHECK(findings[k].severity == Severity::info);
        CHECK(findings[k].code == FindingCode::waiver_unused);
        CHECK(findings[k].mirror.empty());
        CHECK_FALSE(fails_review(findings[k]));
    }
    CHECK(findings[1].subject == "w.txt:7");
    CHECK(findings[1].value("place")->text == "w.txt:7");
    CHECK(findings[1].value("waiver")->text == "m9 cutoff");
    CHECK(findings[2].subject == "w.txt:9");
}

TEST_CASE("apply_waivers: findings already waived keep their reason; no waivers changes nothing") {
    std::vector<Finding> findings = {finding(Severity::error, "cutoff", "nmos-simple:m2", "m2")};
    findings[0].waived = true;
    findings[0].waiver = "earlier file";
    apply_waivers(findings, {});
    REQUIRE(findings.size() == 1);
    apply_waivers(findings, {waiver("m2", "cutoff", "later file", 1)});
    REQUIRE(findings.size() == 2);
    CHECK(findings[0].waiver == "earlier file");
    CHECK(findings[1].code == FindingCode::waiver_unused);
}

TEST_CASE("apply_waivers: a device and a mirror answer to the designer's names too") {
    // A process kit's wrapper: ngspice's m.xm2.msky130_fd_pr__nfet_01v8 is the designer's xm2.
    const std::string device = "m.xm2.msky130_fd_pr__nfet_01v8", mirror = "nmos-simple:" + device;
    const DesignerNames names = {{device, "xm2"}, {mirror, "nmos-simple:xm2"}};
    std::vector<Finding> findings = {finding(Severity::error, "cutoff", mirror, device),
                                     finding(Severity::warning, "ratio-error", mirror, "pd")};
    findings[0].subject_is_device = true;
    apply_waivers(findings, {waiver("XM2", "cutoff", "by the designer's device", 1),
                             waiver("nmos-simple:xm2", "ratio-error", "by the designer's mirror", 2)},
                  names);
    REQUIRE(findings.size() == 2);  // both lines used
    CHECK(findings[0].waiver == "by the designer's device");
    CHECK(findings[1].waiver == "by the designer's mirror");
}
