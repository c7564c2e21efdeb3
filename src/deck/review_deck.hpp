// Writes the ngspice deck that produces everything a review needs from the designer's deck
// as it is: the derived copy of the deck (derived_deck.hpp) followed by the review's probes
// and its own control block, with the operating point and every transistor's parameters
// saved, and one AC run per mirror output through a probe that cannot move the bias.
// review_deck.cpp describes the appended lines.
//
// ngspice runs the deck in the user's deck folder (`run_folder`), as the user's own run
// would: every name the deck's files resolve through the working folder is then the same.
// The deck and all it writes are named by absolute path in the work folder.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "parsers/netlist/netlist.hpp"
#include "src/deck/alone_deck.hpp"
#include "src/deck/derived_deck.hpp"
#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

// How each output's impedance is measured.
//   held      an AC voltage source drives the output through a large capacitor (open at
//             DC), and every other output is held at AC ground by its own probe meanwhile:
//             each output is seen with the others held still.
//   injected  an AC current source of DC value 0 drives the output, and the other outputs'
//             probes are open: each output's impedance as the circuit has it.
enum class ProbeMode { held, injected };

struct DeckOptions {
    ProbeMode mode = ProbeMode::injected;
    double from = 1.0;            // Hz, first AC point
    double to = 1e9;              // Hz, last AC point
    int points_per_decade = 10;
    std::filesystem::path deck_path;  // where the deck will be written; its folder takes the copies
    std::filesystem::path raw_path;   // the raw file the deck writes
    bool alone = true;                // also measure each mirror alone (alone_deck.hpp)
};

struct DeckProbe {
    std::string node;      // mirror output
    std::string mirror;    // Mirror::id
    std::string source;    // the probe source's name in the deck
    // own_source: the netlist's voltage source on the node; held: an AC-coupled voltage
    // source; injected: a current source.
    enum class Kind { own_source, held, injected } kind = Kind::injected;
    std::string coupling;  // held: the coupling capacitor
    std::string net;       // held: the net between the source and the capacitor
    bool added = false;    // written into the deck (not the netlist's own source)
    std::size_t line = 0;  // added: the deck line of its (first) element
};

struct ReviewDeck {
    std::filesystem::path path;          // where it is to be written
    std::filesystem::path run_folder;    // where ngspice must run it: the user's deck folder
    std::string text;                    // the whole deck
    std::vector<DerivedFile> included;   // derived copies of included files, written beside it
    std::vector<DeckProbe> probes;       // one per output node, in run order
    std::vector<LeftOutCard> left_out;   // what the deck leaves out of the user's files
    AloneBenches alone;                  // the testbenches of the mirrors alone, written beside it
    std::vector<std::string> notes;      // what the user should know
};

// The deck for `netlist` (built into `circuit`, whose mirrors are `mirrors`).
ReviewDeck write_review_deck(const netlist::FlatNetlist& netlist, const Circuit& circuit,
                             const std::vector<Mirror>& mirrors, const DeckOptions& options);

// Writes the deck, its copies and the testbenches of the mirrors alone; throws InputError "prepare.cannot-write".
void save_review_deck(const ReviewDeck& deck);

// Adds the probes the deck adds to the netlist to `circuit`, as the devices they are (the
// current source; or the voltage source and its coupling capacitor), so that the review of
// the designer's netlist sees the circuit ngspice simulated.
void add_deck_probes(Circuit& circuit, const ReviewDeck& deck);

}  // namespace mirrorcheck
