// Output resistance by inspection (HANDCALC.md sections 1 and 2).
//
// Reflection rule, applied recursively from the rail up: the bottom device sees its
// degeneration resistor (or 0); each next device sees the resistor between it and the level
// below plus that level's Rout. MOS: Rout = ro + (1 + (gm + gmb)·ro)·Rs (Razavi, Design of
// Analog CMOS Integrated Circuits, degenerated common-source stage); bipolar: Rout = ro +
// Re·(1 + gm·ro·rpi/(rpi + Rb)), Re = Rs || (rpi + Rb) (Gray, Hurst, Lewis, Meyer, Analysis
// and Design of Analog Integrated Circuits, ch. 3). Gates and bases are taken at AC ground,
// except the base of a bipolar bottom device whose reference is a diode on the same base
// net: its Rb is that diode's 1/(gm + gpi + go) plus its emitter resistor (a degenerated
// bipolar mirror's reference is not small against rpi); and of a bipolar current source
// whose base sits on a resistor divider: its Rb is the divider's resistors to the supplies
// in parallel (with Re = RE || (rpi + Rb), the same source).
//
// Family formulas where the plain rule is not the circuit (direct small-signal derivations,
// KCL at the internal nodes, for an ideal reference current source):
//   Wilson (M3 output, M2 diode at its source, M1 drives M3's gate): Rout = ro3 +
//     (1 + ro3·(gm3·(1 + A) + gmb3))/(gm2 + gds2), A = gm1·ro1. Exact.
//   improved Wilson (diode M4 on M1's drain drives M3's gate): the same with
//     A = gm1·ro1·(1 + gmb4/(gm4 + gds4)): the diode carries no signal current, so its
//     gate follows its source up to its own body effect. Exact.
//   regulated cascode (booster M5 from M4's source to its gate): Rout = ro4 +
//     Rs·(1 + ro4·(gm4·(1 + A) + gmb4)), A = gm5·(ro5 || ro(load)), the booster's load a
//     current source with its gate held (its ro; infinite when there is none). Exact.
//   Wilson and improved Wilson, bipolar: the same nodes with the base currents of Q3 (at
//     Q1's collector, through the diode in the improved form) and Q1 (at the diode node)
//     kept (wilson_bjt below).
//   cascode, bipolar, stacked-diode reference: Q4's base current returns through the
//     diodes and is mirrored back by Q2 (cascode_bjt below).
//   regulated cascode, bipolar: the same loop as MOS with Q4's rpi loading the booster and
//     Q5's rpi at the emitter node (regulated_bjt below).
//   The bipolar ones are exact for the hybrid-pi model; for large beta and gm·ro they tend
//     to HANDCALC's beta·ro/2 (cascode, Wilsons; Gray, Hurst, Lewis, Meyer, ch. 4) and
//     (beta + 1)·ro (regulated cascode).
// Left out: gmu (the base-collector feedback conductance) everywhere.
#include "src/analyse/inspect_rout.hpp"

#include <fmt/format.h>

#include "src/analyse/reflection.hpp"
#include "parsers/common/input_error.hpp"
#include "src/model/op_point_errors.hpp"

