// Reads each transistor's operating point out of ngspice's output.
//
// ngspice facts this follows (checked against ngspice 39 in tests/integration/
// test_op_point_ngspice.cpp):
// - MOS levels 1-3 call the threshold `von` and report `von` and `vdsat` negative for
//   PMOS, while `id`, `vgs`, `vds` are already in device polarity; `@m1[vth]` on such a
//   device is saved as 0 without an error, so `vth` is never read for them.
// - BSIM3, BSIM4 and the other levels report `vth`, `vdsat`, `vgs`, `vds`, `id` in device
//   polarity for PMOS too. Every model reports `vbs` normalised (negative = reverse bias).
// - The body transconductance is `gmbs` in raw files and BSIM listings, `gmb` in level-1
//   listings; both are tried.
// - Gummel-Poon PNP reports `vbe`, `vbc` normalised but `ic`, `ib` with their true,
//   negative signs.
// - Currents and conductances include the instance multiplier m (and bipolar area).
// - Capacitances (optional; what ngspice 39 reports and its AC analysis uses):
//   MOS levels 1, 2, 3, 6, 9 print the Meyer set `cgs`, `cgd`, `cgb` (overlaps included)
//   and the junctions `cbd`, `cbs`. BSIM3 and BSIM4 print the charge derivatives `cgg`,
//   `cgd`, `cgs`, `cdg`, `cdd`, `cds`, `cbg`, `cbd`, `cbs` (dQx/dVy; the same names mean
//   something else than in the Meyer set) and the junctions `capbd`, `capbs`; BSIM4 adds
//   the source row (`csg` ...) and bulk column (`cgb` ...), which charge conservation
//   gives anyway, so they are not read. Neither BSIM reports its gate overlap
//   capacitances (cgso, cgdo, cgbo times the width, plus fringing), which its AC analysis
//   adds. Gummel-Poon prints `cpi`, `cmu`, `cbx`, `csub` (`ccs` is not a name ngspice 39
//   knows). Capacitances are positive for p-type devices as for n-type.
#include "src/model/op_point_build.hpp"

#include <cmath>
#include <map>

#include <fmt/format.h>

#include "src/model/device_parasitics.hpp"
#include "src/model/op_point_errors.hpp"
#include "src/model/plot_value_errors.hpp"

