// Which lines of a deck a testbench of some of its devices keeps: for a set of devices, the
// top-level element lines to leave out, and the copies of subcircuits that keep only those
// devices where an instance holds them and others. part_of_deck.cpp gives the rules.
#pragma once

#include <cstddef>
#include <set>
#include <string>
#include <vector>

#include "parsers/netlist/netlist.hpp"
#include "src/model/circuit.hpp"

namespace mirrorcheck {

struct DeckPart {
    std::vector<netlist::FileLine> left_out;  // element lines (first physical line) to comment out
    std::string appended;  // replacement X lines and the subcircuit copies they name, to add at the top level
    std::string refusal;   // when not empty, the part cannot be written: why
};

// The part of `circuit` (read from `netlist`) that holds exactly `devices` (indices into
// Circuit::devices). Copies are named "<subckt>_<tag><n>"; every line a copy leaves out is
// prefixed with `why`.
DeckPart part_of_deck(const netlist::FlatNetlist& netlist, const Circuit& circuit, const std::set<std::size_t>& devices,
                      const std::string& tag, const std::string& why);

}  // namespace mirrorcheck
