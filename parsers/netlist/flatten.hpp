// Private to the netlist reader: expands the deck's subcircuit instances into one flat
// netlist, naming devices and nets as ngspice does.
//
// ngspice's names (checked against ngspice 39's `listing expand`): a device `r1` inside
// instance `x1` of an instance `x9` becomes `r.x9.x1.r1` (its first letter, a dot, the
// instance path, a dot, its own name), for every kind of element; nets become `x9.x1.mid`;
// ports take the caller's nets; `0`, `gnd` and `.global` nets keep their names (`gnd` is
// `0`). A subcircuit defined inside another is expanded first, within its parent, so its
// devices carry two prefixes: `r.x1001_t.r.x1.r1` (nets are unchanged: `x1001_t.x1.mid`).
// A model defined inside a subcircuit is named `x9.x1:nch` for the instance that
// holds it (`x2:x31:my` across a nested definition). Parameters: the `.subckt` line's and the
// body's `.param`s are the instance's formal parameters; the X line's values replace their
// defaults and are evaluated in the instance's own scope, in ngspice's order (see
// assign_instance_parameters in flatten.cpp); lookups fall back to the caller's scope, then
// the globals. A PDK wrapper's `mult` is an ordinary parameter (ngspice multiplies by `m`
// alone: checked with sky130's nfet_01v8, whose current doubles for m=2, not for mult=2).
//
// The multiplier `m`, as ngspice 39 does it (found case by case with `listing expand` and
// `show`): when the subcircuit declares a parameter `m`, the X line's `m` is an ordinary
// parameter (GF180MCU's nmos_3p3 declares `m=1` and passes it to no device: ngspice 39
// simulates `m=2` on its X line as m=1). Otherwise, if any X line of the deck gives that subcircuit an `m`, ngspice
// writes an `m` onto every R C L D Q J I G F M line and nested X line inside each of its
// instances, replacing the lines' own: the `m` the caller wrote onto the X line, else the
// X line's own, else 1. Instances of other subcircuits are left alone.
//
// Binned models (`nch.1`, `nch.2`, ...) are chosen from the instance's l and w (times
// `.option scale`) as ngspice 39 does (checked with decks of our own): the first bin in
// definition order with lmin <= l <= lmax and wmin <= w <= wmax, each bound widened by 1 nm.
#pragma once

#include "parsers/netlist/netlist.hpp"
#include "parsers/netlist/netlist_deck.hpp"

namespace mirrorcheck::netlist::detail {

// Throws InputError for unknown models or subcircuits, wrong node counts, undefined
// parameters, recursive subcircuits and malformed element lines.
FlatNetlist flatten(const Deck& deck, const ReadLimits& limits = {});

}  // namespace mirrorcheck::netlist::detail