namespace mirrorcheck::inspect_detail {

namespace {

bool is_bjt(const Device& d) { return d.kind == DeviceKind::bjt; }

// A device as the formulas name it: the designer's name (`xm2` for a process kit's wrapped
// transistor), else its instance path as written (`x1.m2`).
std::string shown(const DesignerNames& names, const Device& d) {
    auto it = names.find(d.name);
    return it == names.end() ? d.instance_path() : it->second;
}

std::string net_of(const Device& d, std::string_view role) {
    const Terminal* t = d.terminal(role);
    return t ? t->net : std::string();
}

// Wraps a sum in parentheses when it is a factor.
std::string factor(const std::string& text) {
    return text.find(" + ") == std::string::npos && text.find(" || ") == std::string::npos ? text : "(" + text + ")";
}

// Rb of a current source's base: the resistors from its base net to a net the circuit holds
// (`held`, source_held_nets) in parallel (a divider); 0 when there are none.
double divider_resistance(const Circuit& circuit, const Device& bottom, const std::set<std::string>& held) {
    const Net* base = circuit.find_net(net_of(bottom, "b"));
    if (!base || held.count(to_lower(base->name))) return 0.0;
    double conductance = 0.0;
    for (const TerminalRef& t : base->terminals) {
        const Device& r = circuit.devices()[t.device];
        if (r.kind != DeviceKind::resistor || r.terminals.size() != 2 || !r.value || *r.value <= 0) continue;
        if (held.count(to_lower(r.terminals[1 - t.terminal].net))) conductance += 1.0 / *r.value;
    }
    return conductance > 0 ? 1.0 / conductance : 0.0;
}

// Rb of a bipolar bottom output device: the impedance of a diode-connected reference device
// on its base net, 1/(gm + gpi + go) + RE; for a current source, the divider on its base;
// 0 when the base is driven otherwise.
double bottom_base_resistance(const Circuit& circuit, const OpPoint& op, const Mirror& mirror, const Device& bottom,
                              const std::set<std::string>& held) {
    if (mirror.reference.empty()) return divider_resistance(circuit, bottom, held);
    const Device& ref = circuit.devices()[mirror.reference.front()];
    const std::string base = net_of(ref, "b");
    if (!is_bjt(ref) || base != net_of(ref, "c") || base != net_of(bottom, "b")) return 0.0;
    double rb = 1.0 / (quantity(op, ref, "gm") + quantity(op, ref, "gpi") + quantity(op, ref, "go"));
    if (!mirror.reference_degeneration.empty() && mirror.reference_degeneration.front())
        rb += circuit.devices()[*mirror.reference_degeneration.front()].value.value_or(0.0);
    return rb;
}

RoutLevel reflect_level(const OpPoint& op, const Device& d, double resistor, double below, double below_no_body,
                        double rb) {
    RoutLevel l;
    l.name = d.name;
    l.resistor = resistor;
    l.rs = resistor + below;
    l.rs_no_body = resistor + below_no_body;
    l.gm = quantity(op, d, "gm");
    l.rb = rb;
    if (is_bjt(d)) {
        const double go = quantity(op, d, "go");
        l.gpi = quantity(op, d, "gpi");
        l.ro = 1.0 / go;
        l.rout = reflect_bjt(l.gm, l.gpi, go, l.rs, rb);
        l.rout_no_body = reflect_bjt(l.gm, l.gpi, go, l.rs_no_body, rb);
    } else {
        const double gds = quantity(op, d, "gds");
        l.gmb = quantity(op, d, "gmb");
        l.ro = 1.0 / gds;
        l.rout = reflect_mos(l.gm, l.gmb, gds, l.rs);
        l.rout_no_body = reflect_mos(l.gm, 0.0, gds, l.rs_no_body);
    }
    return l;
}

std::string level_formula(const Device& d, const std::string& rs_text, bool has_rb, const DesignerNames& names) {
    const std::string n = shown(names, d);
    if (rs_text.empty()) return fmt::format("ro({})", n);
    if (!is_bjt(d)) return fmt::format("ro({0}) + (1 + (gm+gmb)({0})·ro({0}))·{1}", n, factor(rs_text));
    if (!has_rb) return fmt::format("ro({0}) + (1 + gm({0})·ro({0}))·({1} || rpi({0}))", n, factor(rs_text));
    return fmt::format("ro({0}) + (1 + gm({0})·ro({0})·rpi({0})/(rpi({0}) + rb))·({1} || (rpi({0}) + rb))", n,
                       factor(rs_text));
}

RoutEstimate reflection_estimate(const Circuit& circuit, const OpPoint& op, const Mirror& mirror,
                                 const MirrorOutput& output, std::vector<RoutLevel>& levels,
                                 const DesignerNames& names, const std::set<std::string>& held) {
    RoutEstimate e;
    e.method = "reflection";
    double below = 0.0, below_no_body = 0.0;
    std::string text;
    for (std::size_t k = 0; k < output.devices.size(); ++k) {
        const Device& d = circuit.devices()[output.devices[k]];
        double resistor = 0.0;
        std::string rs_text = text;
        if (k < output.degeneration.size() && output.degeneration[k]) {
            const Device& r = circuit.devices()[*output.degeneration[k]];
            resistor = r.value.value_or(0.0);
            rs_text = rs_text.empty() ? shown(names, r) : shown(names, r) + " + " + rs_text;
        }
        const double rb = (k == 0 && is_bjt(d)) ? bottom_base_resistance(circuit, op, mirror, d, held) : 0.0;
        RoutLevel l = reflect_level(op, d, resistor, below, below_no_body, rb);
        l.device = output.devices[k];
        text = level_formula(d, rs_text, rb != 0.0 && l.rs != 0.0, names);
        below = l.rout;
        below_no_body = l.rout_no_body;
        levels.push_back(l);
    }
    e.value = below;
    e.value_no_body = below_no_body;
    e.formula = text;
    e.exact = true;
    e.note = "exact for the small-signal model with every gate (base) at AC ground";
    return e;
}

const Device& dev(const Circuit& c, std::size_t i) { return c.devices()[i]; }

// Wilson and improved Wilson, MOS: output {M2 diode, M3}, reference {M1} or {M1, M4}.
std::optional<RoutEstimate> wilson_mos(const Circuit& c, const OpPoint& op, const Mirror& m, const MirrorOutput& out, const DesignerNames& names) {
    if (out.devices.size() != 2 || m.reference.empty()) return std::nullopt;
    const Device& m1 = dev(c, m.reference.front());
    const Device& m2 = dev(c, out.devices[0]);
    const Device& m3 = dev(c, out.devices[1]);
    const double a_core = quantity(op, m1, "gm") / quantity(op, m1, "gds");
    double body_of_diode = 1.0;
    std::string a_text = fmt::format("gm({0})·ro({0})", shown(names, m1));
    const bool improved = m.family == Family::improved_wilson;
    if (improved) {
        if (m.reference.size() < 2) return std::nullopt;
        const Device& m4 = dev(c, m.reference[1]);
        body_of_diode = 1.0 + quantity(op, m4, "gmb") / (quantity(op, m4, "gm") + quantity(op, m4, "gds"));
        a_text += fmt::format("·(1 + gmb({0})/(gm({0}) + gds({0})))", shown(names, m4));
    }
    const double ro3 = 1.0 / quantity(op, m3, "gds");
    const double gm3 = quantity(op, m3, "gm"), gmb3 = quantity(op, m3, "gmb");
    const double diode = quantity(op, m2, "gm") + quantity(op, m2, "gds");
    const double a = a_core * body_of_diode;
    RoutEstimate e;
    e.method = std::string(to_string(m.family));
    e.value = ro3 + (1.0 + ro3 * (gm3 * (1.0 + a) + gmb3)) / diode;
    e.value_no_body = ro3 + (1.0 + ro3 * gm3 * (1.0 + a_core)) / diode;
    e.formula = fmt::format("ro({0}) + (1 + ro({0})·(gm({0})·(1 + A) + gmb({0})))/(gm({1}) + gds({1})), A = {2}",
                            shown(names, m3), shown(names, m2), a_text);
    e.exact = true;
    e.note = improved ? "exact for an ideal reference current source; A includes the diode's body effect"
                      : "exact for an ideal reference current source";
    return e;
}

// The output conductance of a booster's load (Mirror::helper_loads: gds or go of each, its
// gate or base held), and the formula's words for it.
double booster_load_conductance(const Circuit& c, const OpPoint& op, const Mirror& m) {
    double g = 0.0;
    for (std::size_t i : m.helper_loads) {
        const Device& d = dev(c, i);
        g += quantity(op, d, is_bjt(d) ? "go" : "gds");
    }
    return g;
}

std::string booster_load_text(const Circuit& c, const Mirror& m, const DesignerNames& names) {
    std::string text;
    for (std::size_t i : m.helper_loads) text += (text.empty() ? "" : " || ") + ("ro(" + shown(names, dev(c, i)) + ")");
    return text;
}

// Regulated cascode, MOS: output {M2, M4}, booster M5 (first helper) with its load (the
// helper loads' gds in parallel with its own; an ideal current source when there is none).
std::optional<RoutEstimate> regulated_mos(const Circuit& c, const OpPoint& op, const Mirror& m,
                                          const std::vector<RoutLevel>& levels, const DesignerNames& names) {
    if (levels.size() != 2 || m.helpers.empty()) return std::nullopt;
    const Device& m5 = dev(c, m.helpers.front());
    const RoutLevel& top = levels.back();
    const double a = quantity(op, m5, "gm") / (quantity(op, m5, "gds") + booster_load_conductance(c, op, m));
    const std::string load = booster_load_text(c, m, names);
    RoutEstimate e;
    e.method = "regulated-cascode";
    e.value = top.ro + top.rs * (1.0 + top.ro * (top.gm * (1.0 + a) + top.gmb));
    e.value_no_body = top.ro + top.rs_no_body * (1.0 + top.ro * top.gm * (1.0 + a));
    e.formula = fmt::format(
        "ro({0}) + Rs·(1 + ro({0})·(gm({0})·(1 + A) + gmb({0}))), Rs = ro({1}), A = gm({2})·{3}",
        shown(names, dev(c, top.device)), shown(names, dev(c, levels.front().device)), shown(names, m5),
        load.empty() ? "ro(" + shown(names, m5) + ")" : "(ro(" + shown(names, m5) + ") || " + load + ")");
    e.exact = true;
    e.note = load.empty() ? "exact when the booster's load is an ideal current source"
                          : "exact with the booster's load as its output conductance (its gate held)";
    return e;
}

// Regulated cascode, bipolar: output {Q2, Q4}, booster Q5 with an ideal load. Q4's rpi loads
// the booster's output and Q5's rpi the emitter node, so neither gain is gm·ro:
// k = (gm5 - gpi4)/(go5 + gpi4) from Q4's emitter to its base, Gs = 1/Rs + gpi5, and
// Rout = ro4·(1 + (gm4·(1 + k) + go4)/(Gs + gpi4·(1 + k))), tending to (beta4 + 1)·ro4.
std::optional<RoutEstimate> regulated_bjt(const Circuit& c, const OpPoint& op, const Mirror& m,
                                          const std::vector<RoutLevel>& levels, const DesignerNames& names) {
    if (levels.size() != 2 || m.helpers.empty()) return std::nullopt;
    const Device& q5 = dev(c, m.helpers.front());
    const RoutLevel& top = levels.back();
    const double gm5 = quantity(op, q5, "gm"), gpi5 = quantity(op, q5, "gpi"), go5 = quantity(op, q5, "go");
    const double go4 = 1.0 / top.ro;
    const double gload = booster_load_conductance(c, op, m);
    const double k = (gm5 - top.gpi) / (go5 + gload + top.gpi);
    const double gs = 1.0 / top.rs + gpi5;
    RoutEstimate e;
    e.method = "regulated-cascode";
    e.value = e.value_no_body = top.ro * (1.0 + (top.gm * (1.0 + k) + go4) / (gs + top.gpi * (1.0 + k)));
    e.formula = fmt::format(
        "ro({0})·(1 + (gm({0})·(1 + k) + go({0}))/(Gs + gpi({0})·(1 + k))), "
        "k = (gm({1}) - gpi({0}))/(go({1}){3} + gpi({0})), Gs = 1/Rs + gpi({1}), Rs = ro({2})",
        shown(names, dev(c, top.device)), shown(names, q5), shown(names, dev(c, levels.front().device)),
        gload > 0 ? " + Gload" : "");
    e.exact = true;
    e.note = gload > 0 ? "exact for the hybrid-pi model without gmu, Gload the booster's load's output conductance"
                       : "exact for the hybrid-pi model without gmu when the booster's load is an ideal current source";
    return e;
}

// Wilson and improved Wilson, bipolar: output {Q2 diode, Q3}, reference {Q1} or {Q1, Q4},
// ideal Iref. Q3's base current loads Q1's collector (through the diode Q4 in the improved
// form) and Q1's base current loads the diode node:
// h = (gm1 + go1)/(go1 + gpi3·(1 + go1/G4)) (Q3's base-emitter swing per volt at the diode
// node; G4 = (gm + gpi + go)(Q4), infinite without Q4), Gg = gm2 + gpi2 + go2 + gpi1,
// Rout = ro3·(1 + (gm3·h + go3)/(Gg + gpi3·h)), about beta·ro3/2.
std::optional<RoutEstimate> wilson_bjt(const Circuit& c, const OpPoint& op, const Mirror& m, const MirrorOutput& out, const DesignerNames& names) {
    const bool improved = m.family == Family::improved_wilson;
    if (out.devices.size() != 2 || m.reference.size() != (improved ? 2u : 1u)) return std::nullopt;
    const Device& q1 = dev(c, m.reference.front());
    const Device& q2 = dev(c, out.devices[0]);
    const Device& q3 = dev(c, out.devices[1]);
    const double go1 = quantity(op, q1, "go"), gpi3 = quantity(op, q3, "gpi"), go3 = quantity(op, q3, "go");
    double diode_factor = 1.0;
    std::string diode_text;
    if (improved) {
        const Device& q4 = dev(c, m.reference[1]);
        diode_factor += go1 / (quantity(op, q4, "gm") + quantity(op, q4, "gpi") + quantity(op, q4, "go"));
        diode_text = fmt::format("·(1 + go({})/(gm + gpi + go)({}))", shown(names, q1), shown(names, q4));
    }
    const double h = (quantity(op, q1, "gm") + go1) / (go1 + gpi3 * diode_factor);
    const double gg =
        quantity(op, q2, "gm") + quantity(op, q2, "gpi") + quantity(op, q2, "go") + quantity(op, q1, "gpi");
    RoutEstimate e;
    e.method = std::string(to_string(m.family));
    e.value = e.value_no_body = (1.0 + (quantity(op, q3, "gm") * h + go3) / (gg + gpi3 * h)) / go3;
    e.formula = fmt::format(
        "ro({0})·(1 + (gm({0})·h + go({0}))/(Gg + gpi({0})·h)), h = (gm({1}) + go({1}))/(go({1}) + "
        "gpi({0}){3}), Gg = (gm + gpi + go)({2}) + gpi({1}); about beta({0})·ro({0})/2",
        shown(names, q3), shown(names, q1), shown(names, q2), diode_text);
    e.exact = true;
    e.note = "exact for the hybrid-pi model without gmu and an ideal reference current source";
    return e;
}

// Cascode, bipolar, stacked-diode reference: output {Q2, Q4}, reference {Q1, Q3}, ideal Iref.
// Q4's base current flows through the diodes Q3 and Q1 and Q2 mirrors it back:
// G1 = (gm + gpi + go)(Q1) + gpi2, G3 = (gm + gpi + go)(Q3), Q = 1 + gpi4·(1/G1 + 1/G3),
// P = gm4 + gpi4·(1 + gm2/G1) + (go2 + go4)·Q, Rout = ro4·P/(gpi4·(1 + gm2/G1) + go2·Q),
// about beta4·ro4/2 (and ro4 + (1 + gm4·ro4)·ro2 when gpi = 0).
std::optional<RoutEstimate> cascode_bjt(const Circuit& c, const OpPoint& op, const Mirror& m, const MirrorOutput& out, const DesignerNames& names) {
    if (out.devices.size() != 2 || m.reference.size() != 2) return std::nullopt;
    for (const auto& r : out.degeneration)
        if (r) return std::nullopt;
    const Device& q1 = dev(c, m.reference[0]);
    const Device& q3 = dev(c, m.reference[1]);
    const Device& q2 = dev(c, out.devices[0]);
    const Device& q4 = dev(c, out.devices[1]);
    auto diode = [&](const Device& q) {
        return quantity(op, q, "gm") + quantity(op, q, "gpi") + quantity(op, q, "go");
    };
    const double g1 = diode(q1) + quantity(op, q2, "gpi"), g3 = diode(q3);
    const double gpi4 = quantity(op, q4, "gpi"), go4 = quantity(op, q4, "go"), go2 = quantity(op, q2, "go");
    const double q = 1.0 + gpi4 * (1.0 / g1 + 1.0 / g3);
    const double returned = gpi4 * (1.0 + quantity(op, q2, "gm") / g1);
    const double p = quantity(op, q4, "gm") + returned + (go2 + go4) * q;
    RoutEstimate e;
    e.method = "cascode";
    e.value = e.value_no_body = p / (returned + go2 * q) / go4;
    e.formula = fmt::format(
        "ro({0})·P/(gpi({0})·(1 + gm({1})/G1) + go({1})·Q), P = gm({0}) + gpi({0})·(1 + gm({1})/G1) + "
        "(go({1}) + go({0}))·Q, Q = 1 + gpi({0})·(1/G1 + 1/G3), G1 = (gm + gpi + go)({2}) + "
        "gpi({1}), G3 = (gm + gpi + go)({3}); about beta({0})·ro({0})/2",
        shown(names, q4), shown(names, q2), shown(names, q1), shown(names, q3));
    e.exact = true;
    e.note = "exact for the hybrid-pi model without gmu and an ideal reference current source";
    return e;
}

}  // namespace

double quantity(const OpPoint& op, const Device& device, std::string_view name) {
    const DeviceOp* d = op.device(device.name);
    if (d)
        if (auto v = d->get(name)) return *v;
    throw errors::op_missing_parameters(op.origin, {{device.name, {std::string(name)}, {std::string(name)}, {}, {}}});
}

// The top device's drain-bulk junction conductance (gbd; ngspice puts at least gmin there),
// when the op data has it and the bulk is not the source: it sits from the output to the
// bulk, in parallel with everything the formula describes. It matters only at very high
// resistances (1/gmin = 1 TΩ), so the formula names it only where it moves the value by
// more than 0.1 %.
void add_drain_junction(const Circuit& c, const OpPoint& op, const MirrorOutput& output, RoutEstimate& e,
                        const DesignerNames& names) {
    if (output.devices.empty()) return;
    const Device& top = dev(c, output.devices.back());
    const DeviceOp* o = op.device(top.name);
    if (is_bjt(top) || !o || net_of(top, "b") == net_of(top, "s")) return;
    const auto gbd = o->get("gbd");
    if (!gbd || *gbd <= 0 || !std::isfinite(e.value) || e.value <= 0) return;
    auto parallel = [&](double r) { return r > 0 && std::isfinite(r) ? 1.0 / (1.0 / r + *gbd) : r; };
    const double before = e.value;
    e.value = parallel(e.value);
    e.value_no_body = parallel(e.value_no_body);
    if (before / e.value - 1.0 > 1e-3)
        e.formula = "(" + e.formula + ") || 1/gbd(" + shown(names, top) + ")";
}

StackRout compute_rout(const Circuit& circuit, const OpPoint& op, const Mirror& mirror, const MirrorOutput& output,
                       const DesignerNames& names, const std::set<std::string>& held) {
    StackRout r;
    r.reflection = reflection_estimate(circuit, op, mirror, output, r.levels, names, held);
    const bool bipolar = mirror.kind == "npn" || mirror.kind == "pnp";
    switch (mirror.family) {
        case Family::wilson:
        case Family::improved_wilson:
            r.family = bipolar ? wilson_bjt(circuit, op, mirror, output, names) : wilson_mos(circuit, op, mirror, output, names);
            break;
        case Family::regulated_cascode:
            r.family =
                bipolar ? regulated_bjt(circuit, op, mirror, r.levels, names) : regulated_mos(circuit, op, mirror, r.levels, names);
            break;
        case Family::cascode:
            if (bipolar) r.family = cascode_bjt(circuit, op, mirror, output, names);
            break;
        default:
            break;
    }
    add_drain_junction(circuit, op, output, r.reflection, names);
    if (r.family) add_drain_junction(circuit, op, output, *r.family, names);
    return r;
}

}  // namespace mirrorcheck::inspect_detail
