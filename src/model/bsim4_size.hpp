// The size-dependent values of one BSIM4 instance that the exact small-signal solve needs
// (the device's body and gate resistances, its impact-ionisation and GIDL conductances),
// derived from the model card and the instance geometry as ngspice's b4temp.c derives them.
// See bsim4_size.cpp for the formulas and what they leave out.
#pragma once

#include <string_view>

#include "src/model/circuit.hpp"

namespace mirrorcheck {

struct Bsim4Size {
    double l = 0, w = 0, nf = 1;  // drawn length, total drawn width, fingers (instance values)
    double l_new = 0;             // l + xl
    double w_new = 0;             // w / nf + xw: one finger
    double leff = 0, weff = 0;    // effective channel length and width of one finger
    double weff_cj = 0;           // effective width of one finger's source/drain junctions
    double inv_l = 0, inv_w = 0, inv_lw = 0;  // the binning factors of binunit
};

// Leff, Weff and the binning factors of a BSIM4 (level 14 or 54) device.
Bsim4Size bsim4_size(const Device& device);

// A model parameter as the model card gives it, or `fallback` when the card does not.
double bsim4_model_value(const Model& model, std::string_view name, double fallback);

// A binned model parameter (p = p0 + lp·inv_l + wp·inv_w + pp·inv_lw), the prefix-less
// value `fallback` when the card does not give p0.
double bsim4_binned_value(const Model& model, const Bsim4Size& size, std::string_view name, double fallback);

// True for the BSIM4 levels.
bool is_bsim4(const Model& model);

}  // namespace mirrorcheck
