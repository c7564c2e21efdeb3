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

}  // namespace mirrorcheck::cli::usage
