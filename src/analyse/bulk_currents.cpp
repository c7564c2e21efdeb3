// The conductances of a BSIM4 device's bulk currents, which ngspice's op data does not report
// (ngspice 39 writes isub, igidl, igisl, but not their derivatives gbds, gbgs, gbbs, ggidl*).
//
// Impact ionisation (b4ld.c, "Substrate current begins"): per finger
//   Isub = (alpha0 + alpha1·Leff)/Leff · Vdiff · exp(-beta0/Vdiff) · Id / S,
//   Vdiff = Vds - Vdseff,   S = 1 + Vdiff/VASCBE (the substrate current body effect factor,
//   VASCBE = Leff·exp(pscbe1·litl/Vdiff)/pscbe2, litl = sqrt(3·(3.9/epsrox)·xj·toxe)),
//   Vdseff = Vdsat - (T1 + sqrt(T1² + 4·delta·Vdsat))/2, T1 = Vdsat - Vds - delta
//   (with the other branch for T1 < 0 and the clamp Vdseff <= Vds, as b4ld.c).
// Taking logarithms, with gm, gds, gmb the reported derivatives of Id,
//   d ln Isub = d ln Id + K·(dVds - dVdseff),   K = 1/Vdiff + beta0/Vdiff² - d ln S/d Vdiff,
// so the three slopes are
//   gbds = Isub·(gds/Id + K·(1 - dVdseff/dVds)),
//   gbgs = Isub·(gm/Id  - K·dVdseff/dVgs),
//   gbbs = Isub·(gmb/Id - K·dVdseff/dVbs),
// exact given the total derivatives of Vdseff (checked against ngspice's own finite
// differences of isub in tests/integration/test_bulk_currents_ngspice.cpp). Those follow
// from the formula above through dVdsat/dV, which ngspice does not report and which would
// take BSIM4's whole drain-current core to recompute. So they are estimated and bounded:
//   dVdsat/dVgs: estimated as 0.9·min(1, Vdsat/X), X = Vgs - Vth + 2·vt (X = 2·vt below
//     threshold): in strong inversion Vdsat = EsatL·X/(Abulk·EsatL + X) grows about in
//     proportion to X, less the velocity saturation; against ngspice's finite differences
//     (gf180 and SKY130, NMOS and PMOS, Vgs - Vth from 0.1 V to 1.2 V) the estimate is within
//     15 % (nearer threshold it is up to twice ngspice's). Bounded between 0 and 1
//     (dVgsteff/dVgs <= 1, dVdsat/dVgsteff <= 1/Abulk, about 1; never above 0.85 in those checks).
//   dVdsat/dVbs: dVdsat/dVgs·gmb/gm (the bulk acts through the threshold, as the gate does).
//   dVdsat/dVds (DIBL only): estimated 0, bounded by dVdsat/dVgs·gds/gm.
// The linearised solve reports how far the result moves across these ranges. Isub itself is the op data's
// when it has it (`@m1[isub]`), else computed from the model card by the formula above.
// Left out: the source-end velocity limit (vtl), which multiplies Id after Isub is taken;
// mtrlmod != 0 (litl from epsrsub).
//
// GIDL and GISL (b4ld.c, gidlmod = 0): Igidl = agidl·Weffcj·T1·exp(-bgidl/T1)·vdb³/(cgidl + vdb³),
// T1 = (Vds - Vgs - egidl)/(3·toxe), zero when vbd > 0; GISL the same with source and drain
// exchanged. Their slopes follow from the reported current without agidl·Weffcj:
//   ggidld = Igidl·((1 + T2)/(T1·3·toxe) + T8/T7), ggidlg = -Igidl·(1 + T2)/(T1·3·toxe),
//   ggidlb = -Igidl·T8/T7,  T2 = bgidl/T1, T7 = -vbd³/(cgidl - vbd³), T8 = 3·cgidl·vbd²/(cgidl - vbd³)²,
// with the poly-depletion gate voltage taken as the gate voltage (dVgs_eff/dVgs = 1): exact
// without ngate, 0.9 % off (said in a note) on a deck whose GIDL halves the output
// resistance with ngate = 2e20 (tests/integration/test_linearise_parasitics_ngspice.cpp).
// Without the currents in the op data they are computed from the card. gidlmod = 1 is not
// modelled.
#include "src/analyse/bulk_currents.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "src/model/bsim4_size.hpp"

