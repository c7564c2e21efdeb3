// The internal nodes and ohmic resistances of a transistor in ngspice 39, as its setup and
// temperature code create them (facts read from ngspice's sources, each checked against
// ngspice 39 in tests/integration/test_parasitics_ngspice.cpp):
//
// MOS levels 1, 2, 3 (mos1set.c, mos1temp.c and the same in mos2, mos3): nrd and nrs default
// to 1. A drain node d' exists when rd != 0, or rsh != 0 and nrd != 0; its conductance is
// m/rd when the card gives rd, else m/(rsh·nrd). The same for the source with rs and nrs.
//
// BSIM3 (levels 8, 49; b3set.c, b3temp.c), acmmod = 0: nrd and nrs default to 1; a drain
// node exists when rsh·nrd > 0, conductance m/(rsh·nrd). acmmod > 0 is not modelled.
//
// BSIM4 (levels 14, 54; b4set.c, b4temp.c, b4acld.c):
//   drain and source: a node d' when rdsmod != 0, or rsh > 0 and nrd is given and > 0
//     (rgeomod != 0 without nrd also makes one through the layout-based resistance, which
//     is not modelled). Its conductance is 1/(rsh·nrd), or 1e3 S when that is 0, times m.
//     rdsmod = 1 makes the series resistance bias dependent (b4ld.c, "bias-dependent external
//     S/D resistance"): gdtot = gc/(1 + gc·Rd) with gc the conductance above and
//       Rd = rdwmin' + rd0'/2 · T3,  T3 = T2 + sqrt(T2² + 0.01),  T2 = 1/(1 + prwg·Vgd_eff) - prwb·Vbd,
//       Vgd_eff = (T0 + sqrt(T0² + 1e-4))/2,  T0 = Vgd - vfbsd,  vfbsd = Vtm0·ln(ngate/nsd) (0 without ngate),
//       rd0' = rdw/P, rdwmin' = rdwmin/P,  P = (weff_cj/1um)^wr · nf
//     (Rs the same with Vgs, Vbs, rsw, rswmin); and b4acld.c stamps its slopes, the voltage
//     across the resistor times d(gdtot)/dVg and d(gdtot)/dVb. Taken at tnom (prt not applied).
//   gate, rgatemod (instance, else model): 1 and 3 stamp the electrode conductance
//     grgeltd = 1 / (rshg·(xgw + weff_cj/(3·ngcon)) / (ngcon·nf·(l_new - xgl))), or 1e3 S when
//     that resistance is not positive; 2 and 3 stamp the intrinsic input conductance gcrg,
//     which is bias dependent and reported in the op data (`@m1[gcrg]`, with grgeltd in
//     series already for rgatemod 2).
//   body, rbodymod 1 (instance, else model): rbpb, rbpd, rbps, rbdb, rbsb (instance, else
//     model, default 50 ohm); each conductance is gbmin + 1/r (gbmin default 1e-12 S), or
//     1e3 S when r < 1e-3 ohm, times m. rbodymod 2 scales them with the geometry:
//       r = r0 · exp(rl·ln(leff/1um) + rw·ln(weff/1um) + rnf·ln(nf))
//     for rbpbx, rbpby (rbpb = rbpbx·rbpby/(rbpbx + rbpby)), rbps, rbpd, and the x and y parts
//     of rbsb and rbdb (whose l, w, nf exponents are rbsdbxl ... rbsdbynf); when rbps0 or
//     rbpd0 is not given, rbdb and rbsb are gbmin only and rbps, rbpd are 1e3 S; when those
//     are given but rbsbx0/rbsby0 or rbdbx0/rbdby0 are not, rbdb and rbsb are gbmin only.
//
// Bipolar (bjtsetup.c, bjttemp.c, bjtload.c, bjtacld.c): a base node b' when rb != 0, a
// collector node c' (`#collCX`) when rc != 0, an emitter node e' when re != 0. Conductances m·area/rc and
// m·area/re. The base conductance gx is 1/(rbm + (rb - rbm)/qb) with rbm defaulting to rb,
// so area/rb when rbm is not given (or equals rb) and irb is not given; with irb it follows
// the base current (bipolar_base_conductance); otherwise it depends on qb and is read from
// the op data (`@q1[gx]`). Temperature coefficients (trb1, trc1, tre1, ...) are applied only
// at tnom: a note says so when a card gives them. The quasi-saturation resistor rco is not
// modelled.
#include "src/model/device_parasitics.hpp"

#include <cmath>

#include <fmt/format.h>

#include "src/model/bsim4_size.hpp"

