#include "src/cli/usage_errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::cli::usage {

InputError missing_vector(const std::string& path, const std::string& name) {
    return {"usage.missing-vector", Location(path),
            fmt::format("no vector `{}` in the plots read; run `mirrorcheck peek {}` to list the variables "
                        "(device parameters appear only if the deck saves them, e.g. `save @m1[gm]`)",
                        name, path)};
}

InputError option_needs_raw(const std::string& path) {
    return {"usage.option-needs-raw", Location(path), "--vector and --plot apply to raw files only; this file is a listing or a netlist"};
}

InputError bad_quantity(const std::string& option, const std::string& text, const std::string& unit) {
    return {"usage.bad-quantity", Location(option),
            fmt::format("`{}` is not a value in {} (examples: {})", text, unit,
                        unit == "%" ? "5%, 0.05" : "100m" + unit + ", 0.1")};
}

InputError no_op_plot(const std::string& path) {
    return {"usage.no-op-plot", Location(path),
            "no operating point here: expected a raw file with an op plot (or an AC plot with saved device "
            "parameters) or ngspice's `show all` listing"};
}

InputError bad_probe(const std::string& text) {
    return {"usage.probe", Location("--probe"),
            fmt::format("`{}` is not NODE=SOURCE (example: --probe out=vout)", text)};
}

InputError no_small_signal_plot(const std::string& path) {
    return {"usage.no-small-signal-plot", Location(path),
            "no AC or transfer-function plot here: expected an ngspice raw file written after `ac` or `tf`"};
}

}  // namespace mirrorcheck::cli::usage
