// The testbenches of the mirrors alone: for each mirror, a derived copy of the designer's
// deck that keeps only the mirror's own devices (mirror_alone.hpp says which), and the
// control lines the review deck runs them with, so that ngspice measures each mirror's own
// output resistance (what the hand formula describes) beside the node's impedance in the
// circuit. alone_deck.cpp describes a bench and its runs.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "parsers/netlist/netlist.hpp"
#include "src/deck/derived_deck.hpp"
#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

struct AloneBench {
    std::string mirror;                 // Mirror::id
    std::filesystem::path path;         // the bench, beside the review deck
    std::string text;
    std::vector<DerivedFile> included;  // its own derived copies of included files
    struct Output {
        std::string node;
        std::string source;  // own_probe_name(k)
        std::string voltage; // the vector of the circuit's op that holds its voltage
    };
    std::vector<Output> outputs;
    struct Net {
        std::string net;
        std::string source;    // the voltage source holding it (free nets: through the inductor)
        std::string voltage;   // the vector holding its operating voltage
        std::string inductor;  // free nets: a short at DC, open in AC
    };
    std::vector<Net> held, free_nets;
};

struct AloneBenches {
    std::vector<AloneBench> benches;
    std::vector<std::string> notes;  // mirrors without a bench, and why
    // The nets whose operating voltage the review deck keeps, with the vector it keeps it in.
    std::vector<std::pair<std::string, std::string>> voltages;
};

// The benches for `mirrors` of `circuit` (built from `netlist`, before any probe is added),
// named after `deck_path`: "<stem>.alone<n>.cir" in its folder.
AloneBenches write_alone_benches(const netlist::FlatNetlist& netlist, const Circuit& circuit,
                                 const std::vector<Mirror>& mirrors, const std::filesystem::path& deck_path);

// Control lines for right after the circuit's `op`: keep the voltages the benches need.
std::string keep_operating_voltages(const AloneBenches& benches);

// Control lines that run every bench and write each AC run to `raw` (appended).
std::string run_alone_benches(const AloneBenches& benches, const std::string& raw);

}  // namespace mirrorcheck
