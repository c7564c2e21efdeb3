// Back end for `peek` on raw files: a short summary per plot, the variable tables of chosen
// plots, or the values of chosen vectors.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"

namespace mirrorcheck::report {

// What `peek FILE` prints for a raw file: one line per plot (kind, points, the scale's range,
// variables by type), or, when `plots` is not empty, the variable tables of the plots it
// selects (raw::Selection's rule).
std::string write_raw_table(const raw::RawFile& file, const std::vector<std::string>& plots = {});

// Only the values of these vectors, in every decoded plot that has them: with their unit and
// an SI prefix, one line per point against the plot's scale ("1 kHz  4.2 MΩ ∠ -3.1°").
std::string write_raw_vectors(const raw::RawFile& file, const std::vector<std::string>& vectors);

// Everything as JSON, values in full precision: {"file", "kind": "raw", "plots": [{...,
// "variables": [...], "vectors": {name: [values]}}]}.
nlohmann::json raw_to_json(const raw::RawFile& file, const std::vector<std::string>& vectors);

}  // namespace mirrorcheck::report
