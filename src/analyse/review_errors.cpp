#include "src/analyse/review_errors.hpp"

#include <fmt/format.h>

#include "parsers/common/si_format.hpp"

namespace mirrorcheck::errors {

InputError probe_not_a_source(const std::string& node, const std::string& source) {
    return {"usage.probe-source", Location("--probe"),
            fmt::format("`{}={}`: the netlist has no voltage or current source named {}", node, source, source)};
}

InputError probe_not_on_node(const std::string& node, const std::string& source) {
    return {"usage.probe-node", Location("--probe"),
            fmt::format("`{}={}`: {} is not connected to node {} (directly or through one capacitor)", node, source,
                        source, node)};
}

InputError at_outside_sweep(double at, const std::string& plot, double lowest, double highest) {
    return {"usage.at-outside-sweep", Location("--at"),
            fmt::format("{} is outside the AC sweep of {} ({} to {}); give a frequency within it, or leave --at out "
                        "to read the lowest",
                        format_si(at, "Hz"), plot, format_si(lowest, "Hz"), format_si(highest, "Hz"))};
}

}  // namespace mirrorcheck::errors
