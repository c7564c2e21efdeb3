// Renders a review as JUnit XML, the test-result shape that CI servers read: testsuites,
// testsuite, properties, testcase, failure, system-out. Nothing here judges the circuit:
// which findings fail is fails_review(), which output a finding belongs to is
// finding_concerns_output(). Text from the netlist (device and node names) and from waiver
// files reaches the XML, so every string is escaped, and bytes XML 1.0 cannot carry (control
// characters, invalid UTF-8) become U+FFFD.
#include "src/report/junit_report.hpp"

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string_view>
#include <vector>

#include <fmt/format.h>

#include "src/report/finding_scope.hpp"

namespace mirrorcheck::report {
namespace {

// XML ----------------------------------------------------------------------------------

constexpr std::string_view replacement_character = "\xEF\xBF\xBD";

// The code point of the UTF-8 sequence at the start of `s` and its length, or nothing when
// it is not well-formed UTF-8 (overlong forms and surrogates included).
std::optional<std::pair<std::uint32_t, std::size_t>> decode_utf8(std::string_view s) {
    const auto byte = [&](std::size_t i) { return static_cast<unsigned char>(s[i]); };
    const unsigned char lead = byte(0);
    if (lead < 0x80) return std::pair<std::uint32_t, std::size_t>{lead, 1};
    const std::size_t length = lead >= 0xF0 ? 4 : lead >= 0xE0 ? 3 : lead >= 0xC0 ? 2 : 0;
    if (length == 0 || length > s.size()) return std::nullopt;
    std::uint32_t cp = lead & (0x7F >> length);
    for (std::size_t i = 1; i < length; ++i) {
        if ((byte(i) & 0xC0) != 0x80) return std::nullopt;
        cp = (cp << 6) | (byte(i) & 0x3F);
    }
    static constexpr std::uint32_t smallest[] = {0, 0, 0x80, 0x800, 0x10000};
    if (cp < smallest[length] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return std::nullopt;
    return std::pair<std::uint32_t, std::size_t>{cp, length};
}

// XML 1.0's Char production.
bool allowed_in_xml(std::uint32_t cp) {
    return cp == 0x9 || cp == 0xA || cp == 0xD || (cp >= 0x20 && cp <= 0xD7FF) || (cp >= 0xE000 && cp <= 0xFFFD) ||
           cp >= 0x10000;
}

// Escaped for element content, or for a double-quoted attribute value when `attribute`
// (where tab and line ends are written as references, which attribute normalisation keeps).
std::string escape(std::string_view text, bool attribute) {
    std::string out;
    out.reserve(text.size());
    while (!text.empty()) {
        const auto decoded = decode_utf8(text);
        const std::size_t length = decoded ? decoded->second : 1;
        const std::uint32_t cp = decoded ? decoded->first : 0;
        if (!decoded || !allowed_in_xml(cp)) out += replacement_character;
        else if (cp == '&') out += "&amp;";
        else if (cp == '<') out += "&lt;";
        else if (cp == '>') out += "&gt;";
        else if (cp == '"') out += "&quot;";
        else if (cp == '\'') out += "&apos;";
        else if (cp == '\r' || (attribute && (cp == '\t' || cp == '\n'))) out += fmt::format("&#{};", cp);
        else out += text.substr(0, length);
        text.remove_prefix(length);
    }
    return out;
}

std::string attr(std::string_view text) { return escape(text, true); }
std::string content(std::string_view text) { return escape(text, false); }

// Findings as JUnit elements ------------------------------------------------------------

std::string failure_element(const Finding& f) {
    const FindingCode* code = find_finding_code(f.code);
    std::string body = fmt::format("{} in {}: {}", f.subject, f.mirror.empty() ? "the circuit" : f.mirror, f.message);
    if (code) body += fmt::format("\nWhat to do: {}.", code->action);
    return fmt::format("      <failure type=\"{}\" message=\"{}\">{}</failure>\n", attr(f.code), attr(f.message),
                       content(body));
}

// One readable line for <system-out>.
std::string finding_line(const Finding& f) {
    const std::string waived = f.waived ? fmt::format(" (waived: {})", f.waiver) : std::string();
    return fmt::format("{} {} at {}{}: {}\n", to_string(f.severity), f.code, f.subject, waived, f.message);
}

std::string system_out(const std::vector<const Finding*>& findings, std::string_view indent) {
    std::string lines;
    for (const Finding* f : findings)
        if (!fails_review(*f)) lines += finding_line(*f);
    if (lines.empty()) return {};
    return fmt::format("{}<system-out>{}</system-out>\n", indent, content(lines));
}

struct TestCase {
    std::string classname, name;
    std::vector<const Finding*> findings;  // every finding shown in it, failing or not
    bool failed() const {
        for (const Finding* f : findings)
            if (fails_review(*f)) return true;
        return false;
    }
};

std::string testcase_element(const TestCase& t) {
    std::string inner;
    for (const Finding* f : t.findings)
        if (fails_review(*f)) inner += failure_element(*f);
    inner += system_out(t.findings, "      ");
    const std::string open = fmt::format("    <testcase classname=\"{}\" name=\"{}\"", attr(t.classname), attr(t.name));
    if (inner.empty()) return open + "/>\n";
    return open + ">\n" + inner + "    </testcase>\n";
}

// The review as test cases -------------------------------------------------------------

bool concerns_some_output(const Finding& f, const Circuit& circuit, const std::vector<Mirror>& mirrors) {
    for (const Mirror& m : mirrors)
        for (const MirrorOutput& o : m.outputs)
            if (finding_concerns_output(f, circuit, m, o)) return true;
    return false;
}

std::vector<TestCase> output_cases(const Circuit& circuit, const Review& review) {
    std::vector<TestCase> cases;
    for (const Mirror& m : review.mirrors)
        for (const MirrorOutput& o : m.outputs) {
            TestCase t{m.id, "output " + o.node, {}};
            for (const Finding& f : review.findings)
                if (finding_concerns_output(f, circuit, m, o)) t.findings.push_back(&f);
            cases.push_back(std::move(t));
        }
    return cases;
}

std::vector<const Finding*> unplaced_findings(const Circuit& circuit, const Review& review) {
    std::vector<const Finding*> out;
    for (const Finding& f : review.findings)
        if (!concerns_some_output(f, circuit, review.mirrors)) out.push_back(&f);
    return out;
}

std::string properties(const ReviewInputs& inputs) {
    std::string out = "    <properties>\n";
    auto add = [&](std::string_view name, std::string_view value) {
        out += fmt::format("      <property name=\"{}\" value=\"{}\"/>\n", attr(name), attr(value));
    };
    add("netlist", inputs.netlist);
    add("op", inputs.op_source);
    for (std::size_t k = 0; k < inputs.simulation_files.size(); ++k)
        add(fmt::format("simulation-{}", k + 1), inputs.simulation_files[k]);
    return out + "    </properties>\n";
}

}  // namespace

std::string review_to_junit(const ReviewInputs& inputs, const Circuit& circuit, const OpPoint& /*op*/,
                            const Review& review) {
    std::vector<TestCase> cases = output_cases(circuit, review);
    const std::vector<const Finding*> unplaced = unplaced_findings(circuit, review);
    TestCase outside{"mirrorcheck", "findings outside the mirror outputs", unplaced};
    if (outside.failed()) cases.push_back(outside);
    std::size_t failed = 0;
    for (const TestCase& t : cases) failed += t.failed() ? 1 : 0;

    const std::string counts = fmt::format("tests=\"{}\" failures=\"{}\" errors=\"0\" skipped=\"0\"", cases.size(), failed);
    std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
    out += fmt::format("<testsuites name=\"mirrorcheck\" {}>\n", counts);
    out += fmt::format("  <testsuite name=\"mirrorcheck review\" {}>\n", counts);
    out += properties(inputs);
    for (const TestCase& t : cases) out += testcase_element(t);
    if (!outside.failed()) out += system_out(unplaced, "    ");
    out += "  </testsuite>\n</testsuites>\n";
    return out;
}

}  // namespace mirrorcheck::report
