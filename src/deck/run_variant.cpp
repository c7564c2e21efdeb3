#include "src/deck/run_variant.hpp"

#include <algorithm>
#include <cctype>
#include <fstream>
#include <map>
#include <optional>
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

// The file name of `path` with its word at [at, at + size) replaced by `by`.
std::filesystem::path with_word(const std::filesystem::path& path, std::size_t at, std::size_t size,
                                const std::string& by) {
    std::string name = path.filename().string();
    return path.parent_path() / name.replace(at, size, by);
}

// The corner word of an included file's name (`tt` in `x__tt.corner.spice`): the first
// word, between characters that are not letters or digits, that each of `corners` can
// take the place of with the file so named beside it: its offset and length.
std::optional<std::pair<std::size_t, std::size_t>> corner_word(const std::filesystem::path& path,
                                                               const std::vector<std::string>& corners) {
    const std::string name = path.filename().string();
    std::error_code ec;
    for (std::size_t at = 0; at < name.size();) {
        if (!std::isalnum(static_cast<unsigned char>(name[at]))) {
            ++at;
            continue;
        }
        std::size_t end = at;
        while (end < name.size() && std::isalnum(static_cast<unsigned char>(name[end]))) ++end;
        bool all = true;
        for (const auto& c : corners) all = all && std::filesystem::is_regular_file(with_word(path, at, end - at, c), ec);
        if (all) return std::pair{at, end - at};
        at = end;
    }
    return std::nullopt;
}

// The `.lib FILE SECTION` line whose library has every corner; else the first library that
// lacks one, and its sections, for the message.
std::optional<std::size_t> find_lib_line(const std::vector<std::string>& lines, const std::vector<std::string>& corners,
                                         std::optional<std::pair<std::string, std::string>>& first_missing,
                                         std::string& first_sections) {
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
    return std::nullopt;
}

}  // namespace

std::vector<CornerLine> find_corner_lines(const std::string& deck_text, const std::vector<std::string>& corners,
                                          const std::filesystem::path& deck_path) {
    const auto lines = split_lines(deck_text);
    std::optional<std::pair<std::string, std::string>> first_missing;
    std::string first_sections;
    if (const auto lib = find_lib_line(lines, corners, first_missing, first_sections)) return {{*lib, {}}};
    // Per family of files (the name with the corner word left out), the lines that include
    // one of them: SKY130's `__tt.corner.spice` and `__mismatch.corner.spice` are one family,
    // and only the deck's corner among them is to be replaced.
    std::map<std::string, std::vector<CornerLine>> families;
    for (std::size_t k = 0; k < lines.size(); ++k) {
        const auto w = words(lines[k]);
        const std::string head = w.empty() ? std::string() : to_lower(w[0]);
        if (w.size() != 2 || (head != ".include" && head != ".inc")) continue;
        if (const auto word = corner_word(w[1], corners)) {
            const std::filesystem::path file(w[1]);
            const std::string name = file.filename().string();
            families[with_word(file, word->first, word->second, "\x01").string()].push_back(
                {k, name.substr(word->first, word->second), word->first});
        }
    }
    std::vector<CornerLine> includes;
    for (const auto& [family, members] : families) {
        if (members.size() == 1) {
            includes.push_back(members.front());
            continue;
        }
        // More than one file of a family: the corner is the one named among the corners asked for.
        std::vector<CornerLine> named;
        for (const auto& m : members)
            if (std::find(corners.begin(), corners.end(), m.word) != corners.end()) named.push_back(m);
        if (named.size() != 1) {
            std::vector<std::string> words_seen;
            for (const auto& m : members) words_seen.push_back(m.word);
            throw errors::ambiguous_corner(deck_path.string(), members.front().line + 1, words_seen);
        }
        includes.push_back(named.front());
    }
    std::sort(includes.begin(), includes.end(), [](const CornerLine& a, const CornerLine& b) { return a.line < b.line; });
    if (!includes.empty()) return includes;
    if (first_missing) throw errors::unknown_corner(first_missing->first, first_missing->second, first_sections);
    throw errors::no_corner_lib(deck_path.string());
}

std::string write_run_variant(const std::string& deck_text, const RunVariant& run,
                              const std::vector<CornerLine>& corner_lines) {
    auto lines = split_lines(deck_text);
    for (const CornerLine& corner : corner_lines) {
        if (!run.corner || corner.line >= lines.size()) continue;
        const auto w = words(lines[corner.line]);
        if (corner.word.empty()) {
            lines[corner.line] = fmt::format("{} \"{}\" {}", w[0], w[1], *run.corner);
        } else if (w.size() == 2) {
            lines[corner.line] =
                fmt::format("{} \"{}\"", w[0], with_word(w[1], corner.at, corner.word.size(), *run.corner).string());
        }
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
