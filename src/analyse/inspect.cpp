// Analysis by inspection: recomputes every mirror output from the operating point with the
// hand-analysis rules of HANDCALC.md, and lists what a designer should look at first.
//
// Per output: Rout by the reflection rule up the stack and by the family formula
// (inspect_rout.cpp), with and without body effect; headroom; each device's region and
// saturation margin; the current ratio; findings.
//
// Regions (device polarity, op_point.hpp). MOS: vgs >= vth is strong inversion, saturated
// when vds >= vdsat (the model's own vdsat, as ngspice reports it), else triode. Below vth,
// a device is in weak inversion when vth - vgs is at most 10·kT/q (0.26 V) and it carries
// more than 100 pA (so leakage and level-1's zero subthreshold current read as cutoff: a
// BSIM4 mirror biased at 50 nA sits 130 mV below its vth and must not); it acts as a
// current source once vds >= 4·kT/q (HANDCALC: 4 to 5 thermal voltages, common practice,
// no source). Otherwise cutoff. Bipolar: cutoff when vbe < 0.4 V; saturation when vce <
// vce_sat or the collector junction is forward biased by more than 0.4 V; else
// forward-active. The 0.4 V junction limit, not vbc > 0, because a cascode's bottom device
// and every diode sit at vbc about 0 with the junction carrying nothing (common practice,
// no source). kT/q is taken at 300.15 K, ngspice's default temperature.
//
// Headroom: the limit is the voltage at the top device's source (emitter) plus (minus, for
// PMOS/PNP) its saturation voltage: below it the top device leaves saturation; the lower
// devices' drains are held by the cascode gates and do not move with the output. Their own
// margins are listed per device.
//
// Current ratio: measured Iout/Iref is the drain (collector) current of the bottom output
// device over that of the bottom reference device; for a simple bipolar mirror Iref is the
// current into the reference node (collector plus every base current on the base net), as
// a designer sets it. Predicted (HANDCALC section 3, Gray, Hurst, Lewis, Meyer, ch. 4):
// N·(1 + (Vds_out - Vds_ref)·gds/Id), gds/Id of the reference device (exact for level 1's
// (1 + lambda·Vds)), the term divided by Rout/ro of the bottom output device when it has a
// degeneration resistor (first order); Vce and go/Ic for bipolar, the whole divided by
// (1 + (Ntot + 1)/beta) for a simple bipolar mirror, beta = Ic/Ib of the reference, Ntot
// the sum of all its outputs' ratios. No prediction for a Widlar mirror, whose ratio is
// set by its resistor.
//
// Left out: mu and body-effect findings look only at the devices that reflect a resistance
// (every level above the bottom one).
#include "src/analyse/inspect.hpp"

#include <algorithm>
#include <cmath>
#include <set>
#include <string>

#include "parsers/common/input_error.hpp"
#include "src/model/op_point_errors.hpp"
#include "src/analyse/inspect_rout.hpp"
#include "src/model/op_point_build.hpp"

