// Writes the ngspice deck that produces everything a review needs from a bare netlist:
// the operating point with every transistor's parameters saved, and one AC run per
// mirror output through a probe that cannot move the bias. review_deck.cpp describes the
// deck line by line.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

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
    std::string raw_name = "review.raw";  // the raw file the deck writes, relative to ngspice's working folder
};

struct DeckProbe {
    std::string node;      // mirror output
    std::string mirror;    // Mirror::id
    std::string source;    // the probe source's name in the deck
    // own_source: the netlist's voltage source on the node; held: an AC-coupled voltage
    // source; injected: a current source.
    enum class Kind { own_source, held, injected } kind = Kind::injected;
};

struct ReviewDeck {
    std::string text;                 // the whole deck
    std::vector<DeckProbe> probes;    // one per output node, in run order
    std::vector<std::string> notes;   // what the user should know (the netlist's own .control, ...)
};

// The deck for `netlist` (read as `circuit`, whose mirrors are `mirrors`). The netlist is
// included by its absolute path, unchanged. Throws InputError "prepare.title-line" when the
// netlist's first line is a title that ngspice would read as an element once included.
ReviewDeck write_review_deck(const std::filesystem::path& netlist, const Circuit& circuit,
                             const std::vector<Mirror>& mirrors, const DeckOptions& options);

}  // namespace mirrorcheck