namespace mirrorcheck {
namespace {

// How one quantity is read: the names ngspice may use, tried in order, and whether the
// value is negated for p-type devices.
struct Rule {
    std::string_view quantity;
    std::vector<std::string_view> names;
    bool negate_p_type = false;
};

bool is_spice_level_1_to_3(const Model& model) { return model.level >= 1 && model.level <= 3; }

const std::vector<Rule>& mos_rules(const Model& model) {
    static const std::vector<Rule> levels_1_to_3 = {
        {"id", {"id"}},       {"vgs", {"vgs"}},         {"vds", {"vds"}},
        {"vbs", {"vbs"}},     {"vth", {"von"}, true},   {"vdsat", {"vdsat"}, true},
        {"gm", {"gm"}},       {"gds", {"gds"}},         {"gmb", {"gmbs", "gmb"}}};
    static const std::vector<Rule> others = {
        {"id", {"id"}},   {"vgs", {"vgs"}}, {"vds", {"vds"}}, {"vbs", {"vbs"}},         {"vth", {"vth"}},
        {"vdsat", {"vdsat"}}, {"gm", {"gm"}}, {"gds", {"gds"}}, {"gmb", {"gmbs", "gmb"}}};
    return is_spice_level_1_to_3(model) ? levels_1_to_3 : others;
}

const std::vector<Rule>& bjt_rules() {
    static const std::vector<Rule> rules = {
        {"ic", {"ic"}, true}, {"ib", {"ib"}, true}, {"vbe", {"vbe"}}, {"vbc", {"vbc"}},
        {"gm", {"gm"}},       {"gpi", {"gpi"}},     {"gmu", {"gmu"}}, {"go", {"go"}}};
    return rules;
}

// The optional capacitances: OpPoint quantity <- ngspice name (see the file comment).
const std::vector<Rule>& capacitance_rules(const Model& model) {
    static const std::vector<Rule> none;
    static const std::vector<Rule> meyer = {
        {"cgs", {"cgs"}}, {"cgd", {"cgd"}}, {"cgb", {"cgb"}}, {"cbd", {"cbd"}}, {"cbs", {"cbs"}}};
    static const std::vector<Rule> charge = {
        {"cggb", {"cgg"}}, {"cgdb", {"cgd"}}, {"cgsb", {"cgs"}}, {"cdgb", {"cdg"}}, {"cddb", {"cdd"}}, {"cdsb", {"cds"}},
        {"cbgb", {"cbg"}}, {"cbdb", {"cbd"}}, {"cbsb", {"cbs"}}, {"cbd", {"capbd"}}, {"cbs", {"capbs"}}};
    static const std::vector<Rule> bipolar = {{"cpi", {"cpi"}}, {"cmu", {"cmu"}}, {"cbx", {"cbx"}}, {"csub", {"csub"}}};
    switch (capacitance_set(model)) {
        case CapacitanceSet::meyer: return meyer;
        case CapacitanceSet::charge: return charge;
        case CapacitanceSet::bipolar: return bipolar;
        case CapacitanceSet::none: break;
    }
    return none;
}

// Optional quantities the exact solve uses when the op data has them, by what the device's
// model puts inside it (small_signal_network.cpp): the junction conductances gbd, gbs
// (ngspice adds gmin to them) of MOS models that report them, BSIM4's substrate and GIDL/GISL
// currents and its gate resistance gcrg, the bipolar base conductance gx.
std::vector<Rule> solve_rules(const Device& d) {
    std::vector<Rule> rules;
    const Model& model = *d.model;
    auto given = [&](const char* name) {
        auto it = model.parameters.find(name);
        return it != model.parameters.end() && it->second != 0;
    };
    if (d.kind == DeviceKind::bjt) {
        if (given("rb")) rules.push_back({"gx", {"gx"}});
        return rules;
    }
    const double level = model.level;
    const bool bsim4 = level == 14 || level == 54;
    if ((level >= 1 && level <= 3) || level == 8 || level == 49 || bsim4) {
        rules.push_back({"gbd", {"gbd"}});
        rules.push_back({"gbs", {"gbs"}});
    }
    if (!bsim4) return rules;
    for (const char* p : {"alpha0", "lalpha0", "walpha0", "palpha0", "alpha1", "lalpha1", "walpha1", "palpha1"})
        if (given(p)) {
            rules.push_back({"isub", {"isub"}});
            break;
        }
    // GISL takes GIDL's parameters unless the card gives its own (b4set.c).
    for (const char* p : {"agidl", "lagidl", "wagidl", "pagidl", "agisl", "lagisl", "wagisl", "pagisl"})
        if (given(p)) {
            rules.push_back({"igidl", {"igidl"}});
            rules.push_back({"igisl", {"igisl"}});
            break;
        }
    double rgatemod = d.parameter("rgatemod").value_or(model.parameters.count("rgatemod") ? model.parameters.at("rgatemod") : 0);
    if (rgatemod >= 2) rules.push_back({"gcrg", {"gcrg"}});
    return rules;
}

bool is_transistor(const Device& d) {
    return (d.kind == DeviceKind::mosfet || d.kind == DeviceKind::bjt) && d.model != nullptr;
}

DeviceOp blank_device_op(const Device& d, const std::string& origin) {
    DeviceOp op;
    op.name = d.name;
    op.is_mos = d.kind == DeviceKind::mosfet;
    op.polarity = (d.model->type == "pmos" || d.model->type == "pnp") ? Polarity::p_type : Polarity::n_type;
    op.origin = origin;
    return op;
}

// Applies the rules with a lookup `find(name) -> optional<double>` for one device.
template <typename Find>
void read_quantities(DeviceOp& op, const Device& d, Find find) {
    const std::vector<Rule> solve = solve_rules(d);
    for (const auto* rules : {op.is_mos ? &mos_rules(*d.model) : &bjt_rules(), &capacitance_rules(*d.model), &solve})
        for (const auto& rule : *rules)
            for (auto name : rule.names)
                if (auto v = find(name)) {
                    op.values[std::string(rule.quantity)] =
                        (rule.negate_p_type && op.polarity == Polarity::p_type) ? -*v : *v;
                    break;
                }
    if (!op.is_mos && op.values.count("vbe") && op.values.count("vbc"))
        op.values["vce"] = op.values["vbe"] - op.values["vbc"];
}

// A value the review uses: infinity or NaN (a run that did not converge, a corrupt file)
// is an input error at its place.
double finite_value(const raw::RawFile& file, const raw::Plot& plot, std::size_t index) {
    const double v = plot.complex ? plot.cplx[index][0].real() : plot.real[index][0];
    if (!std::isfinite(v))
        throw errors::op_value_not_finite(raw::value_location(file, plot, index, 0), plot.name,
                                          plot.variables[index].name, v);
    return v;
}

std::optional<double> plot_value(const raw::RawFile& file, const raw::Plot& plot, const std::string& vector) {
    auto index = plot.find(vector);
    if (!index || !plot.decoded || plot.point_count == 0) return std::nullopt;
    return finite_value(file, plot, *index);
}

// A node voltage: `v(x)` or `x` of type voltage, not a device parameter or branch. Device
// internal nodes (`m1#body`) count: the terminal voltages ngspice reports refer to them.
bool is_node_voltage(const raw::Variable& v) {
    if (v.type != "voltage") return false;
    std::string name = raw::canonical_vector_name(v.name);
    if (name.find_first_of("@(,") != std::string::npos) return false;
    auto hash = name.find('#');
    return hash == std::string::npos || (hash > 0 && name.find("#branch") == std::string::npos);
}

void read_node_voltages(OpPoint& op, const raw::RawFile& file, const raw::Plot& plot) {
    for (std::size_t i = 0; i < plot.variables.size(); ++i)
        if (is_node_voltage(plot.variables[i]) && !plot.complex && plot.decoded && plot.point_count > 0)
            op.node_voltages[raw::canonical_vector_name(plot.variables[i].name)] = finite_value(file, plot, i);
}

// The listing entry for a device, allowing for names ngspice cut short; null (with a
// note) when none or several could match.
const listing::DeviceListing* match_listing(OpPoint& op, const listing::Listing& l, const Device& d) {
    auto candidates = l.find_candidates(d.name);
    if (candidates.size() == 1) {
        if (candidates.front()->name != d.name)
            op.notes.push_back(fmt::format("listing name `{}` taken as `{}`", candidates.front()->name, d.name));
        return candidates.front();
    }
    if (candidates.size() > 1)
        op.notes.push_back(fmt::format("`{}` is ambiguous in the listing: {} cut names could stand for it; its "
                                       "parameters were not taken (save them with `save @{}[gm]` ...)",
                                       d.name, candidates.size(), d.name));
    return nullptr;
}

double sign_of(const DeviceOp& op) { return op.polarity == Polarity::p_type ? -1.0 : 1.0; }

// The voltage drop across each series resistance of a transistor, from its terminal into the
// channel side, in volts of the circuit's own sign (V(terminal) - V(internal node)); no
// entry for a terminal without a resistance, nullopt when the drop cannot be had from the
// op values (a bias-dependent resistance, a current the data lacks).
struct SeriesDrops {
    std::map<std::string, std::optional<double>> by_role;  // "d", "s", "c", "b", "e"
};

SeriesDrops series_drops(const Device& d, const DeviceOp& op) {
    SeriesDrops drops;
    const DeviceParasitics par = find_device_parasitics(d);
    const double pol = sign_of(op);
    auto drop = [&](std::optional<double> current, std::optional<double> conductance, double direction) {
        if (!current || !conductance || !(*conductance > 0)) return std::optional<double>();
        return std::optional<double>(direction * pol * *current / *conductance);
    };
    if (op.is_mos) {
        const std::optional<double> id = op.get("id");
        if (par.drain) drops.by_role["d"] = par.series_bias_dependent ? std::nullopt : drop(id, par.drain, 1.0);
        if (par.source) drops.by_role["s"] = par.series_bias_dependent ? std::nullopt : drop(id, par.source, -1.0);
        return drops;
    }
    const std::optional<double> ic = op.get("ic"), ib = op.get("ib");
    const std::optional<double> ie = ic && ib ? std::optional<double>(*ic + *ib) : std::nullopt;
    if (par.collector) drops.by_role["c"] = drop(ic, par.collector, 1.0);
    if (par.emitter) drops.by_role["e"] = drop(ie, par.emitter, -1.0);
    if (par.has_base_resistance) {
        std::optional<double> gx = op.get("gx");
        if (!gx && par.base_linear) gx = par.base_linear;
        if (!gx && par.base_from_current && ib) gx = bipolar_base_conductance(d, *ib);
        drops.by_role["b"] = drop(ib, gx, 1.0);
    }
    return drops;
}

// The voltage at the channel side of terminal `role`: the device's internal node when the
// plot has it, else the terminal's net less the drop across its series resistance.
std::optional<double> channel_side_voltage(const OpPoint& op, const Device& d, const SeriesDrops& drops,
                                           const std::string& role) {
    static const std::map<std::string, InternalNode> mos_nodes = {
        {"d", InternalNode::drain}, {"s", InternalNode::source}, {"g", InternalNode::gate}, {"b", InternalNode::body}};
    static const std::map<std::string, InternalNode> bjt_nodes = {
        {"c", InternalNode::collector}, {"b", InternalNode::base}, {"e", InternalNode::emitter}};
    const auto& nodes = d.kind == DeviceKind::mosfet ? mos_nodes : bjt_nodes;
    if (auto it = nodes.find(role); it != nodes.end())
        if (auto v = op.voltage(internal_node_name(d, it->second))) return v;
    const Terminal* t = d.terminal(role);
    if (!t) return std::nullopt;
    std::optional<double> v = op.voltage(t->net);
    auto drop = drops.by_role.find(role);
    if (!v || drop == drops.by_role.end()) return v;
    if (!drop->second) return std::nullopt;
    return *v - *drop->second;
}

// Fills the terminal voltages a transistor's op data lacks (vgs, vds, vbs; vbe, vbc, vce)
// from the node voltages. Returns the quantities it filled.
std::vector<std::string> derive_terminal_voltages(OpPoint& op, const Device& d, DeviceOp& dev) {
    std::vector<std::string> filled;
    const SeriesDrops drops = series_drops(d, dev);
    const double pol = sign_of(dev);
    auto derive = [&](const char* quantity, const char* plus, const char* minus) {
        if (dev.get(quantity)) return;
        auto a = channel_side_voltage(op, d, drops, plus), b = channel_side_voltage(op, d, drops, minus);
        if (!a || !b) return;
        dev.values[quantity] = pol * (*a - *b);
        filled.emplace_back(quantity);
    };
    if (dev.is_mos) {
        derive("vgs", "g", "s");
        derive("vds", "d", "s");
        if (d.terminal("b")) derive("vbs", "b", "s");
    } else {
        derive("vbe", "b", "e");
        derive("vbc", "b", "c");
        if (!dev.get("vce") && dev.get("vbe") && dev.get("vbc")) dev.values["vce"] = dev.values["vbe"] - dev.values["vbc"];
    }
    return filled;
}

std::string few(const std::vector<std::string>& names) {
    std::string s;
    for (std::size_t k = 0; k < names.size() && k < 4; ++k) s += (k ? ", " : "") + names[k];
    if (names.size() > 4) s += fmt::format(" and {} more", names.size() - 4);
    return s;
}

// One note per derived quantity, naming the devices.
void note_derived(OpPoint& op, const std::map<std::string, std::vector<std::string>>& derived) {
    for (const auto& [quantity, devices] : derived)
        op.notes.push_back(fmt::format("{} derived from the node voltages for {} device{} ({}): not in the op data",
                                       quantity, devices.size(), devices.size() == 1 ? "" : "s", few(devices)));
}

// The voltage of each terminal of a transistor relative to its source (emitter), in the
// circuit's sign, from its own terminal voltages and the drops across its series
// resistances; empty when the op data lacks what it needs.
std::map<std::string, double> terminal_offsets(const Device& d, const DeviceOp& dev) {
    std::map<std::string, double> out;
    const SeriesDrops drops = series_drops(d, dev);
    const double pol = sign_of(dev);
    auto drop = [&](const char* role) -> std::optional<double> {
        auto it = drops.by_role.find(role);
        if (it == drops.by_role.end()) return 0.0;
        return it->second;
    };
    // V(x) - V(reference terminal) = V(x) - V(x') + V(x') - V(ref') + V(ref') - V(ref).
    auto offset = [&](const char* role, const char* ref, std::optional<double> internal) {
        auto a = drop(role), b = drop(ref);
        if (!internal || !a || !b) return;
        out[role] = *a + pol * *internal - *b;
    };
    if (dev.is_mos) {
        out["s"] = 0.0;
        offset("g", "s", dev.get("vgs"));
        offset("d", "s", dev.get("vds"));
        if (d.terminal("b")) offset("b", "s", dev.get("vbs"));
    } else {
        out["e"] = 0.0;
        offset("b", "e", dev.get("vbe"));
        auto vce = dev.get("vce");
        offset("c", "e", vce);
    }
    return out;
}

// A listing has no node voltages: they are propagated from ground through the voltage
// sources (their dc values) and the transistors (their terminal voltages). Nets no such
// path reaches stay unknown, and a note names them.
void propagate_node_voltages(OpPoint& op, const Circuit& circuit) {
    std::map<std::string, double>& v = op.node_voltages;
    v["0"] = 0.0;
    std::vector<std::pair<const Device*, std::map<std::string, double>>> transistors;
    for (const auto& d : circuit.devices())
        if (const DeviceOp* dev = is_transistor(d) ? op.device(d.name) : nullptr) {
            auto offsets = terminal_offsets(d, *dev);
            if (offsets.size() > 1) transistors.emplace_back(&d, std::move(offsets));
        }
    for (bool changed = true; changed;) {
        changed = false;
        auto set = [&](const std::string& net, double value) {
            if (v.emplace(to_lower(net), value).second) changed = true;
        };
        for (const auto& d : circuit.devices()) {
            if (d.kind != DeviceKind::vsource) continue;
            const Terminal *p = d.terminal("pos"), *n = d.terminal("neg");
            std::optional<double> dc = d.parameter("dc");
            if (!dc) dc = d.value;
            if (!p || !n || !dc) continue;
            auto vp = v.find(to_lower(p->net)), vn = v.find(to_lower(n->net));
            if (vp != v.end() && vn == v.end()) set(n->net, vp->second - *dc);
            if (vn != v.end() && vp == v.end()) set(p->net, vn->second + *dc);
        }
        for (const auto& [d, offsets] : transistors) {
            std::optional<double> reference;  // V of the source or emitter terminal
            for (const auto& [role, offset] : offsets)
                if (const Terminal* t = d->terminal(role))
                    if (auto it = v.find(to_lower(t->net)); it != v.end()) {
                        reference = it->second - offset;
                        break;
                    }
            if (!reference) continue;
            for (const auto& [role, offset] : offsets)
                if (const Terminal* t = d->terminal(role)) set(t->net, *reference + offset);
        }
    }
    v.erase("0");
    std::vector<std::string> unknown;
    for (const Net& net : circuit.nets())
        if (net.name != "0" && !v.count(to_lower(net.name))) unknown.push_back(net.name);
    std::string text = "node voltages derived from the transistors' terminal voltages and the voltage sources (a "
                       "listing has none)";
    if (!unknown.empty())
        text += fmt::format("; {} net{} unknown, with no such path from ground: {}", unknown.size(),
                            unknown.size() == 1 ? "" : "s", few(unknown));
    op.notes.push_back(text);
}

}  // namespace

OpPoint build_op_point(const Circuit& circuit, const raw::RawFile& file, const raw::Plot& plot) {
    OpPoint op;
    op.origin = fmt::format("{}: {}", file.path, plot.name);
    if (plot.complex) op.notes.push_back("device parameters taken from the op values that the AC plot repeats");
    else read_node_voltages(op, file, plot);
    std::map<std::string, std::vector<std::string>> derived;
    for (const auto& d : circuit.devices()) {
        if (!is_transistor(d)) continue;
        DeviceOp dev = blank_device_op(d, op.origin);
        read_quantities(dev, d, [&](std::string_view p) { return plot_value(file, plot, fmt::format("@{}[{}]", d.name, p)); });
        for (const auto& q : derive_terminal_voltages(op, d, dev)) derived[q].push_back(d.name);
        op.devices.emplace(d.name, std::move(dev));
    }
    note_derived(op, derived);
    return op;
}

OpPoint build_op_point(const Circuit& circuit, const listing::Listing& listing) {
    OpPoint op;
    op.origin = listing.path + ": show listing";
    for (const auto& d : circuit.devices()) {
        if (!is_transistor(d)) continue;
        DeviceOp dev = blank_device_op(d, op.origin);
        if (const auto* entry = match_listing(op, listing, d))
            read_quantities(dev, d, [&](std::string_view p) -> std::optional<double> {
                auto it = entry->parameters.find(std::string(p));
                if (it == entry->parameters.end()) return std::nullopt;
                // ngspice prints `nan`/`inf` for what it could not compute: fine in the
                // listing, an input error for a value the review uses.
                if (!std::isfinite(it->second))
                    throw errors::op_value_not_finite(Location(listing.path), "show listing",
                                                      d.name + " " + std::string(p), it->second);
                return it->second;
            });
        op.devices.emplace(d.name, std::move(dev));
    }
    propagate_node_voltages(op, circuit);
    return op;
}

SaveNames ngspice_save_names(const Device& transistor) {
    SaveNames names;
    if (!is_transistor(transistor)) return names;
    const bool mos = transistor.kind == DeviceKind::mosfet;
    for (const auto& rule : mos ? mos_rules(*transistor.model) : bjt_rules())
        names.required.emplace_back(rule.names.front());
    for (const auto& rule : capacitance_rules(*transistor.model)) names.capacitances.emplace_back(rule.names.front());
    names.optional = names.capacitances;
    for (const auto& rule : solve_rules(transistor)) names.optional.emplace_back(rule.names.front());
    return names;
}

void require_transistor_quantities(const OpPoint& op, const Circuit& circuit, const std::vector<std::string>& devices) {
    std::vector<MissingQuantities> missing;
    for (const auto& name : devices) {
        const Device* d = circuit.find_device(name);
        const DeviceOp* dev = op.device(name);
        if (!d || !dev) continue;
        MissingQuantities m{d->name, {}, {}, {}, {}};
        const auto& rules = dev->is_mos ? mos_rules(*d->model) : bjt_rules();
        for (const auto& rule : rules)
            if (!dev->get(rule.quantity)) {
                m.quantities.emplace_back(rule.quantity);
                m.ngspice_names.emplace_back(rule.names.front());
            }
        if (m.quantities.empty()) continue;
        for (const auto& rule : capacitance_rules(*d->model))
            if (!dev->get(rule.quantity)) m.optional_names.emplace_back(rule.names.front());
        for (const auto& rule : solve_rules(*d))
            if (!dev->get(rule.quantity)) m.solve_names.emplace_back(rule.names.front());
        missing.push_back(std::move(m));
    }
    if (!missing.empty()) throw errors::op_missing_parameters(op.origin, missing);
}

}  // namespace mirrorcheck
