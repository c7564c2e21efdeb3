// The man page and the bash completion the build writes (build/mirrorcheck.1,
// build/mirrorcheck.bash-completion) against the executable's own --help, which CLI11
// prints from the same definitions by its own code: every command and every option --help
// lists must be in both. The completion is loaded and run in bash itself; the man page is
// checked by man-db's and groff's own warnings (`man --warnings`, `groff -ww`); the man
// page's examples are run, as printed, on a copy of the shipped sample.
#include <doctest/doctest.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "support/run_cli.hpp"

namespace fs = std::filesystem;
using mirrorcheck::test::read_text;
using mirrorcheck::test::run_cli;

namespace {

struct HelpOption {
    std::vector<std::string> names;  // "-o", "--output"
    std::vector<std::string> choices;
};

struct Help {
    std::vector<std::string> positionals;
    std::vector<HelpOption> options;
    std::vector<std::string> subcommands;
};

std::vector<std::string> split(const std::string& s, char by) {
    std::vector<std::string> parts;
    std::string part;
    std::istringstream in(s);
    while (std::getline(in, part, by)) parts.push_back(part);
    return parts;
}

// What `mirrorcheck [COMMAND] --help` lists, read from CLI11's own layout: sections
// "Positionals:", "Options:", "Subcommands:", two-space-indented rows, a blank line after.
Help read_help(const std::string& command) {
    auto r = run_cli((command.empty() ? "" : command + " ") + "--help");
    REQUIRE(r.status == 0);
    Help help;
    std::string section;
    std::istringstream in(r.out);
    std::string line;
    while (std::getline(in, line)) {
        if (line.empty()) section.clear();
        if (!line.empty() && line.back() == ':' && line[0] != ' ') section = line;
        if (!line.starts_with("  ") || line.starts_with("   ")) continue;
        std::istringstream words(line);
        std::string first, second;
        words >> first >> second;
        if (section == "Positionals:") help.positionals.push_back(first);
        if (section == "Subcommands:") help.subcommands.push_back(first);
        if (section == "Options:" && first.starts_with("-")) {
            HelpOption o{split(first, ','), {}};
            std::smatch set;
            if (std::regex_search(second, set, std::regex(R"(\{([^}]*)\})"))) o.choices = split(set[1], ',');
            help.options.push_back(o);
        }
    }
    return help;
}

const std::string man_source = read_text(MIRRORCHECK_MAN_PAGE);

// roff as a reader sees it: \- is -, \(aq a quote.
std::string unescape(std::string s) {
    s = std::regex_replace(s, std::regex(R"(\\-)"), "-");
    s = std::regex_replace(s, std::regex(R"(\\\(aq)"), "'");
    return std::regex_replace(s, std::regex(R"(\\f[BIR])"), "");
}

// The lines of the man page's subsection of `command` (".SS command" to the next heading).
std::string man_section(const std::string& command) {
    const std::string heading = ".SS \\fB" + command + "\\fR\n";
    const auto start = man_source.find(heading);
    if (start == std::string::npos) return "";
    auto end = man_source.find("\n.S", start + heading.size());
    return man_source.substr(start, end == std::string::npos ? std::string::npos : end - start);
}

// The `.TP` headings of a man section, unescaped: "-o, --output VALUE", "NETLIST".
std::vector<std::string> man_option_headings(const std::string& section) {
    std::vector<std::string> headings;
    const auto lines = split(section, '\n');
    for (std::size_t i = 0; i + 1 < lines.size(); ++i)
        if (lines[i] == ".TP") headings.push_back(unescape(lines[i + 1]));
    return headings;
}

bool heading_names(const std::vector<std::string>& headings, const std::string& name) {
    const std::regex word("(^|[ ,])" + std::regex_replace(name, std::regex(R"([\[\]\-])"), R"(\$&)") + "($|[ ,])");
    return std::any_of(headings.begin(), headings.end(), [&](const std::string& h) { return std::regex_search(h, word); });
}

std::string shell_quote(const std::string& s) { return "'" + std::regex_replace(s, std::regex("'"), "'\\''") + "'"; }

// The completions bash offers for the words typed so far (the last one being completed),
// through the completion the script registers with `complete`.
std::set<std::string> complete(const std::vector<std::string>& words) {
    std::string array;
    for (const auto& w : words) array += " " + shell_quote(w);
    const std::string script =
        "source " + shell_quote(MIRRORCHECK_COMPLETION) +
        " || exit 9\n"
        "spec=$(complete -p mirrorcheck) || exit 8\n"
        "fn=${spec#*-F }; fn=${fn%% *}\n"
        "COMP_WORDS=(" + array + ")\n"
        "COMP_CWORD=$((${#COMP_WORDS[@]} - 1))\n"
        "COMP_LINE=\"${COMP_WORDS[*]}\"; COMP_POINT=${#COMP_LINE}\n"
        "COMPREPLY=()\n"
        "$fn mirrorcheck \"${COMP_WORDS[COMP_CWORD]}\" \"${COMP_WORDS[COMP_CWORD-1]}\" || exit 7\n"
        "printf '%s\\n' \"${COMPREPLY[@]}\"\n";
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-complete");
    mirrorcheck::test::write_text(dir / "script.sh", script);
    const std::string cmd = "cd " + shell_quote(dir.string()) + " && bash --norc --noprofile script.sh > out 2> err";
    const int status = std::system(cmd.c_str());
    const std::string out = read_text(dir / "out"), err = read_text(dir / "err");
    fs::remove_all(dir);
    CAPTURE(err);
    REQUIRE(status == 0);
    CHECK(err == "");
    std::set<std::string> offered;
    for (const auto& w : split(out, '\n'))
        if (!w.empty()) offered.insert(w);
    return offered;
}

}  // namespace

