// The table back end and its layout helpers on the shipped sample's review: every line fits
// the width asked for (UTF-8 counted as characters, colour codes as nothing), colour only
// when asked and never instead of a word, the summary alone with --summary, each output's
// findings inside its own block (a finding about one output of a mirror under that output
// only; the reference side's under every output), and wrapping that keeps every word.
#include <filesystem>
#include <sstream>
#include <string>

#include <doctest/doctest.h>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/build_review_tree.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/model/op_point_build.hpp"
#include "src/model/simulation_plots_build.hpp"
#include "src/report/review_report.hpp"
#include "src/report/text_layout.hpp"

using namespace mirrorcheck;
namespace fs = std::filesystem;

namespace {

ReviewTree sample_review() {
    const fs::path dir = fs::path(MIRRORCHECK_SOURCE_DIR) / "samples" / "tamarack";
    Circuit circuit = read_circuit(dir / "bias.cir");
    raw::RawFile file = raw::read_raw(dir / "bias_op.raw");
    OpPoint op = build_op_point(circuit, file, file.plots.front());
    return run_review(circuit, op, simulation_plots_from_raw(file), ReviewSettings{},
                      ReviewInputs{"bias.cir", "bias_op.raw: Operating Point", {"bias_op.raw"}});
}

std::size_t widest(const std::string& text) {
    std::istringstream in(text);
    std::size_t w = 0;
    for (std::string line; std::getline(in, line);) w = std::max(w, report::display_width(line));
    return w;
}

std::string words_only(const std::string& text) {
    std::string out;
    std::istringstream in(text);
    for (std::string w; in >> w;) out += w + " ";
    return out;
}

}  // namespace

TEST_CASE("wrap: at most the width, continuation indented, no word lost or split") {
    const std::string line = "    error   out-of-saturation  xm4 is in triode, 86.5 mV below its saturation voltage of "
                             "334 mV, so its ro collapses and every formula above it is wrong.";
    for (std::size_t width : {40u, 60u, 80u, 120u}) {
        CAPTURE(width);
        const std::string wrapped = report::wrap(line, width, 8);
        CHECK(widest(wrapped) <= width);
        CHECK(words_only(wrapped) == words_only(line));
    }
    CHECK(report::display_width("2.24 MΩ, 126 µS, gm·ro, 0°") == 26);
    CHECK(report::display_width(report::coloured("fail", report::Colour::red, true)) == 4);
    CHECK(report::coloured("fail", report::Colour::red, false) == "fail");
}

TEST_CASE("the sample's table fits every width asked; colour only when asked, always beside the word") {
    const ReviewTree tree = sample_review();
    for (std::size_t width : {80u, 100u, 120u}) {
        CAPTURE(width);
        const std::string table = report::write_review_table(tree, {width, false, false});
        CHECK(widest(table) <= width);
        CHECK(table.find('\x1b') == std::string::npos);
    }
    const std::string plain = report::write_review_table(tree, {120, false, false});
    const std::string colour = report::write_review_table(tree, {120, true, false});
    CHECK(colour.find("\x1b[31mfail\x1b[0m") != std::string::npos);
    CHECK(widest(colour) <= 120);
    // without its escape codes the coloured table is the plain one
    std::string stripped;
    for (std::size_t k = 0; k < colour.size(); ++k) {
        if (colour[k] == '\x1b') {
            k = colour.find('m', k);
            continue;
        }
        stripped += colour[k];
    }
    CHECK(stripped == plain);
}

TEST_CASE("--summary: the verdict and the rows, nothing else") {
    const ReviewTree tree = sample_review();
    const std::string summary = report::write_review_table(tree, {120, false, true});
    const std::string full = report::write_review_table(tree, {120, false, false});
    CHECK(full.starts_with(summary));
    std::size_t lines = 0;
    for (char c : summary) lines += c == '\n';
    CHECK(lines == 2 + 1 + 1 + tree.summary.outputs);  // title, verdict, blank, header, one row each
    CHECK(summary.find("out-of-saturation") == std::string::npos);
}

TEST_CASE("a finding about one output of a two-output mirror sits under that output only") {
    ReviewTree tree = sample_review();
    // Give the PMOS mirror mp1 -> mp2 a second, made-up output; a ratio error on it, and a
    // low margin of the reference device mp1.
    ReviewMirror* pmos = nullptr;
    for (auto& m : tree.mirrors)
        if (m.id == "pmos-simple:mp2") pmos = &m;
    REQUIRE(pmos);
    ReviewOutput second = pmos->outputs.front();
    second.node = "chop2";
    pmos->outputs.push_back(second);
    tree.findings.push_back(make_finding(FindingCode::ratio_error, "pmos-simple:mp2", "chop2", {}));
    Finding margin = make_finding(FindingCode::low_margin, "pmos-simple:mp2", "mp1", {});
    tree.findings.push_back(margin);
    join_findings(tree);
    auto codes = [&](const ReviewOutput& o) {
        std::string s;
        for (std::size_t k : o.findings) s += std::string(to_string(tree.findings[k].code)) + " ";
        return s;
    };
    CHECK(codes(pmos->outputs[0]) == "low-margin ");
    CHECK(codes(pmos->outputs[1]) == "low-margin ratio-error ");
    CHECK(pmos->outputs[1].status == OutputStatus::pass);
    CHECK(pmos->outputs[1].worst_severity == Severity::warning);
}

TEST_CASE("what the op data's reader noted reaches the tree, the table and JSON") {
    const fs::path dir = fs::path(MIRRORCHECK_SOURCE_DIR) / "samples" / "tamarack";
    Circuit circuit = read_circuit(dir / "bias.cir");
    raw::RawFile file = raw::read_raw(dir / "bias_op.raw");
    REQUIRE(file.plots.at(1).kind() == "ac");
    OpPoint op = build_op_point(circuit, file, file.plots[1]);  // the op values an AC plot repeats
    REQUIRE(!op.notes.empty());
    const ReviewTree tree = run_review(circuit, op, {}, ReviewSettings{});
    REQUIRE(tree.notes == op.notes);
    CHECK(report::write_review_table(tree).find("note: " + op.notes.front()) != std::string::npos);
    CHECK(report::review_to_json(tree)["notes"][0] == op.notes.front());
}

TEST_CASE("terminal_text escapes what the input put there and keeps the colour the table added") {
    using mirrorcheck::report::terminal_text;
    const std::string red = mirrorcheck::report::coloured("FAIL", mirrorcheck::report::Colour::red, true);
    CHECK(terminal_text(red + " m\xff\x1b" "c\n", true) == red + " m\\xff\\x1bc\n");
    CHECK(terminal_text(red, false).find('\x1b') == std::string::npos);  // no colour asked: none passes
    CHECK(terminal_text("plain 24.5 MΩ\tok\n", true) == "plain 24.5 MΩ\tok\n");
}
