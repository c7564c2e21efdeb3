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

#include <fmt/format.h>

#include "src/model/op_point_errors.hpp"

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
    for (const auto* rules : {op.is_mos ? &mos_rules(*d.model) : &bjt_rules(), &capacitance_rules(*d.model)})
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

std::optional<double> plot_value(const raw::Plot& plot, const std::string& vector) {
    auto index = plot.find(vector);
    if (!index || !plot.decoded || plot.point_count == 0) return std::nullopt;
    return plot.complex ? plot.cplx[*index][0].real() : plot.real[*index][0];
}

// A plain node voltage: `v(x)` or `x` of type voltage, not a device parameter or branch.
bool is_node_voltage(const raw::Variable& v) {
    if (v.type != "voltage") return false;
    std::string name = raw::canonical_vector_name(v.name);
    return name.find_first_of("@#(,") == std::string::npos;
}

void read_node_voltages(OpPoint& op, const raw::Plot& plot) {
    for (std::size_t i = 0; i < plot.variables.size(); ++i)
        if (is_node_voltage(plot.variables[i]) && !plot.complex && plot.decoded && plot.point_count > 0)
            op.node_voltages[raw::canonical_vector_name(plot.variables[i].name)] = plot.real[i][0];
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

}  // namespace

OpPoint build_op_point(const Circuit& circuit, const raw::RawFile& file, const raw::Plot& plot) {
    OpPoint op;
    op.origin = fmt::format("{}: {}", file.path, plot.name);
    if (plot.complex) op.notes.push_back("device parameters taken from the op values that the AC plot repeats");
    else read_node_voltages(op, plot);
    for (const auto& d : circuit.devices()) {
        if (!is_transistor(d)) continue;
        DeviceOp dev = blank_device_op(d, op.origin);
        read_quantities(dev, d, [&](std::string_view p) { return plot_value(plot, fmt::format("@{}[{}]", d.name, p)); });
        op.devices.emplace(d.name, std::move(dev));
    }
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
                return it->second;
            });
        op.devices.emplace(d.name, std::move(dev));
    }
    return op;
}

SaveNames ngspice_save_names(const Device& transistor) {
    SaveNames names;
    if (!is_transistor(transistor)) return names;
    const bool mos = transistor.kind == DeviceKind::mosfet;
    for (const auto& rule : mos ? mos_rules(*transistor.model) : bjt_rules())
        names.required.emplace_back(rule.names.front());
    for (const auto& rule : capacitance_rules(*transistor.model)) names.optional.emplace_back(rule.names.front());
    return names;
}

void require_transistor_quantities(const OpPoint& op, const Circuit& circuit, const std::vector<std::string>& devices) {
    std::vector<MissingQuantities> missing;
    for (const auto& name : devices) {
        const Device* d = circuit.find_device(name);
        const DeviceOp* dev = op.device(name);
        if (!d || !dev) continue;
        MissingQuantities m{d->name, {}, {}, {}};
        const auto& rules = dev->is_mos ? mos_rules(*d->model) : bjt_rules();
        for (const auto& rule : rules)
            if (!dev->get(rule.quantity)) {
                m.quantities.emplace_back(rule.quantity);
                m.ngspice_names.emplace_back(rule.names.front());
            }
        if (m.quantities.empty()) continue;
        for (const auto& rule : capacitance_rules(*d->model))
            if (!dev->get(rule.quantity)) m.optional_names.emplace_back(rule.names.front());
        missing.push_back(std::move(m));
    }
    if (!missing.empty()) throw errors::op_missing_parameters(op.origin, missing);
}

}  // namespace mirrorcheck
