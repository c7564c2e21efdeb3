// The rules, line by line at the top level and inside every instance on the way to a kept
// device (an "element line" is a device's own line or the X line a device lies under):
//   - a line with no kept device under it is left out (a comment line);
//   - a line whose devices are all kept stays as it is;
//   - an X line of a kit's cell (every device under it defined in a library file: a wrapped
//     transistor, whose other elements belong to the transistor) stays whole;
//   - any other X line is left out and replaced by the same line naming a copy of its
//     subcircuit, made by the same rules one level down: the definition's lines as written,
//     the header renamed, the left-out lines commented. Instance names do not change, so
//     every device and net keeps its flattened name (a top-level source can still reach
//     `x1.nb`).
// Refused: a line to leave out inside a library file's top level, a definition that cannot
// be found in the file of its lines, an X line whose subcircuit name cannot be told apart.
#include "src/deck/part_of_deck.hpp"

#include <algorithm>
#include <map>

#include <fmt/format.h>

#include "parsers/common/text.hpp"
#include "src/deck/deck_text.hpp"

namespace mirrorcheck {
namespace {

namespace fs = std::filesystem;
using netlist::ReadFile;

// One element line at some depth, with the devices under it.
struct ElementLine {
    netlist::FileLine where;
    std::string name;    // the element's or the instance's name, for notes
    std::string subckt;  // an X line's subcircuit, else empty
    std::vector<std::size_t> devices;
    bool kit = true;
};

// Where the subcircuit name stands among an X line's words: the word before its first
// parameter (a word with `=`, or `params:`), else its last word. npos when none.
struct Word {
    std::size_t begin, end;
};

std::vector<Word> words_of(const std::string& line) {
    std::vector<Word> words;
    std::size_t i = 0;
    while (i < line.size()) {
        while (i < line.size() && std::isspace(static_cast<unsigned char>(line[i]))) ++i;
        if (i >= line.size()) break;
        const std::size_t begin = i;
        if (line[i] == '=') {
            words.push_back({i, i + 1});
            ++i;
            continue;
        }
        while (i < line.size() && !std::isspace(static_cast<unsigned char>(line[i])) && line[i] != '=') {
            const char open = line[i];
            const char close = open == '{' ? '}' : open == '\'' ? '\'' : open == '"' ? '"' : 0;
            if (close) {
                const std::size_t shut = line.find(close, i + 1);
                i = shut == std::string::npos ? line.size() : shut + 1;
            } else {
                ++i;
            }
        }
        words.push_back({begin, i});
    }
    return words;
}

std::optional<Word> subckt_word(const std::string& line) {
    const auto words = words_of(line);
    std::size_t end = words.size();
    for (std::size_t k = 1; k < words.size(); ++k) {
        const std::string w = to_lower(line.substr(words[k].begin, words[k].end - words[k].begin));
        if (w == "params:") {
            end = k;
            break;
        }
        if (w == "=") {  // "name = value": the name is the parameter's
            end = k - 1;
            break;
        }
        if (k + 1 < words.size() && line[words[k + 1].begin] == '=') {
            end = k;
            break;
        }
    }
    if (end < 2) return std::nullopt;  // the name and at least one more word
    return words[end - 1];
}

class Parter {
public:
    Parter(const netlist::FlatNetlist& netlist, const Circuit& circuit, const std::set<std::size_t>& kept,
           const std::string& tag, const std::string& why)
        : circuit_(circuit), kept_(kept), tag_(tag), why_(why) {
        for (const ReadFile& f : netlist.files) roles_.emplace(f.path, f.role);
    }

    DeckPart run() {
        std::vector<std::size_t> all(circuit_.devices().size());
        for (std::size_t i = 0; i < all.size(); ++i) all[i] = i;
        for (const ElementLine& line : element_lines(all, 0)) {
            const std::size_t in = kept_count(line);
            if (in == 0) {
                if (role_of(line.where.file) == ReadFile::Role::library)
                    return refuse(fmt::format("{} ({}:{}) is in a library and cannot be left out", line.name,
                                              line.where.file, line.where.line));
                part_.left_out.push_back(line.where);
            } else if (in < line.devices.size() && !line.kit) {
                std::string copy = specialise(line, 0);
                if (!part_.refusal.empty()) return part_;
                part_.left_out.push_back(line.where);
                part_.appended += copy_line(line, copy) + "\n";
            }
        }
        part_.appended += copies_;
        return part_;
    }

private:
    DeckPart refuse(std::string why) {
        part_.refusal = std::move(why);
        return part_;
    }

    ReadFile::Role role_of(const std::string& file) const {
        auto it = roles_.find(normal(file));
        return it == roles_.end() ? ReadFile::Role::included : it->second;
    }

    const std::vector<std::string>& lines_of(const std::string& file) {
        const fs::path path = normal(file);
        auto it = files_.find(path);
        if (it == files_.end()) it = files_.emplace(path, physical_lines(path)).first;
        return it->second;
    }

