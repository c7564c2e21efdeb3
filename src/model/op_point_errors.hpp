// Errors about operating-point data that lacks what a review needs, each written once.
#pragma once

#include <string>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck {

struct MissingQuantities {
    std::string device;
    std::vector<std::string> quantities;     // in the convention of op_point.hpp
    std::vector<std::string> ngspice_names;  // what to save for each
    std::vector<std::string> optional_names; // capacitances it also lacks (ngspice names), not required
    std::vector<std::string> solve_names;    // conductances and currents the exact solve uses, also lacking
};

namespace errors {

InputError op_missing_parameters(const std::string& origin, const std::vector<MissingQuantities>& missing);

}  // namespace errors
}  // namespace mirrorcheck
