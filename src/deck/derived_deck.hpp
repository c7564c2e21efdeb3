// The designer's deck as the review runs it: derived copies of the user's files, written into
// the work folder, never beside the user's files. Each copy is its original line for line
// (so ngspice's complaints name the user's line numbers):
//   - `.control` ... `.endc` blocks, analyses (`.op .ac .dc .tran .tf .noise .pz .sens
//     .disto .pss .sp`) and output requests other than `.save` (`.probe .print .plot .meas
//     .four .width`) become comment lines: the review runs its own analyses, a `.control`
//     block would run before the review's (and its `quit` would end ngspice), and `.probe`
//     rewrites the netlist (ngspice 39 puts a 0 V source into each probed terminal, renaming
//     its net). `.save` stays: ngspice 39 saves the union of `.save` and the control block's
//     `save all` (checked), so it cannot restrict what the review saves;
//   - the top file's `.end` becomes a comment line, as the review's own lines follow it;
//   - every relative `.include` and `.lib` name becomes the absolute path the reader
//     resolved (ngspice run in the deck's folder finds the same file), and an `.include` of
//     a file that has a copy names the copy.
// Options, `.temp`, `.param`, `.nodeset`, `.ic` and everything else stay as written.
//
// Which files get a copy: the top file; an included file that holds a left-out card or a
// relative name found through the deck's folder (a copy elsewhere would not find it, e.g.
// a `.lib` inside an `.include`d file); and every file that includes one of those. A library
// read through `.lib` never gets a copy (its names resolve against its own folder); a card
// to leave out inside a library section is refused.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "parsers/netlist/netlist.hpp"

namespace mirrorcheck {

// A card of the user's deck that the derived deck leaves out, where it is written.
struct LeftOutCard {
    std::string file;
    std::size_t line = 0;
    std::string card;  // as written; `.control ... .endc` for a control block
};

// "deck.cir:12: .tran 1n 1u"
std::string to_string(const LeftOutCard& card);

struct DerivedFile {
    std::filesystem::path path;      // the copy, in the work folder
    std::filesystem::path original;  // the user's file
    std::string text;
};

struct DerivedDeck {
    std::string top;                   // the top file's copy, ending with a line break
    std::vector<DerivedFile> included; // copies of included files
    std::vector<LeftOutCard> left_out; // in reading order
};

// More to leave out, for a testbench of part of the deck (alone_deck.hpp).
struct DeriveEdits {
    // Element lines (their first physical line) to leave out, with their continuation lines.
    std::vector<netlist::FileLine> elements_out;
    std::string why = "*(left out) ";  // what each such line is prefixed with
    bool initial_conditions_out = false;  // also `.nodeset` and `.ic` lines
    std::string copy_prefix;              // the included copies are named "<prefix>include<k>-<name>"
};

// The copies for `netlist`, the included ones named after their originals in `folder`.
// Throws InputError "input.cannot-open" when a file cannot be read again, and
// "prepare.card-in-library" for a left-out card inside a library section.
DerivedDeck derive_deck(const netlist::FlatNetlist& netlist, const std::filesystem::path& folder,
                        const DeriveEdits& edits = {});

}  // namespace mirrorcheck
