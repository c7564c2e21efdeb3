#include "src/deck/deck_text.hpp"

#include <fstream>
#include <sstream>
#include <string_view>

#include "parsers/common/errors.hpp"
#include "parsers/common/text.hpp"

namespace mirrorcheck {
namespace {

std::string_view trimmed_start(std::string_view v) {
    while (!v.empty() && (v.front() == ' ' || v.front() == '\t')) v.remove_prefix(1);
    return v;
}

std::string second_word(std::string_view line) {
    line = trimmed_start(line);
    line.remove_prefix(std::min(line.size(), line.find_first_of(" \t\r\n")));
    return first_word(line);
}

}  // namespace

std::string first_word(std::string_view line) {
    line = trimmed_start(line);
    return to_lower(line.substr(0, line.find_first_of(" \t\r\n")));
}

std::filesystem::path normal(const std::string& file) {
    std::error_code ec;
    auto a = std::filesystem::absolute(file, ec);
    return (ec ? std::filesystem::path(file) : a).lexically_normal();
}

std::vector<std::string> physical_lines(const std::filesystem::path& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw errors::cannot_open(path.string(), "it was read a moment ago but cannot be opened again");
    std::ostringstream s;
    s << in.rdbuf();
    const std::string text = s.str();
    std::vector<std::string> lines;
    std::size_t pos = 0;
    while (pos < text.size()) {
        std::size_t eol = text.find('\n', pos);
        std::size_t end = eol == std::string::npos ? text.size() : eol + 1;
        lines.push_back(text.substr(pos, end - pos));
        pos = end;
    }
    if (!lines.empty() && lines.back().back() != '\n') lines.back() += '\n';
    return lines;
}

std::size_t last_physical_line(const std::vector<std::string>& lines, std::size_t first) {
    std::size_t last = first;
    for (std::size_t n = first + 1; n <= lines.size(); ++n) {
        std::string_view v = trimmed_start(lines[n - 1]);
        if (!v.empty() && v.front() == '+') last = n;
        else if (!(v.empty() || v.front() == '*' || v.front() == '\r' || v.front() == '\n')) break;
    }
    return last;
}

std::string logical_line(const std::vector<std::string>& lines, std::size_t first) {
    auto bare = [](std::string_view v) {
        while (!v.empty() && (v.back() == '\n' || v.back() == '\r')) v.remove_suffix(1);
        return v;
    };
    std::string text(bare(lines[first - 1]));
    const std::size_t last = last_physical_line(lines, first);
    for (std::size_t n = first + 1; n <= last; ++n) {
        std::string_view v = trimmed_start(lines[n - 1]);
        if (v.empty() || v.front() != '+') continue;
        text += " ";
        text += bare(v.substr(1));
    }
    return text;
}

std::vector<SubcktDefinition> subckt_definitions(const std::vector<std::string>& lines) {
    std::vector<SubcktDefinition> done, open;
    for (std::size_t n = 1; n <= lines.size(); ++n) {
        const std::string word = first_word(lines[n - 1]);
        if (word == ".subckt") {
            open.push_back({second_word(lines[n - 1]), n, 0});
        } else if (word == ".ends" && !open.empty()) {
            open.back().last = n;
            done.push_back(open.back());
            open.pop_back();
        }
    }
    return done;
}

}  // namespace mirrorcheck
