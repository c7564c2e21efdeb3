// Runs ngspice in batch mode on a deck and says clearly when it cannot: not installed,
// failed, or did not converge.
#pragma once

#include <chrono>
#include <filesystem>
#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck {

struct NgspiceCall {
    std::string executable = "ngspice";  // a name looked up on PATH, or a path
    std::filesystem::path deck;          // absolute
    std::filesystem::path log;           // absolute: ngspice's stdout and stderr
    std::filesystem::path run_folder;    // ngspice's working folder (the user's deck folder)
    std::chrono::seconds timeout{0};     // run_ngspice_batch ends a run that takes longer; 0: no limit
};

// What run_ngspice_batch throws when a stop signal (see child_process.hpp) ended the run:
// not an input error; the command ends with status 128 + signal after its clean-up.
struct NgspiceStopped {
    int signal;
};

// Runs `executable -b deck` in run_folder, its output going to log, in a process group of
// its own (child_process.hpp). Throws InputError with code "ngspice.missing" (the
// executable could not be started), "ngspice.failed" (non-zero exit status or an error in
// its log), "ngspice.no-convergence" or "ngspice.timeout" (ended after call.timeout), each
// with the end of the log; NgspiceStopped when a stop signal ended it.
void run_ngspice_batch(const NgspiceCall& call);

// The shell command run_ngspice_batch runs, for a scheduler to run instead (GNU parallel,
// Slurm), and the judgement of its exit status and log afterwards (the same errors).
std::string ngspice_command(const NgspiceCall& call);
void check_ngspice_run(const NgspiceCall& call, int exit_status);

// The "ngspice.failed" error for a run that ended but did not produce what was expected,
// with `what` ("wrote no operating point") and the end of the log.
InputError ngspice_failure(const NgspiceCall& call, const std::string& what);

}  // namespace mirrorcheck