TEST_CASE("every command --help lists is in the man page and the completion, and no other") {
    const Help top = read_help("");
    REQUIRE(top.subcommands.size() >= 5);  // list, peek, review, prepare, run
    std::set<std::string> commands(top.subcommands.begin(), top.subcommands.end());
    CHECK(complete({"mirrorcheck", ""}) == commands);
    for (const auto& c : top.subcommands) {
        CAPTURE(c);
        CHECK(man_section(c) != "");
    }
    // the man page's command sections are those commands exactly (the hidden generator is not one)
    std::set<std::string> man_commands;
    const std::regex ss(R"(\n\.SS \\fB([a-z-]+)\\fR)");
    for (std::sregex_iterator m(man_source.begin(), man_source.end(), ss), end; m != end; ++m)
        man_commands.insert((*m)[1]);
    CHECK(man_commands == commands);
    // the program's own options
    std::set<std::string> top_options;
    for (const auto& o : top.options) top_options.insert(o.names.begin(), o.names.end());
    CHECK(top_options.count("--version") == 1);
    CHECK(complete({"mirrorcheck", "-"}) == top_options);
}

TEST_CASE("every option of every command is in the man page and the completion, with its values") {
    for (const auto& c : read_help("").subcommands) {
        CAPTURE(c);
        const Help help = read_help(c);
        const auto headings = man_option_headings(man_section(c));
        std::set<std::string> names;
        for (const auto& p : help.positionals) {
            CAPTURE(p);
            CHECK(heading_names(headings, p));
        }
        for (const auto& o : help.options) {
            for (const auto& n : o.names) {
                CAPTURE(n);
                CHECK(heading_names(headings, n));
                names.insert(n);
            }
            if (o.choices.empty()) continue;
            CAPTURE(o.names.back());
            const std::set<std::string> choices(o.choices.begin(), o.choices.end());
            CHECK(complete({"mirrorcheck", c, o.names.back(), ""}) == choices);
            std::string listed;  // the man page's heading gives the values as --help does
            for (const auto& v : o.choices) listed += (listed.empty() ? "" : "|") + v;
            CHECK(heading_names(headings, o.names.back() + " " + listed));
        }
        CHECK(complete({"mirrorcheck", c, "-"}) == names);
    }
}

TEST_CASE("the completion completes as a user types") {
    CHECK(complete({"mirrorcheck", "rev"}) == std::set<std::string>{"review"});
    // review's --format: the report formats DESIGN.md names (table, json, junit)
    CHECK(complete({"mirrorcheck", "review", "bias.cir", "--format", "j"}) == std::set<std::string>{"json", "junit"});
    CHECK(complete({"mirrorcheck", "review", "bias.cir", "--fo"}) == std::set<std::string>{"--format"});
    // a file-valued option offers the files of the folder
    const fs::path sample = fs::path(MIRRORCHECK_SOURCE_DIR) / "samples" / "tamarack";
    const auto offered = complete({"mirrorcheck", "review", "x.cir", "--op", (sample / "bias_op").string()});
    CHECK(offered == std::set<std::string>{(sample / "bias_op.raw").string(), (sample / "bias_op_ascii.raw").string()});
}

