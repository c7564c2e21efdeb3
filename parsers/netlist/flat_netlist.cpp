// FlatNetlist's walk up a device's hierarchy.
#include <algorithm>

#include "parsers/netlist/netlist.hpp"

namespace mirrorcheck::netlist {

std::vector<const FlatInstance*> FlatNetlist::hierarchy(const FlatDevice& d) const {
    std::vector<const FlatInstance*> levels;
    for (std::uint32_t i = d.instance; i != no_index; i = instances[i].parent) levels.push_back(&instances[i]);
    std::reverse(levels.begin(), levels.end());
    return levels;
}

}  // namespace mirrorcheck::netlist
