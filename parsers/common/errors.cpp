#include "parsers/common/errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::errors {

InputError cannot_open(const std::string& path, const std::string& reason) {
    return {"input.cannot-open", Location(path), fmt::format("cannot read the file: {}", reason)};
}

InputError empty_file(const std::string& path) {
    return {"input.empty", Location(path), "the file is empty; expected an ngspice raw file, a `show` listing or a netlist"};
}

}  // namespace mirrorcheck::errors