    std::size_t kept_count(const ElementLine& line) const {
        return static_cast<std::size_t>(
            std::count_if(line.devices.begin(), line.devices.end(), [&](std::size_t d) { return kept_.count(d) > 0; }));
    }

    // The element lines `depth` levels down among `devices` (all under one instance path).
    std::vector<ElementLine> element_lines(const std::vector<std::size_t>& devices, std::size_t depth) const {
        std::vector<ElementLine> lines;
        std::map<std::pair<fs::path, std::size_t>, std::size_t> index;
        for (std::size_t i : devices) {
            const Device& d = circuit_.devices()[i];
            if (d.hierarchy.size() < depth) continue;
            const bool own = d.hierarchy.size() == depth;
            const SourceLine& at = own ? d.source : d.hierarchy[depth].source;
            if (at.line == 0) continue;
            auto [it, added] = index.try_emplace({normal(at.file), at.line}, lines.size());
            if (added)
                lines.push_back({{at.file, at.line},
                                 own ? d.local_name : d.hierarchy[depth].instance,
                                 own ? std::string() : d.hierarchy[depth].subckt,
                                 {},
                                 true});
            ElementLine& line = lines[it->second];
            line.devices.push_back(i);
            line.kit = line.kit && role_of(d.source.file) == ReadFile::Role::library;
        }
        return lines;
    }

    // The X line naming `copy` instead of its subcircuit, continuations joined.
    std::string copy_line(const ElementLine& line, const std::string& copy) {
        std::string text = logical_line(lines_of(line.where.file), line.where.line);
        auto word = subckt_word(text);
        if (!word || !iequals(text.substr(word->begin, word->end - word->begin), line.subckt)) {
            refuse(fmt::format("the subcircuit name {} cannot be told apart on {}:{}", line.subckt, line.where.file,
                               line.where.line));
            return {};
        }
        return text.replace(word->begin, word->end - word->begin, copy);
    }

    // A copy of the subcircuit of the X line `x` (at `depth`) that keeps only the kept
    // devices under it; appended to copies_. Returns the copy's name.
    std::string specialise(const ElementLine& x, std::size_t depth) {
        const std::vector<ElementLine> children = element_lines(x.devices, depth + 1);
        if (children.empty()) return x.subckt;
        const std::string& file = children.front().where.file;
        const std::vector<std::string> lines = lines_of(file);
        const SubcktDefinition* definition = nullptr;
        const auto definitions = subckt_definitions(lines);
        for (const auto& d : definitions)  // the innermost one of that name around its lines
            if (d.name == to_lower(x.subckt) && d.first < children.front().where.line &&
                children.front().where.line < d.last && (!definition || d.first > definition->first))
                definition = &d;
        if (!definition) {
            refuse(fmt::format("the definition of {} is not found around {}:{}", x.subckt, file,
                               children.front().where.line));
            return {};
        }
        const std::string name = fmt::format("{}_{}{}", to_lower(x.subckt), tag_, ++count_);
        std::vector<std::string> copy(lines.begin() + static_cast<std::ptrdiff_t>(definition->first) - 1,
                                      lines.begin() + static_cast<std::ptrdiff_t>(definition->last));
        auto at = [&](std::size_t line) -> std::string& { return copy[line - definition->first]; };
        {
            std::string& header = at(definition->first);
            const auto words = words_of(header);
            if (words.size() < 2) {
                refuse(fmt::format("the header of {} at {}:{} has no name", x.subckt, file, definition->first));
                return {};
            }
            header.replace(words[1].begin, words[1].end - words[1].begin, name);
        }
        for (const ElementLine& child : children) {
            if (normal(child.where.file) != normal(file) || child.where.line <= definition->first ||
                child.where.line >= definition->last)
                continue;
            const std::size_t in = kept_count(child);
            if (in == child.devices.size() || (in > 0 && child.kit)) continue;
            std::string replacement;
            if (in > 0) {
                const std::string nested = specialise(child, depth + 1);
                if (!part_.refusal.empty()) return {};
                replacement = copy_line(child, nested);
                if (!part_.refusal.empty()) return {};
            }
            const std::size_t last = std::min(last_physical_line(lines, child.where.line), definition->last - 1);
            for (std::size_t n = child.where.line; n <= last; ++n) at(n) = why_ + at(n);
            if (!replacement.empty()) at(last) += replacement + "\n";
        }
        copies_ += fmt::format("* {}: {} keeping only the devices of the testbench\n", name, x.subckt);
        for (const std::string& l : copy) copies_ += l;
        return name;
    }

    const Circuit& circuit_;
    const std::set<std::size_t>& kept_;
    std::string tag_, why_;
    std::map<fs::path, ReadFile::Role> roles_;
    std::map<fs::path, std::vector<std::string>> files_;
    std::string copies_;
    std::size_t count_ = 0;
    DeckPart part_;
};

}  // namespace

DeckPart part_of_deck(const netlist::FlatNetlist& netlist, const Circuit& circuit, const std::set<std::size_t>& devices,
                      const std::string& tag, const std::string& why) {
    return Parter(netlist, circuit, devices, tag, why).run();
}

}  // namespace mirrorcheck