namespace mirrorcheck {

BulkSlopes operator-(const BulkSlopes& a, const BulkSlopes& b) { return {a.d - b.d, a.g - b.g, a.b - b.b}; }

namespace {

constexpr double exp_threshold = 34.0;          // b4ld.c
constexpr double min_exp = 1.713908431e-15;     // b4ld.c
constexpr double max_exp = 5.834617425e14;      // b4ld.c
constexpr double min_expl = 3.720075976e-44;    // b4ld.c
constexpr double thermal_voltage = 0.025864;    // kT/q at 27 °C

struct Values {
    double id, gm, gds, gmb, vgs, vds, vbs, vdsat, vth;
};

// Vdseff and its partial derivatives by Vds (at fixed Vdsat) and by Vdsat.
struct EffectiveVds {
    double value = 0, by_vds = 0, by_vdsat = 0;
};

EffectiveVds effective_vds(double vdsat, double vds, double delta) {
    EffectiveVds e;
    const double t1 = vdsat - vds - delta, t2 = std::sqrt(t1 * t1 + 4.0 * delta * vdsat);
    if (t1 >= 0.0) {
        e.value = vdsat - 0.5 * (t1 + t2);
        e.by_vds = 0.5 * (1.0 + t1 / t2);
        e.by_vdsat = 1.0 - 0.5 * (1.0 + (t1 + 2.0 * delta) / t2);
    } else {
        const double t4 = 2.0 * delta / (t2 - t1), t5 = 1.0 - t4, t6 = vdsat * t4 / (t2 - t1);
        e.value = vdsat * t5;
        e.by_vds = t6 * (1.0 - t1 / t2);
        e.by_vdsat = t5 + t6 * ((t1 + 2.0 * delta) / t2 - 1.0);
    }
    if (vds == 0.0) e = {};
    if (e.value > vds) e = {vds, 1.0, 0.0};
    return e;
}

// Isub at the operating point and what its slopes are made of.
struct IsubTerms {
    double isub = 0;
    bool from_op_data = false;
    double k = 0;          // d ln Isub / d Vdiff at fixed Id (K in the file comment)
    EffectiveVds vdseff;   // and its partial derivatives
    Values v;
};

std::optional<IsubTerms> isub_terms(const Device& d, const Values& v, std::optional<double> saved) {
    const Model& model = *d.model;
    const Bsim4Size size = bsim4_size(d);
    auto binned = [&](const char* name, double fallback) { return bsim4_binned_value(model, size, name, fallback); };
    const double alpha = binned("alpha0", 0.0) + binned("alpha1", 0.0) * size.leff, beta0 = binned("beta0", 0.0);
    if (!saved && (alpha <= 0 || beta0 <= 0)) return std::nullopt;
    if (v.id <= 0 || size.leff <= 0) return std::nullopt;

    IsubTerms t;
    t.v = v;
    t.vdseff = effective_vds(v.vdsat, v.vds, binned("delta", 0.01));
    const double diff = v.vds - t.vdseff.value;
    // d ln T1 / d Vdiff, where T1 = alpha/Leff · Vdiff · exp(-beta0/Vdiff).
    double k = 0, t1 = 0;
    if (diff > beta0 / exp_threshold && diff > 0) {
        k = 1.0 / diff + beta0 / (diff * diff);
        t1 = alpha / size.leff * diff * std::exp(-beta0 / diff);
    } else if (diff > 0) {
        k = 1.0 / diff;
        t1 = alpha / size.leff * min_exp * diff;
    }
    // d ln S / d Vdiff, S = 1 + Vdiff/VASCBE.
    const double pscbe1 = binned("pscbe1", 4.24e8), pscbe2 = binned("pscbe2", 1e-5);
    const double epsrox = bsim4_model_value(model, "epsrox", 3.9), toxe = bsim4_model_value(model, "toxe", 3e-9);
    const double litl = std::sqrt(3.0 * 3.9 / epsrox * binned("xj", 1.5e-7) * toxe);
    double s = 1.0, dln_s = 0.0;
    if (pscbe2 > 0 && pscbe1 >= 0) {
        double vascbe = max_exp * size.leff / pscbe2, dvascbe = 0.0;
        if (diff > pscbe1 * litl / exp_threshold) {
            const double t0 = pscbe1 * litl / diff;
            vascbe = size.leff * std::exp(t0) / pscbe2;
            dvascbe = -vascbe * t0 / diff;
        }
        s = 1.0 + diff / vascbe;
        dln_s = (1.0 / vascbe - diff * dvascbe / (vascbe * vascbe)) / s;
    }
    t.from_op_data = saved.has_value();
    t.isub = saved ? *saved : v.id * t1 / s;
    t.k = k - dln_s;
    if (t.isub == 0.0) return std::nullopt;
    return t;
}

// The slopes for given slopes of Vdsat: dVdseff/dV = by_vds·[V is Vds] + by_vdsat·dVdsat/dV.
BulkSlopes isub_slopes(const IsubTerms& t, double by_gate, double by_body, double by_drain) {
    const Values& v = t.v;
    BulkSlopes b;
    b.d = t.isub * (v.gds / v.id + t.k * (1.0 - t.vdseff.by_vds - t.vdseff.by_vdsat * by_drain));
    b.g = t.isub * (v.gm / v.id - t.k * t.vdseff.by_vdsat * by_gate);
    b.b = t.isub * (v.gmb / v.id - t.k * t.vdseff.by_vdsat * by_body);
    return b;
}

std::optional<ImpactIonisation> impact_ionisation(const Device& d, const Values& v, std::optional<double> saved,
                                                  std::vector<std::string>& notes) {
    auto terms = isub_terms(d, v, saved);
    if (!terms) return std::nullopt;
    ImpactIonisation out;
    out.isub = terms->isub;
    out.from_op_data = terms->from_op_data;
    const double x = std::max(v.vgs - v.vth, 0.0) + 2.0 * thermal_voltage;
    const double gate_estimate = 0.9 * std::min(1.0, v.vdsat / x), gate_max = 1.0;
    const double gmb_share = v.gm > 0 ? v.gmb / v.gm : 0.0, gds_share = v.gm > 0 ? v.gds / v.gm : 0.0;
    auto slopes = [&](double gate, double drain) { return isub_slopes(*terms, gate, gate * gmb_share, drain); };
    out.estimate = slopes(gate_estimate, 0.0);
    out.gate_slope_range = {slopes(0.0, 0.0) - out.estimate, slopes(gate_max, 0.0) - out.estimate};
    out.drain_slope_range = {BulkSlopes{}, slopes(gate_estimate, gate_max * gds_share) - out.estimate};
    out.gate_slope_estimate = gate_estimate;
    if (bsim4_model_value(*d.model, "vtl", 0.0) > 0)
        notes.push_back(fmt::format("{}: impact-ionisation conductance approximate (vtl, the source-end velocity "
                                    "limit, is not modelled)",
                                    d.name));
    return out;
}

// One of GIDL (drain side) or GISL (source side), in b4ld.c's terms for it: `v_side` the
// voltage of that side over the other, `v_gate` of the gate over the other side,
// `v_body_junction` of the body over that side (vds, vgs, vbd for GIDL; vsd, vgd, vbs for GISL).
struct LeakageSide {
    double current = 0;
    BulkSlopes slopes;
};

LeakageSide leakage_side(double a, double b_coeff, double c_coeff, double e_coeff, double t0, double v_side,
                         double v_gate, double v_body_junction, double scale, std::optional<double> saved) {
    LeakageSide out;
    const double t1 = (v_side - v_gate - e_coeff) / t0;
    if (a <= 0 || b_coeff <= 0 || t1 <= 0 || c_coeff <= 0 || v_body_junction > 0) return out;
    const double t2 = b_coeff / t1;
    const double t4 = v_body_junction * v_body_junction, t5 = -v_body_junction * t4, t6 = c_coeff + t5;
    const double t7 = t5 / t6, t8 = 3.0 * c_coeff * t4 / t6 / t6;
    if (t7 <= 0) return out;
    // The current before the junction factor t7, per device.
    double i0;
    double by_t1;  // d i0 / d t1, per unit of i0
    if (t2 < 100.0) {
        i0 = saved ? *saved / t7 : scale * a * t1 * std::exp(-t2);
        by_t1 = (1.0 + t2) / t1;
    } else {
        i0 = saved ? *saved / t7 : scale * a * min_expl * t1;
        by_t1 = 1.0 / t1;
    }
    out.current = i0 * t7;
    out.slopes.d = i0 * by_t1 / t0 * t7 + i0 * t8;
    out.slopes.g = -i0 * by_t1 / t0 * t7;
    out.slopes.b = -i0 * t8;
    return out;
}

std::optional<GateInducedLeakage> gate_induced_leakage(const Device& d, const DeviceOp& op, const Values& v,
                                                       std::vector<std::string>& notes) {
    const Model& model = *d.model;
    const Bsim4Size size = bsim4_size(d);
    auto binned = [&](const char* name, double fallback) { return bsim4_binned_value(model, size, name, fallback); };
    const double agidl = binned("agidl", 0.0);
    const double agisl = model.parameters.count("agisl") ? binned("agisl", 0.0) : agidl;
    if (agidl <= 0 && agisl <= 0) return std::nullopt;
    if (bsim4_model_value(model, "gidlmod", 0.0) != 0) {
        notes.push_back(fmt::format("{}: GIDL/GISL conductances left out (gidlmod = 1 is not modelled)", d.name));
        return std::nullopt;
    }
    if (bsim4_model_value(model, "mtrlmod", 0.0) != 0) {
        notes.push_back(fmt::format("{}: GIDL/GISL conductances left out (mtrlmod != 0 is not modelled)", d.name));
        return std::nullopt;
    }
    const double t0 = 3.0 * bsim4_model_value(model, "toxe", 3e-9);
    const double scale = size.weff_cj * size.nf * d.parameter("m").value_or(1.0);
    auto other = [&](const char* gisl, const char* gidl, double fallback) {
        return model.parameters.count(gisl) ? binned(gisl, fallback) : binned(gidl, fallback);
    };
    // vgs, vds, vbs are physical here (b4ld.c takes GIDL from the terminal voltages, not the mode's).
    const double vbd = v.vbs - v.vds, vgd = v.vgs - v.vds;
    GateInducedLeakage out;
    LeakageSide drain = leakage_side(agidl, binned("bgidl", 2.3e9), binned("cgidl", 0.5), binned("egidl", 0.8), t0,
                                     v.vds, v.vgs, vbd, scale, op.get("igidl"));
    LeakageSide source = leakage_side(agisl, other("bgisl", "bgidl", 2.3e9), other("cgisl", "cgidl", 0.5),
                                      other("egisl", "egidl", 0.8), t0, -v.vds, vgd, v.vbs, scale, op.get("igisl"));
    out.igidl = drain.current;
    out.igisl = source.current;
    out.drain = drain.slopes;
    out.source = source.slopes;
    if (out.igidl == 0 && out.igisl == 0) return std::nullopt;
    const double ngate = binned("ngate", 0.0);
    const double weight = std::abs(out.drain.d) + std::abs(out.source.d);  // against the channel's own gds
    if (ngate > 1e18 && ngate < 1e25 && weight > 1e-6 * v.gds)
        notes.push_back(fmt::format("{}: GIDL/GISL conductances approximate (the poly-depletion gate voltage of "
                                    "ngate is taken as the gate voltage)",
                                    d.name));
    return out;
}

bool has_values(const DeviceOp& op) {
    for (const char* q : {"id", "gm", "gds", "vds", "vgs", "vdsat", "vth"})
        if (!op.get(q)) return false;
    return true;
}

Values physical_values(const DeviceOp& op) {
    auto q = [&](const char* name) { return op.get(name).value_or(0.0); };
    return {q("id"), q("gm"), q("gds"), q("gmb"), q("vgs"), q("vds"), q("vbs"), q("vdsat"), q("vth")};
}

// The mode frame b4ld.c computes Isub in: drain and source exchanged when vds < 0.
Values mode_values(const Values& physical) {
    Values mode = physical;
    mode.id = std::abs(physical.id);
    if (physical.vds < 0) {
        mode.vds = -physical.vds;
        mode.vgs = physical.vgs - physical.vds;
        mode.vbs = physical.vbs - physical.vds;
    }
    return mode;
}

bool applies(const Device& d) { return d.model && d.kind == DeviceKind::mosfet && is_bsim4(*d.model); }

}  // namespace

BulkCurrents find_bulk_currents(const Device& d, const DeviceOp& op) {
    BulkCurrents out;
    if (!applies(d)) return out;
    if (!has_values(op)) {
        if (op.get("isub").value_or(0.0) != 0.0)
            out.notes.push_back(fmt::format("{}: impact-ionisation conductance left out (the op data lacks id, vgs, "
                                            "vds, vdsat or vth)",
                                            d.name));
        return out;
    }
    const Values physical = physical_values(op);
    out.impact = impact_ionisation(d, mode_values(physical), op.get("isub"), out.notes);
    out.leakage = gate_induced_leakage(d, op, physical, out.notes);
    return out;
}

std::optional<double> impact_ionisation_current(const Device& d, const DeviceOp& op) {
    if (!applies(d) || !has_values(op)) return std::nullopt;
    auto terms = isub_terms(d, mode_values(physical_values(op)), std::nullopt);
    if (!terms) return std::nullopt;
    return terms->isub;
}

std::optional<BulkSlopes> impact_ionisation_slopes(const Device& d, const DeviceOp& op, double dvdsat_dvgs,
                                                   double dvdsat_dvbs, double dvdsat_dvds) {
    if (!applies(d) || !has_values(op)) return std::nullopt;
    auto terms = isub_terms(d, mode_values(physical_values(op)), op.get("isub"));
    if (!terms) return std::nullopt;
    return isub_slopes(*terms, dvdsat_dvgs, dvdsat_dvbs, dvdsat_dvds);
}

}  // namespace mirrorcheck
