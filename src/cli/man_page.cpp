// Writes mirrorcheck(1). Everything about the commands comes from the outline (their
// descriptions, footers and options as --help has them), the exit statuses from
// exit_status.hpp, the findings from the catalogue; only the examples, set in the shipped
// sample, are written here. Text is escaped for roff: hyphens as \-, quotes and backquotes
// as themselves, characters beyond ASCII as \[uXXXX], so the page reads the same in any
// locale.
#include "src/cli/man_page.hpp"

#include <algorithm>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include <fmt/format.h>

#include "parsers/common/utf8.hpp"
#include "src/analyse/finding.hpp"
#include "src/analyse/review_tree.hpp"
#include "src/cli/exit_status.hpp"

namespace mirrorcheck::cli {
namespace {

// One UTF-8 sequence starting at s[i] as a code point (U+FFFD for a byte that is not
// well-formed UTF-8); i moves past it.
std::uint32_t next_code_point(std::string_view s, std::size_t& i) {
    const auto decoded = decode_utf8(s.substr(i));
    i += decoded ? decoded->second : 1;
    return decoded ? decoded->first : 0xFFFD;
}

std::string roff_escape(std::string_view s) {
    std::string out;
    for (std::size_t i = 0; i < s.size();) {
        const char c = s[i];
        if (static_cast<unsigned char>(c) >= 0x80) {
            out += fmt::format("\\[u{:04X}]", next_code_point(s, i));
            continue;
        }
        switch (c) {
            case '\\': out += "\\e"; break;
            case '-': out += "\\-"; break;
            case '\'': out += "\\(aq"; break;
            case '`': out += "\\(ga"; break;
            default: out += c;
        }
        ++i;
    }
    return out;
}

// A line of running text: roff must not read a leading dot as a request.
std::string roff_line(std::string_view s) {
    std::string line = roff_escape(s);
    return (!line.empty() && line.front() == '.') ? "\\&" + line : line;
}

std::string bold(std::string_view s) { return "\\fB" + roff_escape(s) + "\\fR"; }
std::string italic(std::string_view s) { return "\\fI" + roff_escape(s) + "\\fR"; }

std::string option_value(const CliOption& o) {
    if (!o.choices.empty()) {
        std::string v;
        for (const auto& c : o.choices) v += (v.empty() ? "" : "|") + italic(c);
        return v;
    }
    return italic(o.value_name);
}

// "\fB\-o\fR, \fB\-\-output\fR \fIVALUE\fR", or "\fINETLIST\fR".
std::string option_heading(const CliOption& o) {
    if (!o.positional.empty()) return italic(o.positional);
    std::string h;
    for (const auto& n : o.names) h += (h.empty() ? "" : ", ") + bold(n);
    if (o.takes_value) h += " " + option_value(o);
    return h;
}

// "mirrorcheck review NETLIST --op FILE [options]": what a command needs.
std::string synopsis(const CliCommand& c) {
    std::string s = bold("mirrorcheck") + " " + bold(c.name);
    bool optional = false;
    for (const auto& o : c.options) {
        if (!o.positional.empty()) s += " " + italic(o.positional);
        else if (o.required) s += " " + bold(o.names.back()) + " " + option_value(o);
        else optional = true;
    }
    return optional ? s + " [" + italic("options") + "]" : s;
}

// A footer as --help prints it: paragraphs apart by blank lines, lines indented by two
// spaces (examples) kept as they are.
void write_footer(std::string_view footer, std::ostream& out) {
    bool verbatim = false;
    std::size_t start = 0;
    out << ".PP\n";
    while (start <= footer.size()) {
        std::size_t end = footer.find('\n', start);
        if (end == std::string_view::npos) end = footer.size();
        const std::string_view line = footer.substr(start, end - start);
        start = end + 1;
        const bool indented = line.starts_with("  ");
        if (indented != verbatim) {
            out << (indented ? ".RS\n.nf\n" : ".fi\n.RE\n");
            verbatim = indented;
        }
        if (line.empty()) {
            if (!verbatim) out << ".PP\n";
        } else {
            out << roff_line(indented ? line.substr(2) : line) << "\n";
        }
    }
    if (verbatim) out << ".fi\n.RE\n";
}

// Positionals first, then the options as defined.
void write_options(std::vector<CliOption> options, std::ostream& out) {
    std::stable_partition(options.begin(), options.end(), [](const CliOption& o) { return !o.positional.empty(); });
    for (const auto& o : options) {
        out << ".TP\n" << option_heading(o) << "\n" << roff_line(o.description);
        if (o.required) out << " (required)";
        if (o.repeatable && o.positional.empty() && o.description.find("repeatable") == std::string::npos)
            out << " (repeatable)";
        out << "\n";
    }
}

void write_command(const CliCommand& c, std::ostream& out) {
    out << ".SS " << bold(c.name) << "\n" << synopsis(c) << "\n.PP\n" << roff_line(c.description) << ".\n";
    if (!c.footer.empty()) write_footer(c.footer, out);
    write_options(c.options, out);
}

void write_exit_statuses(std::ostream& out) {
    out << ".SH \"EXIT STATUS\"\n";
    for (const auto& e : exit_status_meanings) out << ".TP\n.B " << e.status << "\n" << roff_line(e.meaning) << "\n";
}

void write_findings(std::ostream& out) {
    out << ".SH FINDINGS\nEach finding of a review has a code (the name JSON, JUnit and waiver files use) and a "
           "severity: \\fBerror\\fR fails a review, \\fBwarning\\fR fails it under \\fB\\-\\-fail\\-on "
           "warning\\fR, \\fBinfo\\fR never does.\n";
    for (const auto& row : finding_catalogue()) {
        out << ".TP\n" << bold(row.name) << " (" << roff_escape(row.severity_text) << ")\n"
            << roff_line(row.meaning) << "\n.IP\n" << roff_line(row.action) << "\n";
    }
}

struct Example {
    std::string_view what;
    std::vector<std::string_view> commands;  // each run in the sample's folder
};

// Set in the shipped sample; tests/integration/test_manual.cpp runs every command here.
const std::vector<Example>& examples() {
    static const std::vector<Example> list = {
        {"Review the sample's eight mirrors against its operating point (binary raw file). It exits 1: the "
         "cascode tail source has too little headroom, an error finding.",
         {"mirrorcheck review bias.cir --op bias_op.raw"}},
        {"The same review from ngspice's show listing, the verdict and summary rows only:",
         {"mirrorcheck review bias.cir --op bias_show.txt --summary"}},
        {"For a flow: the report as JSON, and as JUnit XML failing on warnings too:",
         {"mirrorcheck review bias.cir --op bias_op.raw --format json > review.json",
          "mirrorcheck review bias.cir --op bias_op.raw --format junit --fail-on warning > review.xml"}},
        {"Accept the tail's finding with the sample's waiver file; the review exits 0:",
         {"mirrorcheck review bias.cir --op bias_op.raw --waive waivers.txt"}},
        {"The mirrors found in the netlist, and one vector of the raw file:",
         {"mirrorcheck list bias.cir", "mirrorcheck peek bias_op.raw --plot op --vector '@mn4[vds]'"}},
        {"Write the deck that makes everything a review needs, or simulate with ngspice and review in one go:",
         {"mirrorcheck prepare bias.cir -o bias_review.cir", "mirrorcheck run bias.cir"}},
    };
    return list;
}

void write_examples(std::ostream& out) {
    out << ".SH EXAMPLES\nThe examples use the sample installed with mirrorcheck: the bias block of the Tamarack "
           "TK\\-2, an invented strain\\-gauge readout chip, with ngspice\\(aqs results. Copy it to a folder of "
           "your own first (the prefix is /usr for the Debian package, /usr/local by default):\n"
           ".PP\n.RS\n.nf\n"
        << roff_line("cp -r /usr/share/doc/mirrorcheck/examples/tamarack . && cd tamarack") << "\n.fi\n.RE\n";
    for (const auto& e : examples()) {
        out << ".PP\n" << roff_line(e.what) << "\n.PP\n.RS\n.nf\n";
        for (const auto& c : e.commands) out << roff_line(c) << "\n";
        out << ".fi\n.RE\n";
    }
}

}  // namespace

void write_man_page(const CliOutline& outline, std::ostream& out) {
    const ToolInfo tool = this_tool();
    std::string summary = outline.program.description;
    if (summary.starts_with("mirrorcheck: ")) summary = summary.substr(13);
    out << ".\\\" Generated by `mirrorcheck describe-cli man` from its command-line definitions; do not "
           "edit.\n"
        << ".TH MIRRORCHECK 1 \"\" \"" << roff_escape(tool.name + " " + tool.version) << "\" \"User Commands\"\n"
        << ".nh\n"  // option names are never broken across lines
        << ".SH NAME\nmirrorcheck \\- " << roff_escape(summary) << "\n.SH SYNOPSIS\n";
    for (std::size_t i = 0; i < outline.commands.size(); ++i)
        out << (i ? ".br\n" : "") << synopsis(outline.commands[i]) << "\n";
    out << ".br\n" << bold("mirrorcheck") << " " << bold("--version") << "\n"
        << ".SH DESCRIPTION\n" << bold("mirrorcheck") << " " << roff_escape(summary) << ": it reads an ngspice netlist and ngspice\\(aqs results "
        << "(raw files, binary or ASCII, and \\fBshow\\fR listings), finds the current mirrors, recomputes their "
           "output resistance and headroom by inspection and by an exact small\\-signal solve, compares both with "
           "the simulated impedance, and explains every disagreement in a terminal table, JSON or JUnit XML.\n"
           ".PP\nEach command below has its own options; \\fBmirrorcheck \\fICOMMAND\\fB \\-\\-help\\fR prints "
           "them. Values take their unit (100mV, 10%, 1kHz).\n"
        << ".SH OPTIONS\n";
    write_options(outline.program.options, out);
    out << ".SH COMMANDS\n";
    for (const auto& c : outline.commands) write_command(c, out);
    write_exit_statuses(out);
    write_findings(out);
    out << ".SH ENVIRONMENT\n.TP\n.B NO_COLOR\nWhen set, the table is printed without colour on a terminal too "
           "(colour only repeats what the words say).\n";
    write_examples(out);
    out << ".SH \"SEE ALSO\"\n.BR ngspice (1)\n.PP\nThe README in /usr/share/doc/mirrorcheck (under the "
           "installation prefix) explains a review line by line, the formulas and their sources.\n";
}

}  // namespace mirrorcheck::cli
