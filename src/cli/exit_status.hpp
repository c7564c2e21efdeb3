// mirrorcheck's exit statuses, and the guard that maps what a command throws to them.
#pragma once

#include <exception>
#include <ostream>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::cli {

inline constexpr int exit_passed = 0;          // no unwaived finding at the failing severity (--fail-on)
inline constexpr int exit_findings = 1;        // some
inline constexpr int exit_bad_input = 2;       // bad usage or unreadable input (an InputError)
inline constexpr int exit_internal_error = 3;  // anything else: a bug to report
inline constexpr int exit_interrupted = 130;   // Ctrl-C stopped a sweep (128 + SIGINT, as shells report it)

// Runs `command` (which returns an exit status) and turns an InputError into its message and
// status 2, any other exception into an internal-error message and status 3.
template <typename Command>
int run_guarded(Command&& command, std::ostream& err) {
    try {
        return command();
    } catch (const InputError& e) {
        err << e.what() << "\n";
        return exit_bad_input;
    } catch (const std::exception& e) {
        err << "mirrorcheck: internal error: " << e.what() << " (please report it with the input files)\n";
        return exit_internal_error;
    }
}

}  // namespace mirrorcheck::cli
