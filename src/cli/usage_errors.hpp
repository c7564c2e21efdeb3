// Errors in how the command line asks for things (exit status 2), each written once.
#pragma once

#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::cli::usage {

InputError missing_vector(const std::string& path, const std::string& name);
InputError option_needs_raw(const std::string& path);
// A value that is not a number in `unit`; one without its unit; one below zero.
InputError bad_quantity(const std::string& option, const std::string& text, const std::string& unit);
InputError quantity_without_unit(const std::string& option, const std::string& text, const std::string& unit);
InputError negative_quantity(const std::string& option, const std::string& text);
InputError no_op_plot(const std::string& path);
InputError bad_probe(const std::string& text);
InputError bad_min_impedance(const std::string& text);
InputError no_small_signal_plot(const std::string& path);
InputError sweep_not_upwards(const std::string& from, const std::string& to);
InputError would_overwrite_input(const std::string& output, const std::string& input);
InputError copy_would_overwrite_input(const std::string& copy);
InputError no_temporary_folder(const std::string& where);
// `--keep DIR` naming a file, or a folder that holds files mirrorcheck did not write.
InputError keep_not_folder(const std::string& keep);
InputError keep_not_ours(const std::string& keep, const std::string& marker);
// `--timeout` negative or not finite.
InputError bad_timeout(double seconds);
// An option value that is NaN or infinite (`--margin nanV`).
InputError not_finite_quantity(const std::string& option, const std::string& text);
// `--probe NODE=SOURCE` naming a node or source the netlist lacks.
InputError probe_names_nothing(const std::string& probe, const std::string& what, const std::string& name);
// An output file, or standard output ("standard output"), that could not be written whole.
InputError cannot_write(const std::string& path, const std::string& reason);
// --min-yield above 100 %.
InputError min_yield_above_one(const std::string& text);
// `sweep`: --supply not NAME=V,V...; a --temps value not a number of °C; --param not NAME=VALUE.
InputError bad_supply(const std::string& text);
// `--supply NAME=...` naming no voltage source of the netlist.
InputError supply_names_nothing(const std::string& source);
InputError bad_temperature(const std::string& text);
InputError bad_param(const std::string& text);
// `sweep --engine`: GNU parallel or sbatch could not be started, or gave up.
InputError engine_failed(const std::string& engine, const std::string& command, int status);

}  // namespace mirrorcheck::cli::usage
