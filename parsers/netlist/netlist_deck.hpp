// Private to the netlist reader: the deck, i.e. the files read into definitions before any
// flattening. Reading follows `.include` and `.lib file section` (paths resolved as
// netlist.hpp says; a file or section already being read is a cycle), collects `.subckt`
// definitions (nested ones inside their parent), `.model` cards, `.param` assignments,
// `.global` nets, `.option scale`, and keeps element lines for the flattener, which needs
// every model known before it can tell nodes from model names. It also records the cards
// that describe no part of the circuit and every file reference, for derived copies.
//
// `.end` does not stop the reading: ngspice 39 comments it out and reads on (a resistor
// after `.end` is in its circuit; checked with `print` of the source current).
#pragma once

#include <cstddef>
#include <deque>
#include <filesystem>
#include <map>
#include <memory>
#include <optional>
#include <set>
#include <string>
#include <unordered_map>
#include <vector>

#include "parsers/netlist/netlist.hpp"
#include "parsers/netlist/netlist_lines.hpp"

namespace mirrorcheck::netlist::detail {

// The text of a value (`{expr}`, `'expr'`, `1k`, `agauss(0,s,1)`) and where it starts.
struct ValueText {
    std::string text;
    const LogicalLine* line = nullptr;
    std::size_t offset = 0;  // of the text's first character in the line
    bool is_string = false;  // written in double quotes: a string parameter

    Location where(std::size_t inner = 0) const { return line ? line->locate(offset + inner) : Location{}; }
};

struct NamedValue {
    std::string name;  // lower case
    ValueText value;
};

struct ModelCard {
    std::string name;  // lower case
    std::string type;  // lower case
    std::vector<NamedValue> parameters;
    const LogicalLine* line = nullptr;
};

struct FunctionDef {
    std::string name;  // lower case
    std::vector<std::string> parameters;
    ValueText body;
};

struct SubcktDef {
    std::string name;  // lower case; empty for the top level
    std::vector<std::string> ports;
    std::vector<NamedValue> defaults;  // on the .subckt line
    std::vector<NamedValue> params;    // .param lines in the body, in order
    std::vector<FunctionDef> functions;  // .func lines in the body
    std::vector<const LogicalLine*> elements;
    std::unordered_map<std::string, std::unique_ptr<SubcktDef>> subckts;
    // Later definitions of a name already in `subckts`: read (their lines must still be
    // well formed) and kept here unused, since ngspice uses the first ("redefinition of
    // .subckt s, ignored").
    std::vector<std::unique_ptr<SubcktDef>> ignored_subckts;
    std::unordered_map<std::string, ModelCard> models;
    std::unordered_map<std::string, std::vector<std::string>> bins;  // "nch" -> {"nch.1", "nch.2"}
    const SubcktDef* parent = nullptr;
    const LogicalLine* line = nullptr;
};

struct Deck {
    std::string title;
    SubcktDef top;
    std::set<std::string> globals;
    double scale = 1;
    bool divide_width_by_nf = false;  // `.option wnflag=1`, for model binning
    std::optional<double> temperature;
    std::vector<std::string> control_blocks;
    std::vector<Card> cards;
    std::vector<FileReference> references;
    std::vector<ReadFile> read_files;
    // Storage the definitions point into.
    std::deque<std::string> file_names;
    std::map<std::string, std::unique_ptr<SplitFile>> files;
};

// Reads the top file and everything it includes; throws InputError.
std::unique_ptr<Deck> read_deck(const std::filesystem::path& path);

// Splits an element or card line's tokens, from `first` on, into positional tokens and
// `name=value` pairs. A value is one token and whatever touches it without a blank
// (`agauss(0,s,1)`); with `greedy` (for `.param`) it runs on to the next `name =`.
struct LineParts {
    std::vector<const Token*> positional;
    std::vector<NamedValue> named;
};
LineParts split_parts(const LogicalLine& line, const std::vector<Token>& tokens, std::size_t first,
                      bool greedy = false);
// The same into `out` (cleared first), which keeps its storage from line to line.
void split_parts(const LogicalLine& line, const std::vector<Token>& tokens, std::size_t first, bool greedy,
                 LineParts& out);

}  // namespace mirrorcheck::netlist::detail