namespace mirrorcheck {

using inspect_detail::quantity;

namespace {

constexpr double thermal_voltage = 1.380649e-23 * 300.15 / 1.602176634e-19;
// 10·kT/q below vth the subthreshold current is down 3 to 4 decades from its value at
// threshold (slope factor 1.2 to 1.5): deeper than that, what flows is leakage.
constexpr double weak_inversion_span = 10.0;        // thermal voltages below vth
constexpr double weak_inversion_current = 100e-12;  // amperes
constexpr double weak_saturation = 4.0;             // thermal voltages of vds
constexpr double bjt_cutoff_vbe = 0.4;
constexpr double bjt_forward_vbc = 0.4;
// Body effect worth more than 10 % of Rout is reported (common practice, no source).
constexpr double body_effect_share = 0.10;

double need(const DeviceOp& op, std::string_view q) {
    if (auto v = op.get(q)) return *v;
    throw errors::op_missing_parameters(op.origin, {{op.name, {std::string(q)}, {std::string(q)}, {}, {}}});
}

DeviceRegion classify_mos(const DeviceOp& op, const InspectOptions& options) {
    DeviceRegion r;
    const double vgs = need(op, "vgs"), vth = need(op, "vth"), vds = need(op, "vds"), vdsat = need(op, "vdsat");
    const double id = need(op, "id");
    r.saturation_voltage = vdsat;
    if (vgs >= vth) {
        r.region = vds >= vdsat ? Region::saturation : Region::triode;
    } else if (vth - vgs <= weak_inversion_span * thermal_voltage && id > weak_inversion_current) {
        r.region = Region::weak_inversion;
        r.saturation_voltage = weak_saturation * thermal_voltage;
    } else {
        r.region = Region::cutoff;
    }
    r.headroom = vds - r.saturation_voltage;
    r.current_source = r.region == Region::saturation || (r.region == Region::weak_inversion && r.headroom >= 0);
    r.low_margin = r.current_source && r.headroom < options.margin;
    return r;
}

DeviceRegion classify_bjt(const DeviceOp& op, const InspectOptions& options) {
    DeviceRegion r;
    const double vbe = need(op, "vbe"), vbc = need(op, "vbc");
    const double vce = vbe - vbc;
    r.saturation_voltage = options.vce_sat;
    r.headroom = vce - options.vce_sat;
    if (vbe < bjt_cutoff_vbe)
        r.region = Region::cutoff;
    else if (vce < options.vce_sat || vbc > bjt_forward_vbc)
        r.region = Region::bipolar_saturation;
    else
        r.region = Region::forward_active;
    r.current_source = r.region == Region::forward_active;
    r.low_margin = r.current_source && r.headroom < options.margin;
    return r;
}

const DeviceOp& device_op(const OpPoint& op, const Device& d) {
    if (const DeviceOp* o = op.device(d.name)) return *o;
    throw errors::op_missing_parameters(op.origin, {{d.name, {"every quantity"}, {}, {}, {}}});
}

std::vector<DeviceRegion> classify_all(const Circuit& circuit, const OpPoint& op,
                                       const std::vector<std::size_t>& devices, const InspectOptions& options) {
    std::vector<DeviceRegion> regions;
    for (std::size_t i : devices) {
        DeviceRegion r = classify_region(device_op(op, circuit.devices()[i]), options);
        r.device = i;
        r.name = circuit.devices()[i].name;
        regions.push_back(r);
    }
    return regions;
}

bool is_sink(const Mirror& m) { return m.kind == "nmos" || m.kind == "npn"; }
bool is_bipolar(const Mirror& m) { return m.kind == "npn" || m.kind == "pnp"; }

Headroom compute_headroom(const Circuit& circuit, const OpPoint& op, const Mirror& mirror, const MirrorOutput& output,
                          const DeviceRegion& top) {
    Headroom h;
    h.sink = is_sink(mirror);
    h.output_voltage = op.voltage(output.node);
    h.margin = top.headroom;
    const Device& d = circuit.devices()[output.devices.back()];
    const Terminal* source = d.terminal(d.kind == DeviceKind::bjt ? "e" : "s");
    if (source)
        if (auto vs = op.voltage(source->net))
            h.limit = h.sink ? *vs + top.saturation_voltage : *vs - top.saturation_voltage;
    return h;
}

// Sum of the base currents of every bipolar device whose base is on `net`.
double base_currents_on(const Circuit& circuit, const OpPoint& op, const std::string& net) {
    double sum = 0.0;
    const Net* n = circuit.find_net(net);
    if (!n) return sum;
    for (const TerminalRef& t : n->terminals) {
        const Device& d = circuit.devices()[t.device];
        if (d.kind == DeviceKind::bjt && d.terminals[t.terminal].role == "b") sum += quantity(op, d, "ib");
    }
    return sum;
}

double total_design_ratio(const Mirror& m) {
    double n = 0.0;
    for (const auto& o : m.outputs) n += o.design_ratio.value_or(0.0);
    return n;
}

std::optional<CurrentRatio> compute_ratio(const Circuit& circuit, const OpPoint& op, const Mirror& mirror,
                                          const MirrorOutput& output, const RoutLevel& bottom) {
    if (mirror.reference.empty()) return std::nullopt;
    const Device& ref = circuit.devices()[mirror.reference.front()];
    const Device& out = circuit.devices()[output.devices.front()];
    const bool bjt = is_bipolar(mirror);
    const char* i = bjt ? "ic" : "id";
    const char* v = bjt ? "vce" : "vds";
    const char* g = bjt ? "go" : "gds";
    CurrentRatio r;
    r.design = output.design_ratio;
    const double i_ref = quantity(op, ref, i);
    const double vds_ref = bjt ? quantity(op, ref, "vbe") - quantity(op, ref, "vbc") : quantity(op, ref, v);
    const double vds_out = bjt ? quantity(op, out, "vbe") - quantity(op, out, "vbc") : quantity(op, out, v);
    // A degeneration resistor divides the drain voltage's effect by Rout/ro of the bottom device.
    const double clm = 1.0 + (vds_out - vds_ref) * quantity(op, ref, g) / i_ref * bottom.ro / bottom.rout;
    const bool base_current = bjt && mirror.family == Family::simple;
    if (base_current) {
        const Terminal* base = ref.terminal("b");
        r.measured = quantity(op, out, i) / (i_ref + base_currents_on(circuit, op, base ? base->net : ""));
        r.basis = "Ic(out)/Iref, Iref = Ic(ref) + base currents; N·(1 + ΔVce·go/Ic)/(1 + (Ntot + 1)/beta)";
    } else {
        r.measured = quantity(op, out, i) / i_ref;
        r.basis = bjt ? "Ic(out)/Ic(ref); N·(1 + ΔVce·go/Ic)" : "Id(out)/Id(ref); N·(1 + ΔVds·gds/Id)";
    }
    if (r.design && mirror.family != Family::widlar) {
        r.predicted = *r.design * clm;
        if (base_current) {
            const double beta = i_ref / quantity(op, ref, "ib");
            *r.predicted /= 1.0 + (total_design_ratio(mirror) + 1.0) / beta;
        }
    }
    if (r.predicted && !std::isfinite(*r.predicted)) r.predicted.reset();  // e.g. gds = 0 with id = 0
    if (r.design && mirror.family != Family::widlar) r.error = r.measured / *r.design - 1.0;
    return r;
}

// A level with gds (go) = 0, as ngspice reports for a model without channel-length
// modulation (lambda = 0, no vaf), has an infinite ro; the formulas then give inf or, where
// inf meets 0, NaN. Both mean "unbounded": report +inf, with a note.
void unbounded_when_ro_infinite(RoutEstimate& e, const std::vector<RoutLevel>& levels) {
    bool infinite_ro = false;
    for (const auto& l : levels) infinite_ro = infinite_ro || !std::isfinite(l.ro);
    if (!infinite_ro) return;
    if (!std::isfinite(e.value)) e.value = HUGE_VAL;
    if (!std::isfinite(e.value_no_body)) e.value_no_body = HUGE_VAL;
    e.note = "unbounded: a device reports gds = 0 (a model without channel-length modulation), so its ro is infinite";
}

OutputInspection inspect_output(const Circuit& circuit, const OpPoint& op, const Mirror& mirror,
                                const MirrorOutput& output, const InspectOptions& options, const DesignerNames& names,
                                const std::set<std::string>& held) {
    OutputInspection o;
    o.node = output.node;
    auto rout = inspect_detail::compute_rout(circuit, op, mirror, output, names, held);
    o.levels = std::move(rout.levels);
    o.reflection = std::move(rout.reflection);
    o.family = std::move(rout.family);
    unbounded_when_ro_infinite(o.reflection, o.levels);
    if (o.family) unbounded_when_ro_infinite(*o.family, o.levels);
    o.devices = classify_all(circuit, op, output.devices, options);
    o.headroom = compute_headroom(circuit, op, mirror, output, o.devices.back());
    o.ratio = compute_ratio(circuit, op, mirror, output, o.levels.front());
    return o;
}

// Findings -----------------------------------------------------------------------------

Finding device_finding(FindingCode code, const std::string& mirror, const std::string& device,
                       std::vector<FindingValue> values) {
    values.insert(values.begin(), FindingValue::names("device", {device}));
    Finding f = make_finding(code, mirror, device, std::move(values));
    f.subject_is_device = true;
    return f;
}

void region_findings(const std::string& mirror, const std::vector<DeviceRegion>& devices, const InspectOptions& options,
                     std::vector<Finding>& out) {
    using V = FindingValue;
    for (const DeviceRegion& d : devices) {
        if (d.region == Region::cutoff) {
            out.push_back(device_finding(FindingCode::cutoff, mirror, d.name, {}));
        } else if (!d.current_source) {
            out.push_back(device_finding(FindingCode::out_of_saturation, mirror, d.name,
                                         {V::words("region", std::string(to_string(d.region))),
                                          V::of("shortfall", -d.headroom, Unit::volt),
                                          V::of("saturation_voltage", d.saturation_voltage, Unit::volt)}));
        } else if (d.low_margin) {
            out.push_back(device_finding(FindingCode::low_margin, mirror, d.name,
                                         {V::of("margin", d.headroom, Unit::volt),
                                          V::of("margin_asked", options.margin, Unit::volt)}));
        }
    }
}

void output_findings(const std::string& mirror, const OutputInspection& o, const InspectOptions& options,
                     std::vector<Finding>& out) {
    using V = FindingValue;
    if (o.ratio && o.ratio->error && std::abs(*o.ratio->error) > options.ratio_tolerance) {
        std::vector<FindingValue> values = {V::words("node", o.node), V::of("measured", o.ratio->measured, Unit::none),
                                            V::of("design", *o.ratio->design, Unit::none),
                                            V::of("error", std::abs(*o.ratio->error), Unit::percent),
                                            V::words("basis", o.ratio->basis)};
        if (o.ratio->predicted) values.push_back(V::of("predicted", *o.ratio->predicted, Unit::none));
        out.push_back(make_finding(FindingCode::ratio_error, mirror, o.node, std::move(values)));
    }
    for (std::size_t k = 1; k < o.levels.size(); ++k) {
        const double mu = o.levels[k].gm * o.levels[k].ro;
        if (mu < low_intrinsic_gain)
            out.push_back(device_finding(FindingCode::low_intrinsic_gain, mirror, o.levels[k].name,
                                         {V::of("gain", mu, Unit::none), V::words("node", o.node)}));
    }
    const RoutEstimate& best = o.best();
    if (best.value > 0 && std::abs(best.value - best.value_no_body) / best.value > body_effect_share)
        out.push_back(make_finding(FindingCode::body_effect, mirror, o.node,
                                   {V::words("node", o.node),
                                    V::of("share", std::abs(best.value - best.value_no_body) / best.value, Unit::percent),
                                    V::of("with_body", best.value, Unit::ohm),
                                    V::of("without_body", best.value_no_body, Unit::ohm)}));
}

// Every transistor of the mirrors, so that one error lists all that the op lacks.
std::vector<Finding> collect_findings(const InspectionResult& result, const InspectOptions& options) {
    std::vector<Finding> findings;
    for (const MirrorInspection& m : result.mirrors) {
        region_findings(m.mirror, m.reference, options, findings);
        for (const OutputInspection& o : m.outputs) region_findings(m.mirror, o.devices, options, findings);
        for (const OutputInspection& o : m.outputs) output_findings(m.mirror, o, options, findings);
    }
    sort_findings(findings);
    return findings;
}

}  // namespace

std::string_view to_string(Region region) {
    switch (region) {
        case Region::saturation:
            return "saturation";
        case Region::triode:
            return "triode";
        case Region::weak_inversion:
            return "weak-inversion";
        case Region::cutoff:
            return "cutoff";
        case Region::forward_active:
            return "forward-active";
        case Region::bipolar_saturation:
            return "saturated";
    }
    return "";
}


DeviceRegion classify_region(const DeviceOp& op, const InspectOptions& options) {
    DeviceRegion r = op.is_mos ? classify_mos(op, options) : classify_bjt(op, options);
    r.name = op.name;
    return r;
}

InspectionResult inspect_mirrors(const Circuit& circuit, const OpPoint& op, const std::vector<Mirror>& mirrors,
                                 const InspectOptions& options, const DesignerNames& names) {
    require_transistor_quantities(op, circuit, mirror_transistor_names(circuit, mirrors));
    const std::set<std::string> held = source_held_nets(circuit);
    InspectionResult result;
    for (const Mirror& mirror : mirrors) {
        MirrorInspection m;
        m.mirror = mirror.id;
        m.reference = classify_all(circuit, op, mirror.reference, options);
        for (const MirrorOutput& output : mirror.outputs)
            m.outputs.push_back(inspect_output(circuit, op, mirror, output, options, names, held));
        result.mirrors.push_back(std::move(m));
    }
    result.findings = collect_findings(result, options);
    return result;
}

}  // namespace mirrorcheck
