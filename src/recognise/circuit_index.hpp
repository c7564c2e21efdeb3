// Private to src/recognise: the circuit seen as transistors and the nets between them,
// indexed once so that every question the recognition asks costs the size of one net.
#pragma once

#include <cstddef>
#include <optional>
#include <string_view>
#include <vector>

#include "src/model/circuit.hpp"

namespace mirrorcheck::recognise {

enum class Kind { nmos, pmos, npn, pnp };

std::string_view to_string(Kind kind);

// A MOS or bipolar transistor with a known polarity; drain, control and source are net
// indices into Circuit::nets() (collector, base, emitter for bipolar).
struct Transistor {
    std::size_t device = 0;
    Kind kind = Kind::nmos;
    std::size_t drain = 0;
    std::size_t control = 0;
    std::size_t source = 0;
    bool diode() const { return drain == control; }
};

// What sits on one net. Only current-carrying terminals count as "carriers": bulk and
// substrate terminals and capacitors are ignored, and so are gates and bases (the nets a
// stack climbs through may also feed a booster's gate or a bias line).
struct NetUse {
    std::vector<std::size_t> controls;   // transistors whose gate or base is here
    std::vector<std::size_t> drains;     // transistors whose drain or collector is here
    std::vector<std::size_t> sources;    // transistors whose source or emitter is here
    std::vector<std::size_t> resistors;  // resistor device indices
    std::size_t others = 0;              // terminals of any other device except capacitors
};

// Where a transistor's source or emitter ends up: its own net, or the far end of a resistor
// that is the only other thing on that net.
struct Foot {
    std::size_t net = 0;
    std::optional<std::size_t> resistor;  // device index
};

// One level up a stack: the next transistor and the resistor between the levels, if any.
struct Step {
    std::size_t transistor = 0;
    std::optional<std::size_t> resistor;
};

class CircuitIndex {
public:
    explicit CircuitIndex(const Circuit& circuit);

    const Circuit& circuit() const { return circuit_; }
    const std::vector<Transistor>& transistors() const { return transistors_; }
    const Transistor& transistor(std::size_t t) const { return transistors_[t]; }
    const NetUse& use(std::size_t net) const { return nets_[net]; }
    std::size_t net_count() const { return nets_.size(); }
    const std::string& net_name(std::size_t net) const { return circuit_.nets()[net].name; }

    // Ground, or a net held to ground through quiet (no ac, no transient) voltage sources.
    bool is_rail(std::size_t net) const { return rails_[net]; }
    // A supply: a rail that carries more than one other terminal besides the voltage source
    // holding it (a rail that holds one output as a probe is not a supply).
    bool is_supply(std::size_t net) const { return rails_[net] && carriers(net) > 2; }
    // A resistor divider: a net that carries only resistors (two or more) whose far ends are
    // rails at two or more different nets, besides gates, bases and capacitors.
    bool is_divider(std::size_t net) const { return dividers_[net]; }
    // A fixed voltage, at AC ground for a cascode's gate or a current source's: a rail, a
    // divider, or a net holding the gate (base) of a diode-connected transistor of `kind`.
    bool is_bias(std::size_t net, Kind kind) const;
    // A transistor whose gate (base) is on the source (emitter) net of `cascode` and whose
    // drain (collector) drives the gate (base) of `cascode`: a regulated cascode's booster.
    std::optional<std::size_t> booster_of(std::size_t cascode) const;
    // The booster of `cascode` when `cascode` is stacked on a device of its kind (whose drain
    // is on the cascode's source net) and that net holds no diode of its kind, which would
    // make the pair the output half of a Wilson mirror.
    std::optional<std::size_t> stacked_booster_of(std::size_t cascode) const;
    Foot foot(std::size_t t) const;
    // The transistor of the same kind stacked on `below`: the drain net of `below` carries
    // nothing but that drain and the next source (directly or through one resistor).
    std::optional<Step> step_up(std::size_t below) const;
    // The transistor of the same kind stacked on `below` where the drain net of `below` also
    // carries another branch (a folded cascode's fold node: the input pair's drain, a
    // resistor): the one device of that kind whose source is there, neither diode-connected
    // nor with its drain on a supply, gated by a bias net or a booster; `below` the only
    // drain of that kind there.
    std::optional<Step> fold_up(std::size_t below) const;
    // m·nf·W/L for MOS, area·m for bipolar (ngspice defaults W = L = 100 µm).
    double size(std::size_t t) const;

private:
    void index_device(std::size_t device);
    void add_transistor(std::size_t device, Kind kind, const char* d, const char* g, const char* s);
    void find_rails();
    void find_dividers();
    void map_terminals();
    std::size_t net_of(std::size_t device, std::size_t terminal) const;
    std::size_t carriers(std::size_t net) const;
    std::size_t other_end(std::size_t resistor, std::size_t net) const;

    const Circuit& circuit_;
    std::vector<std::size_t> first_terminal_;  // per device, its first slot in terminal_net_
    std::vector<std::size_t> terminal_net_;    // per device terminal, its net index (after merging)
    std::vector<bool> shorted_;                // per device: a wrapper's parasitic resistor, a wire
    std::vector<Transistor> transistors_;
    std::vector<NetUse> nets_;
    std::vector<bool> rails_;
    std::vector<bool> dividers_;
    std::vector<unsigned> drain_kinds_;  // per net, bit k: the drain (collector) of a transistor of Kind k
    std::vector<unsigned> diode_kinds_;  // per net, bit k: a diode-connected transistor of Kind k
};

}  // namespace mirrorcheck::recognise
