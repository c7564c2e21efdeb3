// The catalogue of findings (src/analyse/finding.cpp) against everything that must agree
// with it: one row per code, names and reading orders unique; every finding the shipped
// sample's review emits renders through its template with every value it names; the
// README's table of findings is the catalogue, row for row; and every input-error code is
// built in an error catalogue and by one catalogue only (the sources are scanned).
#include <filesystem>
#include <fstream>
#include <map>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/model/op_point_build.hpp"
#include "src/model/simulation_plots_build.hpp"
#include "src/report/finding_text.hpp"

using namespace mirrorcheck;
namespace fs = std::filesystem;

namespace {

const fs::path source_dir = MIRRORCHECK_SOURCE_DIR;

std::string read(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

// The {placeholders} of a template, clauses included.
std::set<std::string> placeholders(std::string_view text) {
    std::set<std::string> names;
    for (std::size_t at = text.find('{'); at != std::string_view::npos; at = text.find('{', at + 1))
        names.insert(std::string(text.substr(at + 1, text.find('}', at) - at - 1)));
    return names;
}

// The ones outside <optional clauses>: a finding must always carry these.
std::set<std::string> required_placeholders(std::string_view text) {
    std::string outside;
    int depth = 0;
    for (char c : text) {
        if (c == '<') ++depth;
        else if (c == '>') --depth;
        else if (depth == 0) outside += c;
    }
    return placeholders(outside);
}

ReviewTree sample_review() {
    const fs::path dir = source_dir / "samples" / "tamarack";
    Circuit circuit = read_circuit(dir / "bias.cir");
    raw::RawFile file = raw::read_raw(dir / "bias_op.raw");
    const raw::Plot* op_plot = nullptr;
    for (const auto& p : file.plots)
        if (p.kind() == "op") op_plot = &p;
    REQUIRE(op_plot);
    OpPoint op = build_op_point(circuit, file, *op_plot);
    return run_review(circuit, op, simulation_plots_from_raw(file), ReviewSettings{});
}

}  // namespace

TEST_CASE("one catalogue row per code, in reading order, names unique") {
    const auto& rows = finding_catalogue();
    CHECK(rows.size() == finding_code_count);
    std::set<std::string_view> names;
    for (std::size_t k = 0; k < rows.size(); ++k) {
        CAPTURE(rows[k].name);
        CHECK(static_cast<std::size_t>(rows[k].code) == k);  // the enum's order is the catalogue's
        CHECK(rows[k].reading_order == static_cast<int>(k + 1));
        CHECK(names.insert(rows[k].name).second);
        CHECK(parse_finding_code(rows[k].name) == rows[k].code);
        CHECK(&catalogue_row(rows[k].code) == &rows[k]);
        CHECK(!rows[k].meaning.empty());
        CHECK(!rows[k].action.empty());
        CHECK(rows[k].severity_text.starts_with(to_string(rows[k].severity)));
    }
    CHECK(cause_catalogue().size() == cause_code_count);
    for (std::size_t k = 0; k < cause_code_count; ++k)
        CHECK(static_cast<std::size_t>(cause_catalogue()[k].code) == k);
    CHECK_FALSE(parse_finding_code("rout-disagrees"));
}

TEST_CASE("sorting: severity first, then the catalogue's reading order") {
    std::vector<Finding> f = {make_finding(FindingCode::body_effect, "m", "n", {}),
                              make_finding(FindingCode::inspection_vs_own, "m", "n", {}),
                              make_finding(FindingCode::ratio_error, "m", "n", {}),
                              make_finding(FindingCode::out_of_saturation, "m", "d", {}),
                              make_finding(FindingCode::low_intrinsic_gain, "m", "d", {})};
    sort_findings(f);
    std::vector<std::string_view> order;
    for (const auto& x : f) order.push_back(to_string(x.code));
    // a warning after three infos was once the order; now every warning precedes every info
    CHECK(order == std::vector<std::string_view>{"out-of-saturation", "ratio-error", "inspection-vs-own",
                                                 "low-intrinsic-gain", "body-effect"});
}

TEST_CASE("every finding of the sample's review renders, with every value its template names") {
    const ReviewTree tree = sample_review();
    REQUIRE(tree.findings.size() >= 7);
    std::set<FindingCode> seen;
    for (const Finding& f : tree.findings) {
        CAPTURE(to_string(f.code));
        seen.insert(f.code);
        for (const auto& name : required_placeholders(catalogue_row(f.code).message)) {
            const bool present = name == "cause" ? f.cause.has_value() : f.value(name) != nullptr;
            CHECK_MESSAGE(present, name);
        }
        const std::string sentence = report::finding_sentence(f, tree.display_names);
        CHECK(sentence.find('{') == std::string::npos);
        CHECK(sentence.find('<') == std::string::npos);
        CHECK(std::regex_search(sentence, std::regex("[0-9]e[+-][0-9]")) == false);  // no exponents for people
    }
    CHECK(seen.count(FindingCode::out_of_saturation));
    CHECK(seen.count(FindingCode::loaded_output));
    // Numbers as the table prints them: mn4's shortfall is 86.5 mV, not 0.0865 V.
    for (const Finding& f : tree.findings)
        if (f.code == FindingCode::out_of_saturation)
            CHECK(report::finding_sentence(f, tree.display_names).find("86.5 mV below its saturation voltage of 334 mV") !=
                  std::string::npos);
}

TEST_CASE("a template's value missing from a finding is a bug, not a sentence with a hole") {
    Finding f = make_finding(FindingCode::low_margin, "m", "m1", {FindingValue::names("device", {"m1"})});
    CHECK_THROWS_AS(report::finding_sentence(f, {}), std::logic_error);
    // an optional clause is left out when its value is absent
    Finding ratio = make_finding(FindingCode::ratio_error, "m", "out",
                                 {FindingValue::words("node", "out"), FindingValue::of("measured", 1.2, Unit::none),
                                  FindingValue::of("design", 1, Unit::none), FindingValue::of("error", 0.2, Unit::percent),
                                  FindingValue::words("basis", "b")});
    CHECK(report::finding_sentence(ratio, {}) ==
          "The output at out carries 1.2 times the reference current against a design ratio of 1, 20 % off.");
}

TEST_CASE("the README's table of findings is the catalogue") {
    const std::string readme = read(source_dir / "README.md");
    const std::size_t section = readme.find("## Findings: causes and what to do");
    REQUIRE(section != std::string::npos);
    std::vector<std::vector<std::string>> rows;
    std::istringstream lines(readme.substr(section));
    std::string line;
    bool in_table = false;
    while (std::getline(lines, line)) {
        if (line.starts_with("| `")) {
            in_table = true;
            std::vector<std::string> cells;
            std::size_t at = 1;
            for (std::size_t bar = line.find(" |", at); bar != std::string::npos; bar = line.find(" |", at)) {
                std::string cell = line.substr(at, bar - at);
                while (!cell.empty() && cell.front() == ' ') cell.erase(0, 1);
                cells.push_back(cell);
                at = bar + 2;
            }
            rows.push_back(cells);
        } else if (in_table && !line.starts_with("|")) {
            break;
        }
    }
    const auto& catalogue = finding_catalogue();
    REQUIRE(rows.size() == catalogue.size());
    for (std::size_t k = 0; k < rows.size(); ++k) {
        CAPTURE(catalogue[k].name);
        REQUIRE(rows[k].size() == 4);
        CHECK(rows[k][0] == "`" + std::string(catalogue[k].name) + "`");
        CHECK(rows[k][1] == catalogue[k].severity_text);
        CHECK(rows[k][2] == catalogue[k].meaning);
        CHECK(rows[k][3] == catalogue[k].action);
    }
}

TEST_CASE("every input-error code is built in an error catalogue, and each code in one catalogue only") {
    // Catalogues are the files named *errors.cpp; nowhere else may construct an InputError.
    const std::regex construction(R"(InputError\s*[({])");
    const std::regex code(R"(return \{\s*"([a-z]+\.[a-z-]+)\")");
    std::map<std::string, std::set<std::string>> catalogues_of;  // code -> files
    std::size_t scanned = 0;
    for (const char* root : {"parsers", "src"})
        for (const auto& entry : fs::recursive_directory_iterator(source_dir / root)) {
            const std::string ext = entry.path().extension().string();
            if (ext != ".cpp" && ext != ".hpp") continue;
            const std::string name = entry.path().filename().string();
            const std::string rel = fs::relative(entry.path(), source_dir).string();
            const std::string text = std::regex_replace(read(entry.path()), std::regex("//[^\n]*"), "");  // code only
            ++scanned;
            CAPTURE(rel);
            if (name.starts_with("input_error.")) continue;  // the class itself
            const bool catalogue = name.ends_with("errors.cpp") || name.ends_with("errors.hpp");
            if (!catalogue) {
                CHECK_MESSAGE(!std::regex_search(text, construction), "constructs an InputError outside a catalogue");
                CHECK_MESSAGE(!std::regex_search(text, code), "returns an error code outside a catalogue");
                continue;
            }
            for (auto it = std::sregex_iterator(text.begin(), text.end(), code); it != std::sregex_iterator(); ++it)
                catalogues_of[(*it)[1]].insert(rel);
        }
    CHECK(scanned > 50);
    CHECK(catalogues_of.size() >= 40);
    for (const auto& [c, files] : catalogues_of) {
        CAPTURE(c);
        CHECK(files.size() == 1);
    }
}
