// Renders a review as JUnit XML, the test-result shape that CI servers read: testsuites,
// testsuite, properties, testcase, failure, system-out. Nothing here judges the circuit:
// which findings fail is fails_review() at the review's --fail-on severity, which output a
// finding belongs to is the review tree's. CI viewers read the dots of a classname as
// packages, so names keep their hierarchy with `/` instead (`x1.out` becomes `x1/out`).
// Text from the netlist (device and node names) and from waiver
// files reaches the XML, so every string is escaped, and bytes XML 1.0 cannot carry (control
// characters, invalid UTF-8) become U+FFFD.
#include "src/report/junit_report.hpp"

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string_view>
#include <vector>

#include <fmt/format.h>

#include "src/report/finding_text.hpp"

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

// A name CI viewers do not split into packages.
std::string undotted(std::string_view name) {
    std::string s(name);
    for (char& c : s)
        if (c == '.') c = '/';
    return s;
}

class JunitWriter {
public:
    explicit JunitWriter(const ReviewTree& tree) : t_(tree) {}

    std::string write() const {
        std::vector<TestCase> cases;
        for (const ReviewMirror& m : t_.mirrors)
            for (const ReviewOutput& o : m.outputs)
                cases.push_back({undotted(m.label), undotted("output " + o.node), o.findings});
        TestCase outside{"mirrorcheck", "findings outside the mirror outputs", t_.circuit_findings};
        const bool outside_failed = failed(outside);
        if (outside_failed) cases.push_back(outside);
        std::size_t failures = 0;
        for (const TestCase& c : cases) failures += failed(c) ? 1 : 0;

        const std::string counts =
            fmt::format("tests=\"{}\" failures=\"{}\" errors=\"0\" skipped=\"0\"", cases.size(), failures);
        std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
        out += fmt::format("<testsuites name=\"mirrorcheck\" {}>\n", counts);
        out += fmt::format("  <testsuite name=\"mirrorcheck review\" {}>\n", counts);
        out += properties();
        for (const TestCase& c : cases) out += testcase_element(c);
        if (!outside_failed) out += system_out(outside.findings, "    ");
        out += "  </testsuite>\n</testsuites>\n";
        return out;
    }

private:
    struct TestCase {
        std::string classname, name;
        std::vector<std::size_t> findings;  // indices into ReviewTree::findings
    };

    const ReviewTree& t_;

    const Finding& finding(std::size_t k) const { return t_.findings[k]; }
    bool fails(std::size_t k) const { return fails_review(finding(k), t_.settings.fail_on); }
    std::string sentence(const Finding& f) const { return finding_sentence(f, t_.display_names); }
    std::string subject(const Finding& f) const { return t_.display_name(f.subject); }

    bool failed(const TestCase& c) const {
        for (std::size_t k : c.findings)
            if (fails(k)) return true;
        return false;
    }

    std::string failure_element(const Finding& f) const {
        const std::string where = f.mirror.empty() ? "the circuit" : t_.display_name(f.mirror);
        const std::string message = sentence(f);
        std::string body = fmt::format("{} {} in {}: {}", to_string(f.severity), subject(f), where, message);
        body += fmt::format("\nWhat to do: {}.", catalogue_row(f.code).action);
        return fmt::format("      <failure type=\"{}\" message=\"{}\">{}</failure>\n", attr(to_string(f.code)),
                           attr(message), content(body));
    }

    // One readable line for <system-out>.
    std::string finding_line(const Finding& f) const {
        const std::string waived = f.waived ? fmt::format(" (waived: {})", f.waiver) : std::string();
        return fmt::format("{} {} at {}{}: {}\n", to_string(f.severity), to_string(f.code), subject(f), waived,
                           sentence(f));
    }

    std::string system_out(const std::vector<std::size_t>& findings, std::string_view indent) const {
        std::string lines;
        for (std::size_t k : findings)
            if (!fails(k)) lines += finding_line(finding(k));
        if (lines.empty()) return {};
        return fmt::format("{}<system-out>{}</system-out>\n", indent, content(lines));
    }

    std::string testcase_element(const TestCase& c) const {
        std::string inner;
        for (std::size_t k : c.findings)
            if (fails(k)) inner += failure_element(finding(k));
        inner += system_out(c.findings, "      ");
        const std::string open =
            fmt::format("    <testcase classname=\"{}\" name=\"{}\"", attr(c.classname), attr(c.name));
        if (inner.empty()) return open + "/>\n";
        return open + ">\n" + inner + "    </testcase>\n";
    }

    std::string properties() const {
        std::string out = "    <properties>\n";
        auto add = [&](std::string_view name, std::string_view value) {
            out += fmt::format("      <property name=\"{}\" value=\"{}\"/>\n", attr(name), attr(value));
        };
        add("netlist", t_.inputs.netlist);
        add("op", t_.inputs.op_source);
        for (std::size_t k = 0; k < t_.inputs.simulation_files.size(); ++k)
            add(fmt::format("simulation-{}", k + 1), t_.inputs.simulation_files[k]);
        add("fail-on", to_string(t_.settings.fail_on));
        add("tool", t_.tool.name + " " + t_.tool.version + (t_.tool.revision.empty() ? "" : " " + t_.tool.revision));
        return out + "    </properties>\n";
    }
};

}  // namespace

std::string review_to_junit(const ReviewTree& tree) { return JunitWriter(tree).write(); }

}  // namespace mirrorcheck::report
