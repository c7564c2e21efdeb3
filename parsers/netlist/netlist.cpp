// The netlist reader's one entry point: read the deck, then flatten it.
#include "parsers/netlist/netlist.hpp"

#include "parsers/netlist/flatten.hpp"
#include "parsers/netlist/netlist_deck.hpp"

namespace mirrorcheck::netlist {

FlatNetlist read_netlist(const std::filesystem::path& path, const ReadLimits& limits) {
    auto deck = detail::read_deck(path);
    return detail::flatten(*deck, limits);
}

}  // namespace mirrorcheck::netlist
