#include "src/cli/usage_errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::cli::usage {
namespace {

// How to write a value in `unit`, for the message that refuses one.
std::string accepted_forms(const std::string& unit) {
    if (unit == "%") return "10%, 2.5%";
    if (unit == "Hz") return "10Hz, 1kHz, 2.5MHz";
    return fmt::format("100m{0}, 0.1{0}", unit);
}

}  // namespace

InputError missing_vector(const std::string& path, const std::string& name) {
    return {"usage.missing-vector", Location(path),
            fmt::format("no vector `{}` in the plots read; run `mirrorcheck peek {} --plot KIND` to list the variables "
                        "(device parameters appear only if the deck saves them, e.g. `save @m1[gm]`)",
                        name, path)};
}

InputError option_needs_raw(const std::string& path) {
    return {"usage.option-needs-raw", Location(path), "--vector and --plot apply to raw files only; this file is a listing or a netlist"};
}

InputError bad_quantity(const std::string& option, const std::string& text, const std::string& unit) {
    return {"usage.bad-quantity", Location(option),
            fmt::format("`{}` is not a value in {}; write it with an SI prefix and the unit, e.g. {}", text, unit,
                        accepted_forms(unit))};
}

InputError quantity_without_unit(const std::string& option, const std::string& text, const std::string& unit) {
    return {"usage.missing-unit", Location(option),
            fmt::format("`{}` has no unit, so it could mean {} things; write it with the unit, e.g. {}", text,
                        unit == "%" ? "two (a percentage or a fraction)" : "several (SI or SPICE prefixes)",
                        accepted_forms(unit))};
}

InputError negative_quantity(const std::string& option, const std::string& text) {
    return {"usage.negative-value", Location(option), fmt::format("`{}` is below zero; give a value of 0 or more", text)};
}

InputError not_finite_quantity(const std::string& option, const std::string& text) {
    return {"usage.not-finite", Location(option), fmt::format("`{}` is not a finite number", text)};
}

InputError probe_names_nothing(const std::string& probe, const std::string& what, const std::string& name) {
    return {"usage.probe", Location("--probe"),
            fmt::format("`{}`: the netlist has no {} `{}`; expected NODE=SOURCE naming an output node and the source "
                        "that probes it",
                        probe, what, name)};
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

InputError bad_min_impedance(const std::string& text) {
    return {"usage.min-impedance", Location("--min-impedance"),
            fmt::format("`{}` is not R or NODE=R (examples: --min-impedance 1Mohm, --min-impedance out=500kohm)", text)};
}

InputError no_small_signal_plot(const std::string& path) {
    return {"usage.no-small-signal-plot", Location(path),
            "no AC or transfer-function plot here: expected an ngspice raw file written after `ac` or `tf`"};
}

InputError sweep_not_upwards(const std::string& from, const std::string& to) {
    return {"usage.sweep-direction", Location("--from"),
            fmt::format("the AC sweep must run from a positive frequency up: --from {} --to {}", from, to)};
}

InputError would_overwrite_input(const std::string& output, const std::string& input) {
    return {"usage.output", Location(output),
            fmt::format("this would overwrite {}, which the netlist reads; choose another -o", input)};
}

InputError copy_would_overwrite_input(const std::string& copy) {
    return {"usage.output", Location(copy),
            "a derived copy would overwrite a file the netlist reads; write the deck elsewhere"};
}

InputError no_temporary_folder(const std::string& where) {
    return {"usage.temporary-folder", Location(where), "cannot create a temporary folder"};
}

InputError keep_not_folder(const std::string& keep) {
    return {"usage.keep", Location(keep), "--keep needs a folder, and this is a file; name a new or empty folder"};
}

InputError keep_not_ours(const std::string& keep, const std::string& marker) {
    return {"usage.keep", Location(keep),
            fmt::format("--keep would write into a folder that holds files mirrorcheck did not write (it has no {}); "
                        "name a new or empty folder, so that nothing of yours is replaced",
                        marker)};
}

InputError bad_timeout(double seconds) {
    return {"usage.timeout", Location("--timeout"),
            fmt::format("--timeout {} is not a time limit: give seconds, 0 or more (0: no limit)", seconds)};
}

InputError cannot_write(const std::string& path, const std::string& reason) {
    return {"usage.cannot-write", Location(path),
            fmt::format("cannot write {}: {}", path == "standard output" ? "the output" : "this file", reason)};
}

InputError min_yield_above_one(const std::string& text) {
    return {"usage.min-yield", Location("--min-yield"),
            fmt::format("--min-yield {} is above 100 %: expected a share of the runs, e.g. 95%", text)};
}

InputError bad_supply(const std::string& text) {
    return {"usage.supply", Location("--supply"),
            fmt::format("`{}` is not SOURCE=V[,V...] (example: --supply vdd=1.62,1.8,1.98)", text)};
}

InputError supply_names_nothing(const std::string& source) {
    return {"usage.supply", Location("--supply"),
            fmt::format("the netlist has no voltage source `{}`; --supply names the source whose DC value each run "
                        "sets (example: --supply vdd=1.62,1.8,1.98)",
                        source)};
}

InputError bad_temperature(const std::string& text) {
    return {"usage.temperature", Location("--temps"),
            fmt::format("`{}` is not a temperature in °C (example: --temps=-40,27,125)", text)};
}

InputError bad_param(const std::string& text) {
    return {"usage.param", Location("--param"), fmt::format("`{}` is not NAME=VALUE (example: --param mc_switch=1)", text)};
}

InputError engine_failed(const std::string& engine, const std::string& command, int status) {
    return {"usage.engine", Location("--engine"),
            fmt::format("`{}` ended with status {}{}: expected {} to run the sweep's jobs", command, status,
                        status == 127 ? " (not installed?)" : "",
                        engine == "slurm" ? "Slurm's sbatch" : "GNU parallel")};
}

}  // namespace mirrorcheck::cli::usage
