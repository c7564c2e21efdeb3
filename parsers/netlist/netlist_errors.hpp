// Errors of the netlist reader. Each message is written once, here; each has a stable code
// ("netlist.<what>") that tests check. Every one carries file:line:column.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::errors {

InputError netlist_syntax(const Location& where, std::string_view expected, std::string_view found);
InputError unbalanced(const Location& where, char opener);
InputError undefined_parameter(const Location& where, std::string_view name);
InputError unknown_function(const Location& where, std::string_view name, std::size_t arguments);
InputError bad_expression(const Location& where, std::string_view expected, std::string_view text);
InputError unknown_model(const Location& where, std::string_view name);
InputError no_model_bin(const Location& where, std::string_view name, double l, double w);
InputError unknown_subckt(const Location& where, std::string_view name);
InputError wrong_node_count(const Location& where, std::string_view device, std::size_t expected, std::size_t found);
InputError missing_nodes(const Location& where, std::string_view device, std::string_view expected);
InputError recursive_subckt(const Location& where, std::string_view name);
InputError hierarchy_too_deep(const Location& where, std::size_t levels);
InputError too_many_devices(const Location& where, std::size_t limit);
InputError parameter_cycle(const Location& where, const std::vector<std::string>& names);
InputError non_finite_value(const Location& where, std::string_view text, double value);
InputError subckt_nesting_too_deep(const Location& where, std::size_t levels);
InputError include_too_deep(const Location& where, std::size_t levels);
InputError included_too_often(const Location& where, std::string_view file, std::size_t times);
InputError missing_include(const Location& where, std::string_view file, std::string_view reason);
InputError missing_library(const Location& where, std::string_view file, std::string_view reason);
InputError include_cycle(const Location& where, std::string_view file);
InputError missing_lib_section(const Location& where, std::string_view file, std::string_view section);
InputError unterminated_block(const Location& where, std::string_view opener, std::string_view closer);
InputError stray_statement(const Location& where, std::string_view statement);
InputError continuation_without_line(const Location& where);
InputError unsupported_element(const Location& where, std::string_view name);
InputError duplicate_device(const Location& where, std::string_view name);
InputError file_too_large(const Location& where, std::string_view file, std::size_t bytes, std::size_t limit);

}  // namespace mirrorcheck::errors
