// mirrorcheck's exit statuses, and the guard that maps what a command throws to them.
#pragma once

#include <array>
#include <exception>
#include <ostream>
#include <string_view>

#include "parsers/common/input_error.hpp"
#include "src/deck/ngspice_runner.hpp"

namespace mirrorcheck::cli {

inline constexpr int exit_passed = 0;          // no unwaived finding at the failing severity (--fail-on)
inline constexpr int exit_findings = 1;        // some
inline constexpr int exit_bad_input = 2;       // bad usage or unreadable input (an InputError)
inline constexpr int exit_internal_error = 3;  // anything else: a bug to report
inline constexpr int exit_interrupted = 130;   // Ctrl-C stopped a sweep (128 + SIGINT, as shells report it)
inline constexpr int exit_hung_up = 129;       // SIGHUP stopped `run` or `sweep` (128 + SIGHUP)
inline constexpr int exit_terminated = 143;    // SIGTERM stopped `run` or `sweep` (128 + SIGTERM)

// What each status means, for --help and the man page.
struct ExitStatusMeaning {
    int status;
    std::string_view meaning;
};
inline constexpr std::array<ExitStatusMeaning, 7> exit_status_meanings{{
    {exit_passed, "no unwaived finding at the failing severity (--fail-on, default error)"},
    {exit_findings, "some unwaived finding at the failing severity"},
    {exit_bad_input, "bad usage or unreadable input; the message names the file, the line or byte offset, and what "
                     "was expected"},
    {exit_internal_error, "an internal error (please report it with the input files)"},
    {exit_hung_up, "hung up (SIGHUP) while `run` or `sweep` simulated: ngspice ended, temporary files removed"},
    {exit_interrupted, "interrupted (Ctrl-C); a sweep says which reports it kept and how to merge them"},
    {exit_terminated, "terminated (SIGTERM) while `run` or `sweep` simulated: ngspice ended, temporary files removed"},
}};

// Runs `command` (which returns an exit status) and turns an InputError into its message and
// status 2, any other exception into an internal-error message and status 3.
template <typename Command>
int run_guarded(Command&& command, std::ostream& err) {
    try {
        return command();
    } catch (const InputError& e) {
        err << e.what() << "\n";
        return exit_bad_input;
    } catch (const NgspiceStopped& stop) {
        // The command's clean-up (ngspice's group ended, the temporary folder removed) ran
        // on the way here; the status is the signal's, as a shell reports a killed command.
        err << "mirrorcheck: stopped by signal " << stop.signal << " while ngspice ran; ngspice was ended\n";
        return 128 + stop.signal;
    } catch (const std::exception& e) {
        err << "mirrorcheck: internal error: " << e.what() << " (please report it with the input files)\n";
        return exit_internal_error;
    }
}

}  // namespace mirrorcheck::cli
