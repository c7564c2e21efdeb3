// `--timeout SECONDS` of the commands that run ngspice (`run`, `sweep`): how long one
// ngspice run may take before it is ended.
#pragma once

#include <chrono>
#include <string>

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

inline constexpr double default_timeout_seconds = 1800;

// Adds the option to `cmd`; `ended` says what happens to a run past it.
void add_timeout_option(CLI::App& cmd, double& seconds, const std::string& ended);

// The limit, rounded up to whole seconds; 0: no limit. Throws InputError "usage.timeout"
// for a negative or non-finite number.
std::chrono::seconds timeout_seconds(double seconds);

}  // namespace mirrorcheck::cli
