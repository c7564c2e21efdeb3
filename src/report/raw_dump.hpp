// Back end for `peek` on raw files: what each plot holds, and the values of chosen vectors.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"

namespace mirrorcheck::report {

// Plot headers and variable tables, then for each name in `vectors` its values in every
// decoded plot that has it.
std::string write_raw_table(const raw::RawFile& file, const std::vector<std::string>& vectors);

// The same as JSON: {"file", "kind": "raw", "plots": [{..., "variables": [...], "vectors": {...}}]}.
nlohmann::json raw_to_json(const raw::RawFile& file, const std::vector<std::string>& vectors);

}  // namespace mirrorcheck::report
