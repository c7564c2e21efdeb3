// Private to src/recognise: builds the transistor and net index once, in one pass over the
// devices, and answers local questions (foot of a source, next level of a stack, rails).
//
// Parasitic resistors of one-transistor wrapper subcircuits are read as wires (see
// wrapper_nets.cpp); the merged net keeps the outermost name.
// Assumptions: a MOS device is a transistor when its model type is nmos or pmos, a bipolar
// one when npn or pnp; anything else (JFETs, XSPICE devices) is ignored. A rail is ground
// or a net reached from ground through voltage sources without an ac or transient part.
// A divider is a net between rails through resistors alone: its voltage is fixed by the
// supplies, which makes it a bias for a gate (a base draws current from it, which the
// divider's designer allows for).
#include "src/recognise/circuit_index.hpp"

#include <deque>

#include "src/recognise/wrapper_nets.hpp"

namespace mirrorcheck::recognise {

namespace {

std::optional<Kind> kind_of(const Device& device) {
    if (!device.model) return std::nullopt;
    const std::string& type = device.model->type;
    if (device.kind == DeviceKind::mosfet && type == "nmos") return Kind::nmos;
    if (device.kind == DeviceKind::mosfet && type == "pmos") return Kind::pmos;
    if (device.kind == DeviceKind::bjt && type == "npn") return Kind::npn;
    if (device.kind == DeviceKind::bjt && type == "pnp") return Kind::pnp;
    return std::nullopt;
}

bool is_quiet_source(const Device& device) {
    if (device.kind != DeviceKind::vsource) return false;
    auto ac = device.parameters.find("acmag");
    bool has_ac = ac != device.parameters.end() && ac->second != 0;
    return !has_ac && !device.text.contains("transient");
}

}  // namespace

std::string_view to_string(Kind kind) {
    switch (kind) {
        case Kind::nmos: return "nmos";
        case Kind::pmos: return "pmos";
        case Kind::npn: return "npn";
        case Kind::pnp: return "pnp";
    }
    return "nmos";
}

CircuitIndex::CircuitIndex(const Circuit& circuit)
    : circuit_(circuit),
      nets_(circuit.nets().size()),
      rails_(circuit.nets().size(), false),
      dividers_(circuit.nets().size(), false),
      drain_kinds_(circuit.nets().size(), 0u),
      diode_kinds_(circuit.nets().size(), 0u) {
    map_terminals();
    for (std::size_t d = 0; d < circuit.devices().size(); ++d) index_device(d);
    find_rails();
    find_dividers();
}

// Net indices of every terminal, from the circuit's own net lists (no name lookups).
void CircuitIndex::map_terminals() {
    first_terminal_.reserve(circuit_.devices().size() + 1);
    std::size_t slots = 0;
    for (const Device& device : circuit_.devices()) {
        first_terminal_.push_back(slots);
        slots += device.terminals.size();
    }
    first_terminal_.push_back(slots);
    terminal_net_.assign(slots, 0);
    for (std::size_t n = 0; n < circuit_.nets().size(); ++n)
        for (const TerminalRef& ref : circuit_.nets()[n].terminals) terminal_net_[first_terminal_[ref.device] + ref.terminal] = n;
    WrapperMerge merge = merge_wrapper_parasitics(circuit_, first_terminal_, terminal_net_);
    for (std::size_t& net : terminal_net_) net = merge.representative[net];
    shorted_ = std::move(merge.shorted);
}

std::size_t CircuitIndex::net_of(std::size_t device, std::size_t terminal) const {
    return terminal_net_[first_terminal_[device] + terminal];
}

void CircuitIndex::index_device(std::size_t d) {
    const Device& device = circuit_.devices()[d];
    if (shorted_[d]) return;
    if (auto kind = kind_of(device)) {
        bool mos = device.kind == DeviceKind::mosfet;
        add_transistor(d, *kind, mos ? "d" : "c", mos ? "g" : "b", mos ? "s" : "e");
        return;
    }
    if (device.kind == DeviceKind::capacitor) return;
    if (device.kind == DeviceKind::resistor && device.terminals.size() == 2) {
        for (std::size_t k = 0; k < 2; ++k) nets_[net_of(d, k)].resistors.push_back(d);
        return;
    }
    for (std::size_t k = 0; k < device.terminals.size(); ++k) ++nets_[net_of(d, k)].others;
}

void CircuitIndex::add_transistor(std::size_t d, Kind kind, const char* drain, const char* control, const char* source) {
    const Device& device = circuit_.devices()[d];
    const Terminal* td = device.terminal(drain);
    const Terminal* tg = device.terminal(control);
    const Terminal* ts = device.terminal(source);
    if (!td || !tg || !ts) return;
    auto slot = [&](const Terminal* t) { return net_of(d, static_cast<std::size_t>(t - device.terminals.data())); };
    Transistor t{d, kind, slot(td), slot(tg), slot(ts)};
    std::size_t index = transistors_.size();
    transistors_.push_back(t);
    nets_[t.drain].drains.push_back(index);
    nets_[t.control].controls.push_back(index);
    nets_[t.source].sources.push_back(index);
    drain_kinds_[t.drain] |= 1u << static_cast<unsigned>(kind);
    if (t.diode()) diode_kinds_[t.control] |= 1u << static_cast<unsigned>(kind);
}

// Breadth-first from ground through quiet voltage sources.
void CircuitIndex::find_rails() {
    const Net* ground = circuit_.find_net("0");
    if (!ground || ground->terminals.empty()) return;
    std::vector<std::vector<std::size_t>> sources_on(nets_.size());
    for (std::size_t d = 0; d < circuit_.devices().size(); ++d) {
        const Device& device = circuit_.devices()[d];
        if (!is_quiet_source(device) || device.terminals.size() != 2) continue;
        std::size_t a = net_of(d, 0);
        std::size_t b = net_of(d, 1);
        sources_on[a].push_back(b);
        sources_on[b].push_back(a);
    }
    const TerminalRef& on_ground = ground->terminals.front();  // ground as merged with wrapper nets
    std::deque<std::size_t> queue{net_of(on_ground.device, on_ground.terminal)};
    rails_[queue.front()] = true;
    while (!queue.empty()) {
        std::size_t net = queue.front();
        queue.pop_front();
        for (std::size_t next : sources_on[net])
            if (!rails_[next]) {
                rails_[next] = true;
                queue.push_back(next);
            }
    }
}

void CircuitIndex::find_dividers() {
    for (std::size_t n = 0; n < nets_.size(); ++n) {
        const NetUse& u = nets_[n];
        if (rails_[n] || u.resistors.size() < 2 || carriers(n) != u.resistors.size()) continue;
        bool to_rails = true;
        bool two_rails = false;
        const std::size_t first = other_end(u.resistors.front(), n);
        for (std::size_t r : u.resistors) {
            const std::size_t far = other_end(r, n);
            to_rails = to_rails && far != n && rails_[far];
            two_rails = two_rails || far != first;
        }
        dividers_[n] = to_rails && two_rails;
    }
}

std::size_t CircuitIndex::carriers(std::size_t net) const {
    const NetUse& u = nets_[net];
    return u.drains.size() + u.sources.size() + u.resistors.size() + u.others;
}

std::size_t CircuitIndex::other_end(std::size_t resistor, std::size_t net) const {
    std::size_t a = net_of(resistor, 0);
    return a == net ? net_of(resistor, 1) : a;
}

Foot CircuitIndex::foot(std::size_t t) const {
    std::size_t s = transistors_[t].source;
    const NetUse& u = nets_[s];
    if (carriers(s) == 2 && u.sources.size() == 1 && u.resistors.size() == 1) {
        std::size_t far = other_end(u.resistors.front(), s);
        if (far != s) return Foot{far, u.resistors.front()};
    }
    return Foot{s, std::nullopt};
}

std::optional<Step> CircuitIndex::step_up(std::size_t below) const {
    std::size_t n = transistors_[below].drain;
    const NetUse& u = nets_[n];
    if (carriers(n) != 2 || u.drains.size() != 1) return std::nullopt;
    Step step;
    if (u.sources.size() == 1) {
        step.transistor = u.sources.front();
    } else if (u.resistors.size() == 1) {
        std::size_t m = other_end(u.resistors.front(), n);
        const NetUse& v = nets_[m];
        if (m == n || carriers(m) != 2 || v.sources.size() != 1) return std::nullopt;
        step = Step{v.sources.front(), u.resistors.front()};
    } else {
        return std::nullopt;
    }
    if (step.transistor == below || transistors_[step.transistor].kind != transistors_[below].kind) return std::nullopt;
    return step;
}

bool CircuitIndex::is_bias(std::size_t net, Kind kind) const {
    return rails_[net] || dividers_[net] || ((diode_kinds_[net] >> static_cast<unsigned>(kind)) & 1u);
}

std::optional<std::size_t> CircuitIndex::booster_of(std::size_t cascode) const {
    const Transistor& c = transistors_[cascode];
    for (std::size_t a : nets_[c.source].controls)
        if (a != cascode && transistors_[a].drain == c.control) return a;
    return std::nullopt;
}

std::optional<std::size_t> CircuitIndex::stacked_booster_of(std::size_t cascode) const {
    const Transistor& c = transistors_[cascode];
    if (rails_[c.source] || ((diode_kinds_[c.source] >> static_cast<unsigned>(c.kind)) & 1u)) return std::nullopt;
    const bool stacked = (drain_kinds_[c.source] >> static_cast<unsigned>(c.kind)) & 1u;
    return stacked ? booster_of(cascode) : std::nullopt;
}

// A fold node carries a handful of terminals; a wider net is a supply or a bus, and
// scanning it from every device on it would make the pass quadratic.
constexpr std::size_t max_fold_terminals = 8;

std::optional<Step> CircuitIndex::fold_up(std::size_t below) const {
    const Transistor& b = transistors_[below];
    const NetUse& u = nets_[b.drain];
    if (rails_[b.drain] || u.drains.size() + u.sources.size() > max_fold_terminals) return std::nullopt;
    for (std::size_t t : u.drains)
        if (t != below && transistors_[t].kind == b.kind) return std::nullopt;
    std::optional<std::size_t> above;
    for (std::size_t t : u.sources) {
        if (transistors_[t].kind != b.kind) continue;
        if (above) return std::nullopt;
        above = t;
    }
    if (!above || *above == below) return std::nullopt;
    const Transistor& a = transistors_[*above];
    if (a.diode() || is_supply(a.drain) || !(is_bias(a.control, a.kind) || booster_of(*above))) return std::nullopt;
    return Step{*above, std::nullopt};
}

double CircuitIndex::size(std::size_t t) const {
    const Device& d = circuit_.devices()[transistors_[t].device];
    double m = d.parameter("m").value_or(1.0);
    if (d.kind == DeviceKind::bjt) return d.parameter("area").value_or(1.0) * m;
    double w = d.parameter("w").value_or(100e-6);
    double l = d.parameter("l").value_or(100e-6);
    return m * d.parameter("nf").value_or(1.0) * w / l;
}

}  // namespace mirrorcheck::recognise
