// Runs ngspice in batch mode on a deck and says clearly when it cannot: not installed,
// failed, or did not converge.
#pragma once

#include <filesystem>
#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck {

struct NgspiceCall {
    std::string executable = "ngspice";  // a name looked up on PATH, or a path
    std::filesystem::path deck;          // absolute
    std::filesystem::path log;           // absolute: ngspice's stdout and stderr
    std::filesystem::path run_folder;    // ngspice's working folder (the user's deck folder)
};

// Runs `executable -b deck` in run_folder, its output going to log. Throws InputError with
// code "ngspice.missing" (the executable could not be started), "ngspice.failed" (non-zero
// exit status or an error in its log) or "ngspice.no-convergence", each with the end of the log.
void run_ngspice_batch(const NgspiceCall& call);

// The shell command run_ngspice_batch runs, for a scheduler to run instead (GNU parallel,
// Slurm), and the judgement of its exit status and log afterwards (the same errors).
std::string ngspice_command(const NgspiceCall& call);
void check_ngspice_run(const NgspiceCall& call, int exit_status);

// The "ngspice.failed" error for a run that ended but did not produce what was expected,
// with `what` ("wrote no operating point") and the end of the log.
InputError ngspice_failure(const NgspiceCall& call, const std::string& what);

}  // namespace mirrorcheck
