#include "src/deck/run_variant.hpp"

#include <algorithm>
#include <cctype>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "parsers/common/text.hpp"
#include "src/deck/deck_errors.hpp"
#include "src/deck/deck_text.hpp"

namespace mirrorcheck {
namespace {

std::vector<std::string> split_lines(const std::string& text) {
    std::vector<std::string> lines;
    std::string line;
    std::istringstream in(text);
    while (std::getline(in, line)) lines.push_back(line);
    return lines;
}

// The words of a card, quotes taken off: `.lib "a b.lib" tt` -> {.lib, a b.lib, tt}.
std::vector<std::string> words(const std::string& line) {
    std::vector<std::string> out;
    std::size_t i = 0;
    while (i < line.size()) {
        while (i < line.size() && std::isspace(static_cast<unsigned char>(line[i]))) ++i;
        if (i >= line.size()) break;
        if (line[i] == '"' || line[i] == '\'') {
            const char q = line[i];
            const std::size_t end = line.find(q, i + 1);
            out.push_back(line.substr(i + 1, end == std::string::npos ? std::string::npos : end - i - 1));
            i = end == std::string::npos ? line.size() : end + 1;
            continue;
        }
        std::size_t j = i;
        while (j < line.size() && !std::isspace(static_cast<unsigned char>(line[j]))) ++j;
        out.push_back(line.substr(i, j - i));
        i = j;
    }
    return out;
}

// The section names a library file defines (`.lib NAME` lines with one word after .lib).
std::vector<std::string> sections_of(const std::filesystem::path& library) {
    std::ifstream in(library, std::ios::binary);
    std::vector<std::string> sections;
    std::string line;
    while (std::getline(in, line)) {
        if (!line.empty() && line.back() == '\r') line.pop_back();
        const auto w = words(line);
        if (w.size() == 2 && to_lower(w[0]) == ".lib") sections.push_back(to_lower(w[1]));
    }
    return sections;
}

// The review's control block: the last `.control` line (the user's are comments by now).
std::size_t control_line(const std::vector<std::string>& lines) {
    for (std::size_t k = lines.size(); k-- > 0;)
        if (first_word(lines[k]) == ".control") return k;
    return lines.size();
}

}  // namespace

std::size_t find_corner_line(const std::string& deck_text, const std::vector<std::string>& corners,
                             const std::filesystem::path& deck_path) {
    const auto lines = split_lines(deck_text);
    std::optional<std::pair<std::string, std::string>> first_missing;
    std::string first_sections;
    for (std::size_t k = 0; k < lines.size(); ++k) {
        const auto w = words(lines[k]);
        if (w.size() != 3 || to_lower(w[0]) != ".lib") continue;
        const auto sections = sections_of(w[1]);
        bool all = true;
        for (const auto& c : corners)
            if (std::find(sections.begin(), sections.end(), to_lower(c)) == sections.end()) {
                all = false;
                if (!first_missing) {
                    first_missing = {w[1], c};
                    for (const auto& s : sections) first_sections += (first_sections.empty() ? "" : ", ") + s;
                }
                break;
            }
        if (all) return k;
    }
    if (first_missing) throw errors::unknown_corner(first_missing->first, first_missing->second, first_sections);
    throw errors::no_corner_lib(deck_path.string());
}

std::string write_run_variant(const std::string& deck_text, const RunVariant& run, std::size_t corner_line) {
    auto lines = split_lines(deck_text);
    if (run.corner && corner_line < lines.size()) {
        const auto w = words(lines[corner_line]);
        lines[corner_line] = fmt::format("{} \"{}\" {}", w[0], w[1], *run.corner);
    }
    if (run.temperature)
        for (auto& line : lines)
            if (first_word(line) == ".temp") line = "*(sweep sets the temperature) " + line;
    const std::size_t control = control_line(lines);
    std::vector<std::string> before, inside;
    if (run.temperature) before.push_back(fmt::format(".temp {}", *run.temperature));
    for (const auto& [name, value] : run.params) before.push_back(fmt::format(".param {}={}", name, value));
    if (run.seed) {
        inside.push_back(fmt::format("setseed {}", *run.seed));
        inside.push_back("reset");
    }
    for (const auto& [name, volts] : run.supplies) inside.push_back(fmt::format("alter {} dc={}", name, volts));
    std::string out;
    for (std::size_t k = 0; k < lines.size(); ++k) {
        if (k == control)
            for (const auto& l : before) out += l + "\n";
        out += lines[k] + "\n";
        if (k == control)
            for (const auto& l : inside) out += l + "\n";
    }
    return out;
}

}  // namespace mirrorcheck
