// Renders a review as JUnit XML, the test-result shape that CI servers read: testsuites,
// testsuite, properties, testcase, failure, system-out. Nothing here judges the circuit:
// which findings fail is fails_review() at the review's --fail-on severity, which output a
// finding belongs to is the review tree's. CI viewers read the dots of a classname as
// packages, so names keep their hierarchy with `/` instead (`x1.out` becomes `x1/out`).
// Text from the netlist (device and node names) and from waiver
// files reaches the XML, so every string is escaped (xml_text.hpp).
#include "src/report/junit_report.hpp"

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string_view>
#include <vector>

#include <fmt/format.h>

#include "src/report/finding_text.hpp"
#include "src/report/xml_text.hpp"

namespace mirrorcheck::report {
namespace {

using xml::attr;
using xml::content;
using xml::undotted;

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
