#include "src/cli/netlist_limits_option.hpp"

#include <fmt/format.h>

namespace mirrorcheck::cli {

void add_netlist_limit_options(CLI::App& cmd, netlist::ReadLimits& limits) {
    cmd.add_option("--max-devices", limits.max_devices,
                   fmt::format("most devices the flattened netlist may hold (default {}); a deck past it is "
                               "refused as a likely subcircuit bomb",
                               netlist::ReadLimits{}.max_devices))
        ->check(CLI::Range(std::size_t{1}, std::size_t{4'000'000'000}));  // ids are 32-bit
}

}  // namespace mirrorcheck::cli
