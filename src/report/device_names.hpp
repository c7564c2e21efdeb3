// How back ends name devices: ngspice's flattened name, and for people the designer's
// instance beside it where a process-kit wrapper renamed the device.
#pragma once

#include <string>
#include <vector>

#include "src/model/circuit.hpp"

namespace mirrorcheck::report {

// "m1", or "m.xm1.m0 (xm1.m0)" when the designer's instance path differs.
std::string device_label(const Circuit& circuit, std::size_t index);

// ngspice's names of these devices, in order.
std::vector<std::string> device_names(const Circuit& circuit, const std::vector<std::size_t>& devices);

}  // namespace mirrorcheck::report
