// The names a designer knows devices and mirrors by. ngspice names a transistor inside a
// subcircuit by its whole path (`m.xm2.msky130_fd_pr__nfet_01v8`); the designer's schematic
// says `xm2`. A subcircuit instance that holds exactly one transistor (a process kit's
// wrapper, a one-transistor cell) names that transistor; any other device in a subcircuit
// is named by its instance path as written (`x1.m2`).
#pragma once

#include <cstddef>
#include <map>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck {

// ngspice name of a device, or a mirror id, -> the designer's name for it; only names that
// differ are listed.
using DesignerNames = std::map<std::string, std::string>;

// Every device of the circuit and every mirror ("nmos-simple:xm2" for
// "nmos-simple:m.xm2.msky130_fd_pr__nfet_01v8").
DesignerNames find_designer_names(const Circuit& circuit, const std::vector<Mirror>& mirrors);

// The designer's name for `name`, or `name` itself.
const std::string& designer_name(const DesignerNames& names, const std::string& name);

}  // namespace mirrorcheck