TEST_CASE("the man page gives no warning in man-db or groff") {
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-man");
    const std::string page = shell_quote(MIRRORCHECK_MAN_PAGE);
    const std::string err = shell_quote((dir / "err").string());
    bool checked = false;
    if (std::system("command -v man > /dev/null") == 0) {
        CHECK(std::system(("MANWIDTH=80 man --warnings -E UTF-8 -l " + page + " > /dev/null 2> " + err).c_str()) == 0);
        CHECK(read_text(dir / "err") == "");
        checked = true;
    }
    if (std::system("command -v groff > /dev/null") == 0) {
        CHECK(std::system(("groff -man -ww -z " + page + " 2> " + err).c_str()) == 0);
        CHECK(read_text(dir / "err") == "");
        checked = true;
    }
    fs::remove_all(dir);
    if (!checked) MESSAGE("skipped: neither man nor groff is installed (.ci/setup installs man-db)");
}

TEST_CASE("the man page lists every exit status and every finding code") {
    // the statuses DESIGN.md gives (0 pass, 1 findings, 2 bad usage or input) and 3, internal errors
    const std::string statuses = man_source.substr(man_source.find(".SH \"EXIT STATUS\""));
    for (const char* s : {"0", "1", "2", "3"}) CHECK(statuses.find(".TP\n.B " + std::string(s) + "\n") != std::string::npos);
    // every code a waiver file accepts is described: a waiver file naming each is read without error
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-man-codes");
    const std::string findings = man_source.substr(man_source.find(".SH FINDINGS"));
    std::string waivers;
    const std::regex code(R"(\.TP\n\\fB([a-z\\-]+)\\fR \()");
    int count = 0;
    for (std::sregex_iterator m(findings.begin(), findings.end(), code), end; m != end; ++m, ++count)
        waivers += "* " + unescape((*m)[1]) + " every code the man page lists\n";
    mirrorcheck::test::write_text(dir / "waivers.txt", waivers);
    const fs::path sample = fs::path(MIRRORCHECK_SOURCE_DIR) / "samples" / "tamarack";
    auto r = run_cli("review " + shell_quote((sample / "bias.cir").string()) + " --op " +
                     shell_quote((sample / "bias_op.raw").string()) + " --format json --waive " +
                     shell_quote((dir / "waivers.txt").string()));
    fs::remove_all(dir);
    CAPTURE(r.err);
    CHECK(r.status == 0);  // every finding waived
    CHECK(count >= 17);
    // and every code the review reported is in the man page
    const std::regex reported(R"re("code": *"([a-z-]+)")re");
    for (std::sregex_iterator m(r.out.begin(), r.out.end(), reported), end; m != end; ++m)
        CHECK(unescape(findings).find("\n" + std::string((*m)[1]) + " (") != std::string::npos);
}

TEST_CASE("the man page's examples run as printed on the shipped sample") {
    const std::string examples = man_source.substr(man_source.find(".SH EXAMPLES"));
    std::vector<std::string> commands;
    for (const auto& line : split(examples, '\n'))
        if (line.starts_with("mirrorcheck ")) commands.push_back(unescape(line));
    REQUIRE(commands.size() >= 6);
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-man-examples");
    fs::copy(fs::path(MIRRORCHECK_SOURCE_DIR) / "samples" / "tamarack", dir / "tamarack", fs::copy_options::recursive);
    const std::string bin = fs::path(MIRRORCHECK_EXE).parent_path().string();
    for (const auto& c : commands) {
        CAPTURE(c);
        const std::string cmd = "cd " + shell_quote((dir / "tamarack").string()) + " && PATH=" + shell_quote(bin) +
                                ":\"$PATH\" " + c + " > /dev/null 2> " + shell_quote((dir / "err").string());
        const int raw = std::system(cmd.c_str());
        const int status = WIFEXITED(raw) ? WEXITSTATUS(raw) : -1;
        CAPTURE(read_text(dir / "err"));
        if (c == "mirrorcheck review bias.cir --op bias_op.raw") CHECK(status == 1);  // the tail's error, as printed
        else if (c.find("--waive") != std::string::npos) CHECK(status == 0);          // as printed
        else CHECK((status == 0 || status == 1));
    }
    fs::remove_all(dir);
}
