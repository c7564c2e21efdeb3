// Back end for `peek` on `show` listings: each device, its model and parameters.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "parsers/listing/listing.hpp"

namespace mirrorcheck::report {

std::string write_listing_table(const listing::Listing& listing);

// {"file", "kind": "listing", "devices": [{"name", "model", "model_type", "parameters": {...}}]}
nlohmann::json listing_to_json(const listing::Listing& listing);

}  // namespace mirrorcheck::report
