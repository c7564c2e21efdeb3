#include "parsers/common/errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::errors {

InputError cannot_open(const std::string& path, const std::string& reason) {
    return {"input.cannot-open", Location(path), fmt::format("cannot read the file: {}", reason)};
}

InputError empty_file(const std::string& path) {
    return {"input.empty", Location(path), "the file is empty; expected an ngspice raw file, a `show` listing or a netlist"};
}

InputError unknown_file_kind(const std::string& path) {
    return {"input.unknown-kind", Location(path, 1),
            "cannot tell what this file is; expected an ngspice raw file (starting with `Title:`) "
            "or the text of ngspice's `show` command (a `device` row under a model-type line)"};
}

}  // namespace mirrorcheck::errors
