// BSIM4 size-dependent values, following ngspice's b4temp.c (checked against ngspice 39
// through the isub, body and gate conductances in tests/integration/test_parasitics_ngspice.cpp):
//   l_new = l + xl, w_new = w/nf + xw (one finger),
//   dl = lint + ll/l_new^lln + lw/w_new^lwn + lwl/(l_new^lln · w_new^lwn),
//   dw = wint + wl/l_new^wln + ww/w_new^wwn + wwl/(l_new^wln · w_new^wwn),
//   dwj = dwj0 + wlc/l_new^wln + wwc/w_new^wwn + wwlc/(l_new^wln · w_new^wwn),
//     dwj0 = dwj, else dwc, else wint,
//   leff = l_new - 2 dl, weff = w_new - 2 dw, weff_cj = w_new - 2 dwj,
//   binunit = 1 (the default): inv_l = 1e-6/leff, inv_w = 1e-6/weff, inv_lw = 1e-12/(leff·weff);
//   otherwise 1/leff, 1/weff, 1/(leff·weff).
// Instance defaults as b4set.c: l = w = 5 um, nf = 1. The geometry is the Device's, with
// `.option scale` already applied by the netlist reader.
#include "src/model/bsim4_size.hpp"

#include <cmath>
#include <string>

namespace mirrorcheck {

bool is_bsim4(const Model& model) {
    return (model.type == "nmos" || model.type == "pmos") && (model.level == 14 || model.level == 54);
}

double bsim4_model_value(const Model& model, std::string_view name, double fallback) {
    auto it = model.parameters.find(std::string(name));
    return it == model.parameters.end() ? fallback : it->second;
}

double bsim4_binned_value(const Model& model, const Bsim4Size& size, std::string_view name, double fallback) {
    const std::string base(name);
    double value = bsim4_model_value(model, base, fallback);
    value += bsim4_model_value(model, "l" + base, 0.0) * size.inv_l;
    value += bsim4_model_value(model, "w" + base, 0.0) * size.inv_w;
    value += bsim4_model_value(model, "p" + base, 0.0) * size.inv_lw;
    return value;
}

Bsim4Size bsim4_size(const Device& device) {
    Bsim4Size s;
    const Model& m = *device.model;
    auto model = [&](const char* name, double fallback) { return bsim4_model_value(m, name, fallback); };
    s.l = device.parameter("l").value_or(5e-6);
    s.w = device.parameter("w").value_or(5e-6);
    s.nf = device.parameter("nf").value_or(1.0);
    if (s.nf <= 0) s.nf = 1.0;
    s.l_new = s.l + model("xl", 0.0);
    s.w_new = s.w / s.nf + model("xw", 0.0);

    const double l_ln = std::pow(s.l_new, model("lln", 1.0)), w_lw = std::pow(s.w_new, model("lwn", 1.0));
    const double dl = model("lint", 0.0) + model("ll", 0.0) / l_ln + model("lw", 0.0) / w_lw +
                      model("lwl", 0.0) / (l_ln * w_lw);
    const double l_wl = std::pow(s.l_new, model("wln", 1.0)), w_ww = std::pow(s.w_new, model("wwn", 1.0));
    const double wint = model("wint", 0.0);
    const double dw = wint + model("wl", 0.0) / l_wl + model("ww", 0.0) / w_ww + model("wwl", 0.0) / (l_wl * w_ww);
    const double dwj0 = model("dwj", model("dwc", wint));
    const double dwj = dwj0 + model("wlc", 0.0) / l_wl + model("wwc", 0.0) / w_ww + model("wwlc", 0.0) / (l_wl * w_ww);

    s.leff = s.l_new - 2 * dl;
    s.weff = s.w_new - 2 * dw;
    s.weff_cj = s.w_new - 2 * dwj;
    const bool microns = model("binunit", 1.0) == 1.0;
    if (s.leff > 0 && s.weff > 0) {
        s.inv_l = (microns ? 1e-6 : 1.0) / s.leff;
        s.inv_w = (microns ? 1e-6 : 1.0) / s.weff;
        s.inv_lw = (microns ? 1e-12 : 1.0) / (s.leff * s.weff);
    }
    return s;
}

}  // namespace mirrorcheck