namespace mirrorcheck {

namespace {

bool given(const Model& model, const char* name) { return model.parameters.count(name) > 0; }

double model_value(const Model& model, const char* name, double fallback) {
    auto it = model.parameters.find(name);
    return it == model.parameters.end() ? fallback : it->second;
}

// An instance parameter, else the model's, else the fallback.
double instance_or_model(const Device& d, const char* name, double fallback) {
    if (auto v = d.parameter(name)) return *v;
    return model_value(*d.model, name, fallback);
}

double multiplier(const Device& d) { return d.parameter("m").value_or(1.0); }

void spice_levels_1_to_3(const Device& d, DeviceParasitics& p) {
    const Model& model = *d.model;
    const double m = multiplier(d), rsh = model_value(model, "rsh", 0.0);
    auto side = [&](const char* r_name, const char* squares_name) -> std::optional<double> {
        const double r = model_value(model, r_name, 0.0), squares = d.parameter(squares_name).value_or(1.0);
        if (r == 0 && !(rsh != 0 && squares != 0)) return std::nullopt;
        if (given(model, r_name)) return r != 0 ? m / r : 0.0;
        return m / (rsh * squares);
    };
    p.drain = side("rd", "nrd");
    p.source = side("rs", "nrs");
    for (auto* g : {&p.drain, &p.source})
        if (*g && !(**g > 0) ) p.problems.push_back("a series resistance of zero beside a sheet resistance");
}

void bsim3(const Device& d, DeviceParasitics& p) {
    const Model& model = *d.model;
    if (model_value(model, "acmmod", 0.0) != 0) {
        p.problems.push_back("acmmod > 0 (its source/drain resistances are not modelled)");
        return;
    }
    const double m = multiplier(d), rsh = model_value(model, "rsh", 0.0);
    auto side = [&](const char* squares_name) -> std::optional<double> {
        const double r = rsh * d.parameter(squares_name).value_or(1.0);
        if (!(r > 0)) return std::nullopt;
        return m / r;
    };
    p.drain = side("nrd");
    p.source = side("nrs");
}

// One BSIM4 body resistance as a conductance: gbmin + 1/r, 1e3 S below 1 mOhm.
double body_conductance(double r, double gbmin) { return r < 1e-3 ? 1e3 : gbmin + 1.0 / r; }

void bsim4_body(const Device& d, DeviceParasitics& p, const Bsim4Size& size, int mode) {
    const Model& model = *d.model;
    const double m = multiplier(d), gbmin = model_value(model, "gbmin", 1e-12);
    double rbpb = instance_or_model(d, "rbpb", 50), rbpd = instance_or_model(d, "rbpd", 50),
           rbps = instance_or_model(d, "rbps", 50), rbdb = instance_or_model(d, "rbdb", 50),
           rbsb = instance_or_model(d, "rbsb", 50);
    BodyNetwork b;
    if (mode == 1) {
        b = {body_conductance(rbpd, gbmin), body_conductance(rbps, gbmin), body_conductance(rbpb, gbmin),
             body_conductance(rbdb, gbmin), body_conductance(rbsb, gbmin)};
    } else {
        const double lnl = std::log(size.leff * 1e6), lnw = std::log(size.weff * 1e6), lnnf = std::log(size.nf);
        auto scaled = [&](const char* r0, double r0_default, const char* l, const char* w, const char* nf) {
            return model_value(model, r0, r0_default) *
                   std::exp(model_value(model, l, 0) * lnl + model_value(model, w, 0) * lnw +
                            model_value(model, nf, 0) * lnnf);
        };
        int body_mode = 5;
        if (!given(model, "rbps0") || !given(model, "rbpd0")) body_mode = 1;
        else if ((!given(model, "rbsbx0") && !given(model, "rbsby0")) || (!given(model, "rbdbx0") && !given(model, "rbdby0")))
            body_mode = 3;
        if (body_mode == 5) {
            const double sx = scaled("rbsbx0", 100, "rbsdbxl", "rbsdbxw", "rbsdbxnf");
            const double sy = scaled("rbsby0", 100, "rbsdbyl", "rbsdbyw", "rbsdbynf");
            rbsb = sx * sy / (sx + sy);
            const double dx = scaled("rbdbx0", 100, "rbsdbxl", "rbsdbxw", "rbsdbxnf");
            const double dy = scaled("rbdby0", 100, "rbsdbyl", "rbsdbyw", "rbsdbynf");
            rbdb = dx * dy / (dx + dy);
        }
        if (body_mode == 3 || body_mode == 5) {
            rbps = scaled("rbps0", 50, "rbpsl", "rbpsw", "rbpsnf");
            rbpd = scaled("rbpd0", 50, "rbpdl", "rbpdw", "rbpdnf");
        }
        const double bx = scaled("rbpbx0", 100, "rbpbxl", "rbpbxw", "rbpbxnf");
        const double by = scaled("rbpby0", 100, "rbpbyl", "rbpbyw", "rbpbynf");
        rbpb = bx * by / (bx + by);
        b.rbpb = body_conductance(rbpb, gbmin);
        if (body_mode == 5) {
            b.rbdb = body_conductance(rbdb, gbmin);
            b.rbsb = body_conductance(rbsb, gbmin);
        } else {
            b.rbdb = b.rbsb = gbmin;
        }
        if (body_mode == 1) {
            b.rbps = b.rbpd = 1e3;
        } else {
            b.rbps = body_conductance(rbps, gbmin);
            b.rbpd = body_conductance(rbpd, gbmin);
        }
    }
    for (double* g : {&b.rbpd, &b.rbps, &b.rbpb, &b.rbdb, &b.rbsb}) *g *= m;
    p.body = b;
}

void bsim4(const Device& d, DeviceParasitics& p) {
    const Model& model = *d.model;
    const Bsim4Size size = bsim4_size(d);
    const double m = multiplier(d);
    const double rdsmod = model_value(model, "rdsmod", 0.0), rsh = model_value(model, "rsh", 0.0),
                 rgeomod = d.parameter("rgeomod").value_or(0.0);
    auto side = [&](const char* squares_name) -> std::optional<double> {
        const std::optional<double> squares = d.parameter(squares_name);
        bool node = rdsmod != 0;
        if (!node && rsh > 0) {
            if (squares && *squares > 0) node = true;
            else if (!squares && rgeomod != 0) {
                p.problems.push_back("rgeomod != 0 without nrd/nrs (the layout-based source/drain resistance)");
                return std::nullopt;
            }
        }
        if (!node) return std::nullopt;
        const double r = squares ? rsh * *squares : 0.0;
        return m * (r > 0 ? 1.0 / r : 1e3);
    };
    p.drain = side("nrd");
    p.source = side("nrs");
    p.series_bias_dependent = rdsmod != 0;

    int rgatemod = static_cast<int>(model_value(model, "rgatemod", 0));
    if (auto v = d.parameter("rgatemod"); v && *v >= 0 && *v <= 3) rgatemod = static_cast<int>(*v);
    if (rgatemod < 0 || rgatemod > 3) rgatemod = 0;
    p.gate.mode = rgatemod;
    if (rgatemod != 0) {
        const double ngcon = instance_or_model(d, "ngcon", 1.0), xgw = instance_or_model(d, "xgw", 0.0);
        const double r = model_value(model, "rshg", 0.1) * (xgw + size.weff_cj / 3.0 / ngcon) /
                         (ngcon * size.nf * (size.l_new - model_value(model, "xgl", 0.0)));
        p.gate.electrode = m * (r > 0 ? 1.0 / r : 1e3);
    }

    int rbodymod = static_cast<int>(model_value(model, "rbodymod", 0));
    if (auto v = d.parameter("rbodymod"); v && (*v == 0 || *v == 1 || *v == 2)) rbodymod = static_cast<int>(*v);
    if (rbodymod == 1 || rbodymod == 2) bsim4_body(d, p, size, rbodymod);
}

void bipolar(const Device& d, DeviceParasitics& p) {
    const Model& model = *d.model;
    const double area = d.parameter("area").value_or(1.0), m = multiplier(d);
    const double rc = model_value(model, "rc", 0.0), re = model_value(model, "re", 0.0),
                 rb = model_value(model, "rb", 0.0);
    if (rc != 0) p.collector = m * area / rc;
    if (re != 0) p.emitter = m * area / re;
    if (rb != 0) {
        p.has_base_resistance = true;
        const double rbm = model_value(model, "rbm", rb);
        if (given(model, "irb") && model_value(model, "irb", 0.0) != 0) p.base_from_current = true;
        else if (rbm == rb) p.base_linear = m * area / rb;
    }
    if (given(model, "rco"))
        p.problems.push_back("the quasi-saturation collector resistance rco");
    for (const char* t : {"trb1", "trb2", "trm1", "trm2", "trc1", "trc2", "tre1", "tre2"})
        if (model_value(model, t, 0.0) != 0) {
            p.notes.push_back(fmt::format("{}: rb, rc, re taken at tnom ({} not applied)", d.name, t));
            break;
        }
}

bool is_spice_level_1_to_3(const Model& model) { return model.level >= 1 && model.level <= 3; }

}  // namespace

std::string_view suffix(InternalNode node) {
    switch (node) {
        case InternalNode::drain: return "drain";
        case InternalNode::source: return "source";
        case InternalNode::gate: return "gate";
        case InternalNode::mid_gate: return "midgate";
        case InternalNode::body: return "body";
        case InternalNode::drain_body: return "dbody";
        case InternalNode::source_body: return "sbody";
        case InternalNode::base: return "base";
        case InternalNode::collector: return "collCX";
        case InternalNode::emitter: return "emitter";
    }
    return "";
}

std::string internal_node_name(const Device& device, InternalNode node) {
    return fmt::format("{}#{}", device.name, suffix(node));
}

bool DeviceParasitics::has_internal_nodes() const {
    return drain || source || gate.mode != 0 || body || collector || emitter || has_base_resistance;
}

DeviceParasitics find_device_parasitics(const Device& d) {
    DeviceParasitics p;
    if (!d.model) return p;
    if (d.kind == DeviceKind::bjt) {
        bipolar(d, p);
    } else if (d.kind == DeviceKind::mosfet) {
        if (is_bsim4(*d.model)) bsim4(d, p);
        else if (d.model->level == 8 || d.model->level == 49) bsim3(d, p);
        else if (is_spice_level_1_to_3(*d.model)) spice_levels_1_to_3(d, p);
        else if (model_value(*d.model, "rd", 0) != 0 || model_value(*d.model, "rs", 0) != 0 ||
                 model_value(*d.model, "rsh", 0) != 0)
            p.problems.push_back(fmt::format("series resistances of MOS level {} are not modelled", d.model->level));
    }
    return p;
}

BiasDependentSeries bsim4_bias_dependent_series(const Device& d, const DeviceParasitics& par, double vgs, double vds,
                                                double vbs, double id) {
    BiasDependentSeries out;
    const Model& model = *d.model;
    const Bsim4Size size = bsim4_size(d);
    const double m = multiplier(d);
    auto binned = [&](const char* name, double fallback) { return bsim4_binned_value(model, size, name, fallback); };
    const double vtm0 = 8.617087e-5 * (model_value(model, "tnom", 27.0) + 273.15);
    const double ngate = binned("ngate", 0.0), nsd = binned("nsd", 1e20);
    const double vfbsd = ngate > 0 ? vtm0 * std::log(ngate / nsd) : 0.0;
    const double prwg = binned("prwg", 1.0), prwb = binned("prwb", 0.0);
    const double weff_wr = std::pow(size.weff_cj * 1e6, binned("wr", 1.0)) * size.nf;
    if (model_value(model, "prt", 0.0) != 0)
        out.notes.push_back(d.name + ": rdsmod = 1 resistances taken at tnom (prt not applied)");
    // One side: `v_gate`, `v_body` over that side's internal node; `r0`, `rmin` the model's
    // per-width values; `given` the geometry conductance (m included); `current` into the
    // terminal from outside (device polarity).
    auto side = [&](double v_gate, double v_body, double r0, double rmin, double given, double current) {
        const double t0 = v_gate - vfbsd, t1 = std::sqrt(t0 * t0 + 1e-4);
        const double v_eff = 0.5 * (t0 + t1), dv_eff = v_eff / t1;
        const double u = 1.0 + prwg * v_eff, du = -prwg / (u * u) * dv_eff;  // d(1/u)/dVg
        const double t2 = 1.0 / u - prwb * v_body, root = std::sqrt(t2 * t2 + 0.01), t3 = t2 + root;
        const double dt3 = t3 / root;
        const double half = std::max(r0, 0.0) / weff_wr / 2.0;
        const double r = std::max(rmin, 0.0) / weff_wr + half * t3;
        const double gc = given / m, g = gc / (1.0 + gc * r);  // one unit of the multiplier
        SeriesSlopes s;
        s.conductance = m * g;
        // The voltage across the resistor is (current/m)/g; times d g/dV = -g²·dR/dV.
        s.by_gate = -current * g * half * dt3 * du;
        s.by_body = -current * g * half * dt3 * (-prwb);
        return s;
    };
    const double vgd = vgs - vds, vbd = vbs - vds;
    if (par.drain) out.drain = side(vgd, vbd, binned("rdw", 100.0), model_value(model, "rdwmin", 0.0), *par.drain, id);
    if (par.source) out.source = side(vgs, vbs, binned("rsw", 100.0), model_value(model, "rswmin", 0.0), *par.source, -id);
    return out;
}

double bipolar_base_conductance(const Device& d, double ib) {
    const Model& model = *d.model;
    const double area = d.parameter("area").value_or(1.0), m = multiplier(d);
    const double rb = model_value(model, "rb", 0.0) / area, rbm = model_value(model, "rbm", model_value(model, "rb", 0.0)) / area;
    const double irb = model_value(model, "irb", 0.0) * area;
    const double per_unit = std::abs(ib) / m;  // bjtload.c works on one unit of the multiplier
    const double x = std::max(per_unit / irb, 1e-9);
    const double z = (-1 + std::sqrt(1 + 14.59025 * x)) / 2.4317 / std::sqrt(x);
    const double t = std::tan(z);
    const double rbb = rbm + 3 * (rb - rbm) * (t - z) / z / t / t;
    return rbb != 0 ? m / rbb : 0.0;
}

}  // namespace mirrorcheck
