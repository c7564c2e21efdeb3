// The netlist reader's error catalogue: messages for the person at the terminal.
#include "parsers/netlist/netlist_errors.hpp"

#include <cmath>

#include <fmt/format.h>
#include <fmt/ranges.h>

namespace mirrorcheck::errors {

InputError netlist_syntax(const Location& where, std::string_view expected, std::string_view found) {
    if (found.empty()) return {"netlist.syntax", where, fmt::format("expected {}, found the end of the line", expected)};
    return {"netlist.syntax", where, fmt::format("expected {}, found `{}`", expected, found)};
}

InputError unbalanced(const Location& where, char opener) {
    char closer = opener == '{' ? '}' : opener == '(' ? ')' : opener;
    return {"netlist.unbalanced", where,
            fmt::format("`{}` is never closed; expected a matching `{}` on this line or its `+` continuations",
                        opener, closer)};
}

InputError undefined_parameter(const Location& where, std::string_view name) {
    return {"netlist.undefined-parameter", where,
            fmt::format("parameter `{}` is not defined; define it with `.param {}=...` or pass it on the X line",
                        name, name)};
}

InputError unknown_function(const Location& where, std::string_view name, std::size_t arguments) {
    return {"netlist.unknown-function", where,
            fmt::format("`{}` with {} argument(s) is not a function this reader knows "
                        "(sqrt, exp, log, log10, abs, min, max, pow, sin, cos, tan, atan, floor, ceil, int, ...)",
                        name, arguments)};
}

InputError bad_expression(const Location& where, std::string_view expected, std::string_view text) {
    return {"netlist.bad-expression", where, fmt::format("expected {} in the expression `{}`", expected, text)};
}

InputError unknown_model(const Location& where, std::string_view name) {
    return {"netlist.unknown-model", where,
            fmt::format("no `.model {}` is visible here; define it, or include the file that does", name)};
}

InputError no_model_bin(const Location& where, std::string_view name, double l, double w) {
    return {"netlist.no-model-bin", where,
            fmt::format("none of the binned models `{}.N` covers l={:g} m, w={:g} m (their lmin/lmax/wmin/wmax)",
                        name, l, w)};
}

InputError unknown_subckt(const Location& where, std::string_view name) {
    return {"netlist.unknown-subckt", where,
            fmt::format("no `.subckt {}` is visible here; define it, or include the file that does", name)};
}

InputError wrong_node_count(const Location& where, std::string_view device, std::size_t expected, std::size_t found) {
    return {"netlist.node-count", where,
            fmt::format("`{}` connects {} node(s) but its subcircuit has {} port(s)", device, found, expected)};
}

InputError missing_nodes(const Location& where, std::string_view device, std::string_view expected) {
    return {"netlist.node-count", where, fmt::format("`{}` is incomplete: expected {}", device, expected)};
}

InputError recursive_subckt(const Location& where, std::string_view name) {
    return {"netlist.recursive-subckt", where,
            fmt::format("subcircuit `{}` instantiates itself (directly or through others); the hierarchy must end",
                        name)};
}

InputError hierarchy_too_deep(const Location& where, std::size_t levels) {
    return {"netlist.too-deep", where,
            fmt::format("subcircuits are nested more than {} levels deep here; this reader stops there", levels)};
}

InputError too_many_devices(const Location& where, std::size_t limit) {
    return {"netlist.too-many-devices", where,
            fmt::format("this instance takes the flattened circuit past {} devices; this reader stops there "
                        "(raise the limit with --max-devices if the circuit is really that large)",
                        limit)};
}

InputError parameter_cycle(const Location& where, const std::vector<std::string>& names) {
    return {"netlist.parameter-cycle", where,
            fmt::format("the parameters are defined through each other: {}; none of them has a value",
                        fmt::join(names, " -> "))};
}

InputError non_finite_value(const Location& where, std::string_view text, double value) {
    return {"netlist.not-finite", where,
            fmt::format("`{}` is {}; a value of the circuit must be a finite number", text,
                        std::isnan(value) ? "not a number" : value > 0 ? "infinite" : "minus infinity")};
}

InputError subckt_nesting_too_deep(const Location& where, std::size_t levels) {
    return {"netlist.too-deep", where,
            fmt::format("`.subckt` definitions are nested more than {} levels deep here; this reader stops there",
                        levels)};
}

InputError include_too_deep(const Location& where, std::size_t levels) {
    return {"netlist.include-too-deep", where,
            fmt::format("files include each other more than {} levels deep here; this reader stops there", levels)};
}

InputError included_too_often(const Location& where, std::string_view file, std::size_t times) {
    return {"netlist.included-too-often", where,
            fmt::format("`{}` would be read {} times by here; files that include the next one more than once "
                        "multiply the reading, and this reader stops there",
                        file, times)};
}

InputError missing_include(const Location& where, std::string_view file, std::string_view reason) {
    return {"netlist.missing-include", where,
            fmt::format("cannot read the included file `{}`: {} (as ngspice run in the deck's folder, a relative "
                        "name is looked for in that folder, then beside the including file)",
                        file, reason)};
}

InputError missing_library(const Location& where, std::string_view file, std::string_view reason) {
    return {"netlist.missing-library", where,
            fmt::format("cannot read the library file `{}`: {} (as ngspice run in the deck's folder, a relative "
                        "name is looked for in that folder, then, inside a library, beside that library)",
                        file, reason)};
}

InputError include_cycle(const Location& where, std::string_view file) {
    return {"netlist.include-cycle", where,
            fmt::format("`{}` is already being read: the includes form a cycle", file)};
}

InputError missing_lib_section(const Location& where, std::string_view file, std::string_view section) {
    return {"netlist.missing-lib-section", where,
            fmt::format("`{}` has no `.lib {}` ... `.endl` section", file, section)};
}

InputError unterminated_block(const Location& where, std::string_view opener, std::string_view closer) {
    return {"netlist.unterminated", where, fmt::format("`{}` is never closed; expected `{}`", opener, closer)};
}

InputError stray_statement(const Location& where, std::string_view statement) {
    return {"netlist.stray-statement", where,
            fmt::format("`{}` has no matching opening statement here", statement)};
}

InputError continuation_without_line(const Location& where) {
    return {"netlist.stray-continuation", where,
            "a `+` continuation line must follow an element or statement line"};
}

InputError unsupported_element(const Location& where, std::string_view name) {
    return {"netlist.unsupported", where,
            fmt::format("element `{}` is of a kind this reader does not support (its first letter)", name)};
}

InputError duplicate_device(const Location& where, std::string_view name) {
    return {"netlist.duplicate-device", where, fmt::format("device `{}` is defined twice", name)};
}

InputError file_too_large(const Location& where, std::string_view file, std::size_t bytes, std::size_t limit) {
    return {"netlist.file-too-large", where,
            fmt::format("`{}` holds {} bytes; a netlist file of at most {} bytes was expected", file, bytes, limit)};
}

}  // namespace mirrorcheck::errors
