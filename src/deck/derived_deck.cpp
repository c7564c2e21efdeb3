// Derived copies of the user's files (see derived_deck.hpp).
#include "src/deck/derived_deck.hpp"

#include <fstream>
#include <map>
#include <set>
#include <sstream>

#include <fmt/format.h>

#include "parsers/common/errors.hpp"
#include "parsers/common/text.hpp"
#include "src/deck/deck_errors.hpp"
#include "src/deck/deck_text.hpp"

namespace mirrorcheck {
namespace {

namespace fs = std::filesystem;
using netlist::Card;
using netlist::ReadFile;

bool left_out(const Card& card) {
    switch (card.kind) {
        case Card::Kind::control_block:
        case Card::Kind::analysis: return true;
        case Card::Kind::output: return card.keyword != ".save";
        case Card::Kind::end: return false;
    }
    return false;
}

// The 1-based numbers of the lines holding `.nodeset` or `.ic` cards.
std::vector<std::size_t> initial_condition_lines(const std::vector<std::string>& lines) {
    std::vector<std::size_t> found;
    for (std::size_t n = 1; n <= lines.size(); ++n) {
        const std::string keyword = first_word(lines[n - 1]);
        if (keyword == ".nodeset" || keyword == ".ic") found.push_back(n);
    }
    return found;
}

std::string quoted(const fs::path& p) { return "\"" + p.string() + "\""; }

class Deriver {
public:
    Deriver(const netlist::FlatNetlist& netlist, const fs::path& folder, const DeriveEdits& edits)
        : netlist_(netlist), folder_(folder), edits_(edits) {}

    DerivedDeck run() {
        for (const ReadFile& f : netlist_.files) roles_.emplace(f.path, f.role);
        for (const ReadFile& f : netlist_.files)
            if (f.role == ReadFile::Role::top) top_ = f.path;
        choose_copies();
        DerivedDeck out;
        for (const Card& card : netlist_.cards)
            if (left_out(card))
                out.left_out.push_back({card.first.file, card.first.line,
                                        card.kind == Card::Kind::control_block ? ".control ... .endc" : card.text});
        std::size_t k = 0;
        for (const auto& [original, copy] : copies_) {
            (void)copy;
            if (original == top_) continue;
            copies_[original] =
                folder_ / fmt::format("{}include{}-{}", edits_.copy_prefix, ++k, original.filename().string());
        }
        for (const auto& [original, copy] : copies_) {
            std::string text = derive(original);
            if (original == top_) out.top = std::move(text);
            else out.included.push_back({copy, original, std::move(text)});
        }
        return out;
    }

private:
    const netlist::FlatNetlist& netlist_;
    fs::path folder_;
    const DeriveEdits& edits_;
    fs::path top_;
    std::map<fs::path, ReadFile::Role> roles_;
    std::map<fs::path, fs::path> copies_;  // original -> copy (the top's is filled by the caller)

    ReadFile::Role role_of(const fs::path& file) const {
        auto it = roles_.find(file);
        return it == roles_.end() ? ReadFile::Role::included : it->second;
    }

    void choose_copies() {
        copies_[top_];
        for (const Card& card : netlist_.cards) {
            if (!left_out(card)) continue;
            const fs::path file = normal(card.first.file);
            if (role_of(file) == ReadFile::Role::library)
                throw errors::card_in_library(Location(card.first.file, card.first.line, 1), card.keyword);
            copies_[file];
        }
        for (const auto& ref : netlist_.references) {
            const fs::path file = normal(ref.where.file);
            if (ref.via_working_folder && role_of(file) != ReadFile::Role::library) copies_[file];
        }
        for (const auto& element : edits_.elements_out) {
            const fs::path file = normal(element.file);
            if (role_of(file) != ReadFile::Role::library) copies_[file];
        }
        if (edits_.initial_conditions_out)
            for (const ReadFile& f : netlist_.files)
                if (f.role != ReadFile::Role::library && !initial_condition_lines(physical_lines(f.path)).empty())
                    copies_[f.path];
        // Every includer of a copied file is copied too, so that it can name the copy.
        for (bool grown = true; grown;) {
            grown = false;
            for (const auto& ref : netlist_.references) {
                const fs::path file = normal(ref.where.file);
                if (ref.library || !copies_.count(ref.resolved) || copies_.count(file)) continue;
                if (role_of(file) == ReadFile::Role::library) continue;
                copies_[file];
                grown = true;
            }
        }
    }

    std::string derive(const fs::path& original) {
        std::vector<std::string> lines = physical_lines(original);
        auto comment = [&](std::size_t first, std::size_t last, const char* why) {
            for (std::size_t n = first; n <= last && n <= lines.size(); ++n) lines[n - 1] = why + lines[n - 1];
        };
        for (const auto& ref : netlist_.references) {
            if (normal(ref.where.file) != original || ref.where.line == 0 || ref.where.line > lines.size()) continue;
            auto copy = ref.library ? copies_.end() : copies_.find(ref.resolved);
            const bool to_copy = copy != copies_.end() && copy->first != top_;
            if (fs::path(ref.written).is_absolute() && !to_copy) continue;
            std::string& line = lines[ref.where.line - 1];
            if (ref.column == 0 || ref.column - 1 + ref.length > line.size()) continue;
            line.replace(ref.column - 1, ref.length, quoted(to_copy ? copy->second : ref.resolved));
        }
        for (const Card& card : netlist_.cards) {
            if (normal(card.first.file) != original) continue;
            if (left_out(card)) comment(card.first.line, card.last_line, "*(left out for the review) ");
            else if (card.kind == Card::Kind::end && original == top_)
                comment(card.first.line, card.last_line, "*(the review's lines follow) ");
        }
        for (const auto& element : edits_.elements_out)
            if (normal(element.file) == original && element.line > 0)
                comment(element.line, last_physical_line(lines, element.line), edits_.why.c_str());
        if (edits_.initial_conditions_out)
            for (std::size_t n : initial_condition_lines(lines))
                comment(n, last_physical_line(lines, n), edits_.why.c_str());
        std::string text;
        for (const auto& l : lines) text += l;
        return text;
    }
};

}  // namespace

std::string to_string(const LeftOutCard& card) { return fmt::format("{}:{}: {}", card.file, card.line, card.card); }

DerivedDeck derive_deck(const netlist::FlatNetlist& netlist, const std::filesystem::path& folder,
                        const DeriveEdits& edits) {
    return Deriver(netlist, folder, edits).run();
}

}  // namespace mirrorcheck
