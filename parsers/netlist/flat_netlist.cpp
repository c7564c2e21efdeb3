// FlatNetlist's lookups into the tables its devices point into.
#include <algorithm>

#include "parsers/netlist/netlist.hpp"

namespace mirrorcheck::netlist {

std::vector<const FlatInstance*> FlatNetlist::hierarchy(const FlatDevice& d) const {
    std::vector<const FlatInstance*> levels;
    for (std::uint32_t i = d.instance; i != no_index; i = instances[i].parent) levels.push_back(&instances[i]);
    std::reverse(levels.begin(), levels.end());
    return levels;
}

std::optional<double> FlatNetlist::parameter(const FlatDevice& d, std::string_view name) const {
    for (const FlatParameter& p : parameters(d))
        if (words[p.name] == name) return p.value;
    return std::nullopt;
}

const std::string* FlatNetlist::text(const FlatDevice& d, std::string_view key) const {
    for (const FlatText& t : texts(d))
        if (t.key == key) return &t.text;
    return nullptr;
}

}  // namespace mirrorcheck::netlist
