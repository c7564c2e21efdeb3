// Renders a `show` listing for `peek`: one section per device, parameters in the order
// of their names, values as read (shortest text that reads back to the same double).
#include "src/report/listing_dump.hpp"

#include <fmt/format.h>
#include <fmt/ranges.h>

namespace mirrorcheck::report {

std::string write_listing_table(const listing::Listing& listing) {
    std::string out = fmt::format("{}: ngspice `show` listing, {} device{}\n", listing.path, listing.devices.size(),
                                  listing.devices.size() == 1 ? "" : "s");
    auto it = std::back_inserter(out);
    for (const auto& d : listing.devices) {
        fmt::format_to(it, "\n{}{}  model: {}  type: {} ({})  line {}\n", d.name, d.maybe_cut ? " (name may be cut)" : "",
                       d.model.empty() ? "-" : d.model, d.model_type, d.model_description, d.line);
        for (const auto& [name, value] : d.parameters) fmt::format_to(it, "  {:<12} {}\n", name, value);
        for (const auto& [name, text] : d.text_values) fmt::format_to(it, "  {:<12} {}\n", name, text);
        for (const auto& [name, values] : d.vectors) fmt::format_to(it, "  {:<12} {}\n", name, fmt::join(values, " "));
    }
    return out;
}

nlohmann::json listing_to_json(const listing::Listing& listing) {
    nlohmann::json devices = nlohmann::json::array();
    for (const auto& d : listing.devices) {
        nlohmann::json params = nlohmann::json::object();
        for (const auto& [name, value] : d.parameters) params[name] = value;
        devices.push_back({{"name", d.name},
                           {"maybe_cut", d.maybe_cut},
                           {"model", d.model},
                           {"model_type", d.model_type},
                           {"model_description", d.model_description},
                           {"line", d.line},
                           {"parameters", params},
                           {"text_values", d.text_values},
                           {"vectors", d.vectors}});
    }
    return {{"file", listing.path}, {"kind", "listing"}, {"devices", devices}};
}

}  // namespace mirrorcheck::report
