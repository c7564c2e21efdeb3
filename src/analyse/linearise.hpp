// The exact small-signal impedance at chosen nodes of a whole circuit (or, when the whole
// circuit cannot be linearised, of a mirror's own devices), from the flat Circuit and its
// operating point: the "linearised" value that analysis by inspection is checked against,
// at DC and against frequency. See linearise.cpp for the method, its assumptions and what
// it leaves out.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"

namespace mirrorcheck {

// The impedance at one frequency.
struct ImpedancePoint {
    double frequency = 0;      // Hz
    double magnitude = 0;      // ohms
    double phase_degrees = 0;  // arg Z
};

struct LinearisedImpedance {
    std::string node;                 // as asked, lower case
    std::optional<double> resistance; // ohms, at DC; absent when the network could not be built or solved
    // The range the DC resistance spans across what the op data leaves open (bounded
    // stamps, see LinearisedSolve::bounded); absent when nothing is.
    std::optional<double> resistance_low, resistance_high;
    std::string note;                 // what concerns this output: why it is absent, how it was measured
                                      // ("held by vout, ..."); what concerns the circuit is in LinearisedSolve::notes
    std::string scope;                // "whole circuit" or "mirror devices only"; empty when absent
    std::vector<ImpedancePoint> spectrum;    // at the asked frequencies, in order; empty when not computed
    std::optional<double> corner_frequency;  // Hz, where |Z| = |Z(0)|/sqrt(2); absent when no
                                             // capacitances or no corner below 1 THz
    std::string spectrum_note;        // why this output's spectrum is absent or incomplete
};

// A circuit-level note of the solve: what it concerns and every device it concerns.
struct SolveNote {
    std::string text;                  // names a few of the devices and says how many
    std::string cause;                 // the same without the devices ("whole circuit not linearised: ...")
    std::vector<std::string> devices;  // all of them (empty for a note about the circuit as a whole)
};

struct LinearisedSolve {
    std::vector<LinearisedImpedance> outputs;  // one per target, in order
    // Once for the circuit: why the whole circuit could not be linearised, what was assumed or
    // left out (at DC and against frequency), what was bounded.
    std::vector<SolveNote> notes;
    const LinearisedImpedance& operator[](std::size_t i) const { return outputs[i]; }
    std::size_t size() const { return outputs.size(); }
};

// One node to solve, with the devices of the mirror output that drives it (the output
// stack's transistors and their source or emitter resistors), used when the whole circuit
// cannot be linearised.
struct LineariseTarget {
    std::string node;
    std::vector<std::size_t> own_devices;  // indices into Circuit::devices()
};

// The small-signal impedance seen at each target node to ground, with the circuit
// linearised at `op`: the resistance at DC (with the range it spans when the op data leaves
// some stamps open), and, when the op data holds the device capacitances, |Z| and its phase
// at each of `frequencies` and the 3 dB corner frequency.
// Each node is expected to be held in the deck by a probe voltage source (e.g.
// `vout out 0 dc 1.2`): such a node is measured through its probe (1 V on the source over
// the current it delivers), every other probe holding its own node, as each probe's `.tf`
// does; a node without one gets 1 A injected. When the whole circuit cannot be linearised (a transistor lacks its
// conductances, a behavioural source, internal nodes, ...), each target with own devices
// is solved on those devices alone, every net outside them at AC ground (scope "mirror
// devices only"). One result per target, in order; the notes concerning the circuit once.
LinearisedSolve compute_linearised_impedances(const Circuit& circuit, const OpPoint& op,
                                              const std::vector<LineariseTarget>& targets,
                                              const std::vector<double>& frequencies);

// The same for bare nodes at DC (with the corner frequency when capacitances are known),
// without a fallback.
LinearisedSolve compute_linearised_impedances(const Circuit& circuit, const OpPoint& op,
                                              const std::vector<std::string>& nodes);

}  // namespace mirrorcheck
